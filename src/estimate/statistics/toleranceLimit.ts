import { lnGamma, normalQuantile, regularizedGammaP } from "./chiSquare.js";

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

/** Standard normal CDF from the regularised incomplete gamma: erf(x) = P(1/2, x^2). */
export function normalCdf(x: number): number {
  const e = regularizedGammaP(0.5, (x * x) / 2);
  return x >= 0 ? 0.5 + 0.5 * e : 0.5 - 0.5 * e;
}

// 8-point Gauss-Legendre nodes and weights on [-1, 1] (Abramowitz & Stegun 1964, Table 25.4).
const GL_X = [0.1834346424956498, 0.525532409916329, 0.7966664774136267, 0.9602898564975363];
const GL_W = [0.362683783378362, 0.3137066458778873, 0.2223810344533745, 0.1012285362903763];

/**
 * CDF of the noncentral t with nu DOF and noncentrality delta: T = (Z + delta) / S with S = sqrt(chi2_nu / nu),
 * so P(T <= t) = integral_0^inf Phi(t s - delta) f_S(s) ds, f_S(s) = 2 (nu/2)^(nu/2) / Gamma(nu/2) s^(nu-1) exp(-nu s^2 / 2)
 * (the definition; e.g. Johnson, Kotz & Balakrishnan, Continuous Univariate Distributions vol. 2, 1995, ch. 31,
 * from memory). Gauss-Legendre on 400 pieces of the range that holds S (about 12 standard deviations each side of 1).
 */
export function noncentralTCdf(t: number, nu: number, delta: number): number {
  if (!(nu > 0)) throw new RangeError(`degrees of freedom above 0, got ${nu}`);
  const sd = 1 / Math.sqrt(2 * nu);
  const lo = Math.max(0, 1 - 14 * sd);
  const hi = Math.max(1 + 14 * sd, nu < 4 ? 8 : 0);
  const lnC = Math.log(2) + (nu / 2) * Math.log(nu / 2) - lnGamma(nu / 2);
  const pieces = 400;
  const h = (hi - lo) / pieces;
  let sum = 0;
  for (let p = 0; p < pieces; p++) {
    const mid = lo + (p + 0.5) * h;
    for (let k = 0; k < 4; k++) {
      for (const sign of [-1, 1]) {
        const s = mid + (sign * GL_X[k]! * h) / 2;
        if (s <= 0) continue;
        const dens = Math.exp(lnC + (nu - 1) * Math.log(s) - (nu * s * s) / 2);
        sum += GL_W[k]! * dens * normalCdf(t * s - delta);
      }
    }
  }
  return (sum * h) / 2;
}

/** Quantile of the noncentral t: the t with noncentralTCdf(t) = prob, by bisection to 1e-12 relative. */
export function noncentralTQuantile(prob: number, nu: number, delta: number): number {
  if (!(prob > 0 && prob < 1)) throw new RangeError(`a probability between 0 and 1, got ${prob}`);
  let lo = delta - 10;
  let hi = delta + 10;
  while (noncentralTCdf(lo, nu, delta) > prob) lo = lo - 2 * Math.abs(lo) - 10;
  while (noncentralTCdf(hi, nu, delta) < prob) hi = hi + 2 * Math.abs(hi) + 10;
  for (let i = 0; i < 200 && hi - lo > 1e-12 * Math.max(1, Math.abs(hi)); i++) {
    const mid = (lo + hi) / 2;
    if (noncentralTCdf(mid, nu, delta) < prob) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

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
export function logToleranceLimit(spectra: readonly Float64Array[], coverage: number, confidence: number): LogToleranceLimit | undefined {
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
