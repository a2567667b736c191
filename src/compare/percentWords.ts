/** How the judgement's findings word shares and signed dB (complianceCheck.ts and its parts). */

/** A share as "3 %" (three significant digits). */
export function pct(x: number): string {
  return `${Number(percent(x).toPrecision(3))} %`;
}

/** A share in percent, as a finding's values keep it. */
export function percent(x: number): number {
  return 100 * x;
}

/** A share, or "below 0.01 %" for a very small one. */
export function pctSmall(x: number): string {
  return x < 1e-4 ? "below 0.01 %" : pct(x);
}

/** dB with its sign and two decimals. */
export function signed(x: number): string {
  return `${x >= 0 ? "+" : ""}${x.toFixed(2)}`;
}
