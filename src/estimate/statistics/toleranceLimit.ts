import { noncentralTQuantile, normalQuantile } from "./distributions.js";

/**
 * One-sided normal tolerance limits: the value that at least a fraction p (the coverage) of a normal
 * population lies below, with confidence gamma, from n samples: xbar + k s, with
 *   k = t'_{gamma}(n - 1, delta = z_p sqrt(n)) / sqrt(n),
 * t' the quantile of the noncentral t distribution (Natrella, Experimental Statistics, NBS Handbook 91,
 * 1963, ch. 2; NIST/SEMATECH e-Handbook of Statistical Methods, sec. 7.2.6.3; both from memory).
 * Checked against scipy.stats.nct.ppf in tests/estimate/statistics/toleranceLimit.test.ts.
 */

/** Fewest samples a tolerance limit is computed from (with 2, s has 1 DOF and k is huge; psdgate's rule). */
export const MIN_TOLERANCE_SAMPLES = 3;

/** The one-sided tolerance factor k for n samples, coverage p and confidence gamma (see the file's comment). */
export function oneSidedToleranceFactor(n: number, coverage: number, confidence: number): number {
  if (!(Number.isInteger(n) && n >= 2)) throw new RangeError(`at least 2 samples, got ${n}`);
  if (!(coverage > 0.5 && coverage < 1)) throw new RangeError(`a coverage between 0.5 and 1, got ${coverage}`);
  if (!(confidence > 0 && confidence < 1)) throw new RangeError(`a confidence between 0 and 1, got ${confidence}`);
  const delta = normalQuantile(coverage) * Math.sqrt(n);
  return noncentralTQuantile(confidence, n - 1, delta) / Math.sqrt(n);
}

export interface LogToleranceLimit {
  /** Number of spectra the limit is taken over. */
  n: number;
  coverage: number;
  confidence: number;
  /** The tolerance factor k. */
  k: number;
  /** 10^(mean + k s) of log10 of the values per line; NaN where a value is not above 0. */
  limit: Float64Array;
  /** Mean and standard deviation of log10 of the values per line. */
  meanLog10: Float64Array;
  sdLog10: Float64Array;
}

/**
 * The one-sided upper normal tolerance limit per line of log10 of several spectra (the log-normal model of
 * field spectra, as NASA-HDBK-7005 uses for its P95/50 limit; from memory). `spectra` are equally long rows.
 * Undefined for fewer than MIN_TOLERANCE_SAMPLES rows: the limit cannot be computed, not guessed.
 */
export function logToleranceLimit(
  spectra: readonly Float64Array[],
  coverage: number,
  confidence: number,
): LogToleranceLimit | undefined {
  const n = spectra.length;
  if (n < MIN_TOLERANCE_SAMPLES) return undefined;
  const k = oneSidedToleranceFactor(n, coverage, confidence);
  const m = spectra[0]!.length;
  const limit = new Float64Array(m);
  const meanLog10 = new Float64Array(m);
  const sdLog10 = new Float64Array(m);
  for (let j = 0; j < m; j++) {
    let s = 0;
    let ok = true;
    for (let i = 0; i < n; i++) {
      const v = spectra[i]![j]!;
      if (!(v > 0)) ok = false;
      s += Math.log10(v);
    }
    if (!ok) {
      limit[j] = meanLog10[j] = sdLog10[j] = NaN;
      continue;
    }
    const mean = s / n;
    let ss = 0;
    for (let i = 0; i < n; i++) ss += (Math.log10(spectra[i]![j]!) - mean) ** 2;
    const sd = Math.sqrt(ss / (n - 1));
    meanLog10[j] = mean;
    sdLog10[j] = sd;
    limit[j] = 10 ** (mean + k * sd);
  }
  return { n, coverage, confidence, k, limit, meanLog10, sdLog10 };
}
