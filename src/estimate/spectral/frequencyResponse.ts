import { noncentralTQuantile, normalQuantile } from "../statistics/distributions.js";

/**
 * Frequency response between an input x and an output y from their auto and cross spectra
 * (Bendat & Piersol 2010, Random Data, 4th ed., ch. 6 and 9):
 *   H1 = G_xy / G_xx          unbiased by noise on the output
 *   H2 = G_yy / G_yx          unbiased by noise on the input (G_yx = conj G_xy)
 *   gamma^2 = |G_xy|^2 / (G_xx G_yy) = |H1| / |H2|
 * H1 and H2 share the phase of G_xy. The cross spectrum is conj(X) Y (scipy.signal.csd's convention,
 * docs/REFERENCES.md sec. 9), so an output that lags the input has a negative phase.
 *
 * Normalised random errors with n_d independent averages (Bendat & Piersol, Random Data, 2nd ed.,
 * p. 317, as docs/REFERENCES.md sec. 9 gives them):
 *   eps[|H|] = sqrt(1 - gamma^2) / (|gamma| sqrt(2 n_d))      and the phase's standard deviation in rad
 *   eps[gamma^2] = sqrt(2) (1 - gamma^2) / (|gamma| sqrt(n_d))
 * With overlapped segments n_d is taken as half the Welch equivalent degrees of freedom (welchDof), the
 * number of disjoint averages that gives the same variance of an auto spectrum.
 */
export interface FrequencyResponse {
  h1Magnitude: Float64Array;
  h2Magnitude: Float64Array;
  /** Phase of H1 and H2 (the same), degrees in (-180, 180]. */
  phaseDeg: Float64Array;
  coherence: Float64Array;
  /** eps[|H|] (normalised, one standard deviation). */
  magnitudeError: Float64Array;
  /** Standard deviation of the phase, degrees. */
  phaseErrorDeg: Float64Array;
  /** eps[gamma^2] (normalised, one standard deviation). */
  coherenceError: Float64Array;
  /** |H1|^2 G_xx = gamma^2 G_yy: the part of the output spectrum the input explains. */
  predictedOutputPsd: Float64Array;
}

export function frequencyResponse(
  gxx: Float64Array,
  gyy: Float64Array,
  gxyRe: Float64Array,
  gxyIm: Float64Array,
  disjointAverages: number,
): FrequencyResponse {
  const n = gxx.length;
  const r: FrequencyResponse = {
    h1Magnitude: new Float64Array(n),
    h2Magnitude: new Float64Array(n),
    phaseDeg: new Float64Array(n),
    coherence: new Float64Array(n),
    magnitudeError: new Float64Array(n),
    phaseErrorDeg: new Float64Array(n),
    coherenceError: new Float64Array(n),
    predictedOutputPsd: new Float64Array(n),
  };
  const nd = disjointAverages;
  for (let k = 0; k < n; k++) {
    const xx = gxx[k]!;
    const yy = gyy[k]!;
    const re = gxyRe[k]!;
    const im = gxyIm[k]!;
    const cross2 = re * re + im * im;
    const absCross = Math.sqrt(cross2);
    r.h1Magnitude[k] = absCross / xx;
    r.h2Magnitude[k] = yy / absCross;
    r.phaseDeg[k] = (Math.atan2(im, re) * 180) / Math.PI;
    // Clamp rounding above 1 (gamma^2 <= 1 by Schwarz's inequality).
    const g2 = Math.min(1, cross2 / (xx * yy));
    r.coherence[k] = g2;
    const g = Math.sqrt(g2);
    const eps = Math.sqrt(1 - g2) / (g * Math.sqrt(2 * nd));
    r.magnitudeError[k] = eps;
    r.phaseErrorDeg[k] = (eps * 180) / Math.PI;
    r.coherenceError[k] = (Math.SQRT2 * (1 - g2)) / (g * Math.sqrt(nd));
    r.predictedOutputPsd[k] = cross2 / xx;
  }
  return r;
}

/**
 * The factor on eps[|H|] that makes |H1| (1 -+ factor eps) a two-sided `confidence` interval with n_d averages. Given
 * the input, H1's error is complex normal, its variance estimated from the residual on 2 n_d - 2 real DOF (Goodman,
 * "Measurement of matrix frequency response functions and multiple coherence functions", AFFDL-TR-65-56, 1965; Bendat
 * & Piersol 2010, sec. 9.2.4; both from memory), so its radial part is Student t on 2 n_d - 2 DOF over
 * sqrt((1 - gamma^2) / (gamma^2 2 (n_d - 1))): factor = t_(2 n_d - 2) sqrt(n_d / (n_d - 1)). The normal quantile alone
 * (the large-n_d limit) covered 70 % at n_d = 2, 86 % at 4, 91 % at 8, 94 % at 32 for 95 % asked (Monte Carlo in
 * tests/estimate/spectral/frequencyResponse.test.ts). With n_d <= 1 (one segment) there is no residual: the normal
 * quantile is kept, and the coherence is 1 by construction (FEW_AVERAGES_COHERENCE says so).
 */
export function magnitudeBoundFactor(disjointAverages: number, confidence: number): number {
  const p = 0.5 + confidence / 2;
  const nd = disjointAverages;
  if (!(nd > 1)) return normalQuantile(p);
  return noncentralTQuantile(p, 2 * nd - 2, 0) * Math.sqrt(nd / (nd - 1));
}

export interface Resonance {
  /** Peak frequency, refined by a parabola through the three lines around the peak. */
  frequencyHz: number;
  /** Peak |H| (the parabola's top). */
  magnitude: number;
  /** Half-power Q = f_peak / (f_upper - f_lower), the lower and upper frequencies where |H| = peak / sqrt 2. */
  q: number;
  halfPowerHz: [number, number];
  coherence: number;
  /**
   * True when the half-power band spans fewer than 10 lines: the window's spread then widens the peak
   * and Q reads low (measured with Hann: about 10 % low at 5 lines, 2.5 % at 12;
   * tests/analyses/analyzeTransfer.test.ts).
   */
  resolutionLimited: boolean;
}

export interface ResonanceOptions {
  /** Lowest coherence at the peak line for the peak to count (default 0.5). */
  minCoherence?: number;
  /** Smallest peak |H| (default 1: the output amplifies the input). */
  minMagnitude?: number;
  /** Most resonances returned, the highest peaks, listed by frequency (default 8). */
  count?: number;
}

/**
 * Resonances of a measured |H|: local maxima with a half-power point on each side before any higher
 * line, so each is a separated peak. The half-power (-3 dB) bandwidth gives Q = f_n / (f_2 - f_1)
 * (common practice; exact for a lightly damped SDOF as zeta -> 0, 1/(2 zeta) = Q). The crossings are
 * interpolated linearly between lines.
 */
export function findResonances(
  frequencyHz: Float64Array,
  magnitude: Float64Array,
  coherence: Float64Array,
  o: ResonanceOptions = {},
): Resonance[] {
  const minCoh = o.minCoherence ?? 0.5;
  const minMag = o.minMagnitude ?? 1;
  const count = o.count ?? 8;
  const m = magnitude;
  const n = m.length;
  const found: Resonance[] = [];
  for (let k = 1; k < n - 1; k++) {
    const p = m[k]!;
    if (!(p > m[k - 1]! && p >= m[k + 1]!) || !(p >= minMag) || !(coherence[k]! >= minCoh)) continue;
    const level = p / Math.SQRT2;
    let lo = k - 1;
    while (lo >= 0 && m[lo]! > level && m[lo]! <= p) lo--;
    if (lo < 0 || !(m[lo]! <= level)) continue;
    let hi = k + 1;
    while (hi < n && m[hi]! > level && m[hi]! <= p) hi++;
    if (hi >= n || !(m[hi]! <= level)) continue;
    const cross = (a: number, b: number) =>
      frequencyHz[a]! + ((level - m[a]!) / (m[b]! - m[a]!)) * (frequencyHz[b]! - frequencyHz[a]!);
    const f1 = cross(lo, lo + 1);
    const f2 = cross(hi - 1, hi);
    // Parabola through (k-1, k, k+1): offset d = (a - c) / (2 (a - 2b + c)) lines, top b - (a - c) d / 4.
    const a = m[k - 1]!;
    const c = m[k + 1]!;
    const den = a - 2 * p + c;
    const d = den < 0 ? (0.5 * (a - c)) / den : 0;
    const df = frequencyHz[1]! - frequencyHz[0]!;
    const fPeak = frequencyHz[k]! + d * df;
    found.push({
      frequencyHz: fPeak,
      magnitude: p - 0.25 * (a - c) * d,
      q: fPeak / (f2 - f1),
      halfPowerHz: [f1, f2],
      coherence: coherence[k]!,
      resolutionLimited: f2 - f1 < 10 * df,
    });
  }
  found.sort((x, y) => y.magnitude - x.magnitude);
  return found.slice(0, count).sort((x, y) => x.frequencyHz - y.frequencyHz);
}
