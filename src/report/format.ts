/** Number formatting shared by the text, CSV and HTML reports. */
export function sig(x: number, digits = 4): string {
  if (!Number.isFinite(x)) return String(x);
  if (x === 0) return "0";
  const a = Math.abs(x);
  if (a >= 1e-3 && a < 1e6) return Number(x.toPrecision(digits)).toString();
  return x.toExponential(digits - 1);
}

export function fixed(x: number, decimals: number): string {
  return Number.isFinite(x) ? x.toFixed(decimals) : String(x);
}

/** "+1.23 dB" / "-0.40 dB": a level difference with its sign. */
export function signedDb(x: number, decimals = 2): string {
  return `${x >= 0 ? "+" : ""}${fixed(x, decimals)} dB`;
}

/** 10 log10(x), for factors shown in dB. */
export function dB(x: number): number {
  return 10 * Math.log10(x);
}

/** Terminal tables: a column whose cells all start like numbers is right-aligned, the rest left-aligned. */
export function table(rows: string[][], indent = "  "): string {
  const widths: number[] = [];
  const numeric: boolean[] = [];
  for (const r of rows) r.forEach((c, i) => (widths[i] = Math.max(widths[i] ?? 0, [...c].length)));
  rows[0]?.forEach(
    (_, i) => (numeric[i] = rows.slice(1).every((r) => /^[-+]?\d/.test(r[i] ?? "") || (r[i] ?? "") === "")),
  );
  const pad = (c: string, i: number) =>
    numeric[i] ? c.padStart(widths[i]! + c.length - [...c].length) : c.padEnd(widths[i]! + c.length - [...c].length);
  return rows.map((r) => indent + r.map(pad).join("  ").trimEnd()).join("\n");
}

/**
 * Largest and smallest value of several arrays, by a loop: `Math.max(...a)` passes every element as an
 * argument and overflows the call stack on long arrays (a fine resolution has ~10^5 lines).
 */
export function maxOf(...arrays: ArrayLike<number>[]): number {
  let m = -Infinity;
  for (const a of arrays) for (let i = 0; i < a.length; i++) if (a[i]! > m) m = a[i]!;
  return m;
}

export function minOf(...arrays: ArrayLike<number>[]): number {
  let m = Infinity;
  for (const a of arrays) for (let i = 0; i < a.length; i++) if (a[i]! < m) m = a[i]!;
  return m;
}

/**
 * A sample rate in Hz as text: short when it is round (at most 6 significant digits hold it exactly:
 * 5120, 204.8, 25600), in full otherwise (5120.000007, 3333.3333333333335), so a rate that is not the
 * round value a reader would assume is never shown as one.
 */
export function rateText(hz: number): string {
  const short = Number(hz.toPrecision(6));
  return short === hz ? String(short) : String(hz);
}

/**
 * The Parseval check's word: "agree" with the plain reference, "agree with each segment's slow part window-weighted
 * (ratio within ±tol %)" when only the second reference agrees (a sway below the first line), else "DISAGREE".
 */
export function parsevalWord(pv: {
  ok: boolean;
  ratio: number;
  tolerance: number;
  slowPart: { ratio: number; tolerance: number; ok: boolean };
}): string {
  if (!pv.ok) return "DISAGREE";
  if (Math.abs(pv.ratio - 1) <= pv.tolerance) return "agree";
  return `agree with each segment's slow part window-weighted (${fixed(pv.slowPart.ratio, 4)} within ±${sig(100 * pv.slowPart.tolerance, 2)} %)`;
}
