/**
 * Units, said once. Samples carry their unit from the reader onward; PSD results carry the squared
 * unit per Hz. Results are in one of two base units, g or m/s^2; every other acceleration unit a file
 * or option names (mg, µg, mm/s², cm/s², in/s², ft/s²) is converted into its base unit on reading.
 *
 * Exact factors:
 * - standard acceleration of gravity g_n = 9.80665 m/s^2 exactly (BIPM, The International System of
 *   Units (SI Brochure), 9th ed. 2019, Appendix 1: the declaration of the 3rd CGPM, 1901; the
 *   appendix from memory);
 * - 1 in = 0.0254 m and 1 ft = 0.3048 m exactly (NIST Special Publication 811, 2008 ed., Appendix B,
 *   "inch" and "foot"; the table from memory).
 */
export const STANDARD_GRAVITY_M_PER_S2 = 9.80665;
/** NIST SP 811 (2008), B.8: inch = 2.54 E-02 m, foot = 3.048 E-01 m, both exact. */
export const INCH_M = 0.0254;
export const FOOT_M = 0.3048;

export type AccelUnit = "g" | "m/s2";
export const ACCEL_UNITS: readonly AccelUnit[] = ["g", "m/s2"];

/** An acceleration unit as read: its base unit and the exact factor from it to the base. */
export interface UnitSpec {
  /** Canonical ASCII name: g, mg, ug, m/s2, mm/s2, cm/s2, in/s2, ft/s2. */
  name: string;
  base: AccelUnit;
  /** Multiply a value in this unit by `factor` to get it in `base`. */
  factor: number;
}

const UNIT_SPECS: Record<string, UnitSpec> = {
  g: { name: "g", base: "g", factor: 1 },
  mg: { name: "mg", base: "g", factor: 1e-3 },
  ug: { name: "ug", base: "g", factor: 1e-6 },
  "m/s2": { name: "m/s2", base: "m/s2", factor: 1 },
  "mm/s2": { name: "mm/s2", base: "m/s2", factor: 1e-3 },
  "cm/s2": { name: "cm/s2", base: "m/s2", factor: 1e-2 },
  "in/s2": { name: "in/s2", base: "m/s2", factor: INCH_M },
  "ft/s2": { name: "ft/s2", base: "m/s2", factor: FOOT_M },
};
/** Every name parseUnitSpec knows, for messages. */
export const UNIT_NAMES: readonly string[] = Object.keys(UNIT_SPECS);

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
 * Recognise an acceleration unit written in a header or option. Accepted spellings of "per second
 * squared" after a length unit L (m, mm, cm, in, ft): `L/s2`, `L/s^2`, `L/s**2`, `L/s²`, `L/s/s`,
 * `L s-2`, `L s^-2`, `L·s-2`, `L*s^-2`, `Ls-2`, `Ls^-2`, with `sec` for `s`; gravity units g (also
 * gn, g0), mg, µg (also ug, μg). Case matters only where it must (`G` is read as g; `MG` is not mg).
 * Returns undefined for anything else.
 */
export function parseUnitSpec(text: string): UnitSpec | undefined {
  let t = text
    .trim()
    .replace(/\s+/g, " ")
    .replace(/ ?([/^*·.-]) ?/g, "$1");
  if (t === "G" || t === "g" || t === "gn" || t === "g0" || t === "gₙ") return UNIT_SPECS.g;
  if (t === "mg" || t === "mG") return UNIT_SPECS.mg;
  if (t === "µg" || t === "μg" || t === "ug" || t === "µG" || t === "μG" || t === "uG") return UNIT_SPECS.ug;
  t = t
    .toLowerCase()
    .replace(/²/g, "2")
    .replace(/\*\*/g, "^")
    .replace(/sec(?![a-z])/g, "s")
    .replace(/\^/g, "");
  const m = /^(m|mm|cm|in|ft)(?:\/s2|\/s\/s| ?[·*.]? ?s-2)$/.exec(t);
  return m ? UNIT_SPECS[`${m[1]}/s2`] : undefined;
}

/** The base unit of a spelling (g or m/s2), or undefined. */
export function parseAccelUnit(text: string): AccelUnit | undefined {
  return parseUnitSpec(text)?.base;
}

/**
 * A voltage unit (V or mV) written in a header: volts per unit of the file, or undefined. A channel
 * in volts needs a sensitivity (`--sensitivity`) to become an acceleration.
 */
export function parseVoltUnit(text: string): number | undefined {
  const t = text.trim();
  if (t === "V" || t === "v" || t === "volt" || t === "volts") return 1;
  if (t === "mV" || t === "mv") return 1e-3;
  if (t === "µV" || t === "μV" || t === "uV") return 1e-6;
  return undefined;
}

/**
 * A sensitivity such as `100mV/g`, `10.2 mV/(m/s2)`, `1.02 V/g`, `0.1 V/(m/s^2)`: volts per base
 * unit, and that base unit. Returns undefined when the text is not one.
 */
export function parseSensitivity(text: string): { voltsPerUnit: number; unit: UnitSpec; text: string } | undefined {
  const m = /^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(µV|μV|uV|mV|V)\s*\/\s*(?:\((.+)\)|(.+?))\s*$/.exec(
    text,
  );
  if (!m) return undefined;
  const v = Number(m[1]);
  const unit = parseUnitSpec(m[3] ?? m[4]!);
  if (unit === undefined || !(v > 0) || !Number.isFinite(v)) return undefined;
  const perVolt = m[2] === "V" ? 1 : m[2] === "mV" ? 1e3 : 1e6;
  return { voltsPerUnit: v / perVolt, unit, text: text.trim() };
}
