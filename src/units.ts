/**
 * Units, said once. Samples carry their unit from the reader onward; PSD results carry the squared
 * unit per Hz. Standard gravity g_n = 9.80665 m/s^2 (3rd CGPM, 1901).
 */
export const STANDARD_GRAVITY_M_PER_S2 = 9.80665;

export type AccelUnit = "g" | "m/s2";
export const ACCEL_UNITS: readonly AccelUnit[] = ["g", "m/s2"];

/** Multiply a value in `from` by this to get it in `to`. */
export function accelFactor(from: AccelUnit, to: AccelUnit): number {
  if (from === to) return 1;
  return from === "g" ? STANDARD_GRAVITY_M_PER_S2 : 1 / STANDARD_GRAVITY_M_PER_S2;
}

export function accelLabel(u: AccelUnit): string {
  return u === "g" ? "g" : "m/s²";
}

/** Label of the square of an acceleration in `u` (an area under a PSD): g², (m/s²)². Never `m/s²²`. */
export function squaredLabel(u: AccelUnit): string {
  return u === "g" ? "g²" : "(m/s²)²";
}

/** Label of the one-sided density of an acceleration in `u`. */
export function densityLabel(u: AccelUnit): string {
  return u === "g" ? "g²/Hz" : "(m/s²)²/Hz";
}

/** Plain-ASCII spelling used in JSON and CSV headers. */
export function densityAscii(u: AccelUnit): string {
  return u === "g" ? "g2/Hz" : "(m/s2)2/Hz";
}

/**
 * Recognise a unit written in a header or option: `g`, `m/s2`, `m/s^2`, `m/s²`, `m s-2`.
 * Returns undefined for anything else.
 */
export function parseAccelUnit(text: string): AccelUnit | undefined {
  const t = text.trim().toLowerCase().replace(/\s+/g, "");
  if (t === "g" || t === "gn" || t === "g0") return "g";
  if (t === "m/s2" || t === "m/s^2" || t === "m/s²" || t === "ms-2" || t === "m·s-2" || t === "m/s/s") return "m/s2";
  return undefined;
}
