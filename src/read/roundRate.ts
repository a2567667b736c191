/**
 * The sample rate a time column states, from the span of its printed stamps.
 *
 * Each printed stamp is its true time rounded to the place of its last digit (its quantum q), so the
 * span from the first to the last stamp is uncertain by q and the rate (n - 1) / span by
 * rate x q / span (the margin). Loggers and DAQs run at round rates (common practice: 5120, 25600,
 * 204.8, 1024 Hz, or a round period such as 300 us), and a rate inside the margin of the estimate is
 * one the stamps cannot tell apart from it. So the rate taken is the roundest rate inside the margin:
 * the one with the fewest significant digits (at most 5, or a whole number of Hz); failing that, the
 * rate whose period has the fewest significant digits (at most 5). With none inside, the estimate
 * stands as it is, and the reports print it in full. Stamps too coarse to pin the rate to 0.1 %
 * (a margin above rate / 1000, a record of a few rows) get only a whole-Hz rate inside the margin.
 *
 * Example: 204 800 stamps in ms printed "%.3f" at 5120 Hz: q = 1 us over 40 s, a margin of 1.3e-4 Hz
 * around 5120.0000195; 5120 (3 digits) lies inside it, and the segment a 2.5 Hz resolution asks for is
 * 2048 points, the same as for a WAV of the same samples.
 */
export function roundRate(rateHz: number, marginHz: number): number {
  if (!(rateHz > 0) || !Number.isFinite(rateHz) || !(marginHz >= 0) || !Number.isFinite(marginHz)) return rateHz;
  if (marginHz > 1e-3 * rateHz) {
    const whole = Math.round(rateHz);
    return whole > 0 && Math.abs(whole - rateHz) <= marginHz ? whole : rateHz;
  }
  const period = 1 / rateHz;
  const periodMargin = marginHz / (rateHz * rateHz);
  const intDigits = Math.floor(Math.log10(rateHz)) + 1;
  const maxDigits = Math.max(5, intDigits);
  for (let d = 1; d <= maxDigits; d++) {
    const r = roundTo(rateHz, d);
    if (Math.abs(r - rateHz) <= marginHz) return r;
  }
  for (let d = 1; d <= 5; d++) {
    const p = roundTo(period, d);
    if (p > 0 && Math.abs(p - period) <= periodMargin) return 1 / p;
  }
  return rateHz;
}

/** x rounded to d significant digits, as the double its decimal text reads as. */
function roundTo(x: number, d: number): number {
  return Number(x.toPrecision(d));
}

/**
 * Rounding quantum of a printed stamp of magnitude `abs`, from the column's figures: the finest decimal
 * place of a last digit seen (`minPlace`: -6 for "%.6f") and the most significant digits seen (`maxSig`,
 * for "%.6g"-style stamps whose place grows with the stamp). The larger of 10^minPlace and
 * 10^(floor(log10 abs) - maxSig + 1).
 */
export function stampQuantum(minPlace: number, maxSig: number, abs: number): number {
  const fixed = Math.pow(10, minPlace);
  if (maxSig === 0 || !(abs > 0)) return fixed;
  return Math.max(fixed, Math.pow(10, Math.floor(Math.log10(abs)) - maxSig + 1));
}
