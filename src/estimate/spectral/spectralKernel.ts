import type { Detrend } from "./welchPsd.js";

/**
 * What a Welch line can show: the window's spectral kernel and the figures that follow from it.
 *
 * The expected value of a direct spectral estimate is the true spectrum seen through the window's
 * spectral kernel, E[P(f)] = integral of G(f') H(f - f') df', with H = |W|^2 / (fs sum w^2) and W the
 * window's discrete-time Fourier transform (Percival & Walden, Spectral Analysis for Physical
 * Applications, Cambridge UP 1993, sec. 6.3). Here the kernel is sampled in fractions of a bin, once per
 * window and segment length, so the decision rule can (a) hold each line to the profile seen through
 * the same kernel, (b) leave out the lines whose kernel reaches past the profile's ends, (c) leave out
 * the lowest lines that per-segment detrending biases, and (d) know how strongly neighbouring lines are
 * correlated.
 */
export interface SpectralKernel {
  /** Sub-bin samples per bin. */
  oversample: number;
  /** Half-width in bins: the kernel outside +-halfWidthBins holds less than `tailShare` on each side. */
  halfWidthBins: number;
  /** The energy share left beyond the half-width on one side. */
  tailShare: number;
  /**
   * Kernel weights at offsets j / oversample bins, j = -halfWidth*oversample .. +halfWidth*oversample, summing to 1.
   */
  weights: Float64Array;
  /**
   * The same kernel sampled out to WIDE_HALF_WIDTH bins (or n/4), normalised over that width: what a line
   * shows where the profile changes by tens of dB within a few bins (the bottom of a deep notch), where the
   * 1 % tails the core kernel leaves out matter.
   */
  wideWeights: Float64Array;
  wideHalfWidthBins: number;
  /**
   * Correlation of the periodogram values of two lines d bins apart for a spectrum smooth across them:
   * rho[d] = |sum w^2 e^(-2 pi i d n / N)|^2 / (sum w^2)^2 (Percival & Walden 1993, sec. 6.6; for Hann
   * rho[1] = 4/9 and rho[2] = 1/36). rho[0] = 1.
   */
  lineCorrelation: Float64Array;
  /** Relative bias of line k from per-segment detrending, for white noise: -(energy of the window's
   * tone projected on the detrend basis) / sum w^2. bias[0] belongs to DC. */
  detrendBias: Float64Array;
}

/** The lowest lines whose detrend bias exceeds this are not judged (1 %, 0.04 dB; chosen here). */
export const DETREND_BIAS_LIMIT = 0.01;
/** Energy share allowed beyond the kernel's half-width on each side (1 %, so a drive that stops at a
 * profile's end biases the nearest judged line by less than 0.05 dB; chosen here). */
export const KERNEL_TAIL_SHARE = 0.01;
const OVERSAMPLE = 8;
const MAX_HALF_WIDTH = 32;
/**
 * Half-width of the wide kernel, bins: Hann's side lobes fall 18 dB/octave, so past 32 bins less than 1e-9 of it lies
 * each side (chosen here).
 */
export const WIDE_HALF_WIDTH = 32;

const cache = new Map<string, SpectralKernel>();

/** |sum_n v[n] e^(-2 pi i delta n / N)|^2 for a real sequence v at an offset of delta bins (the phase
 * advanced by rotation, not a cosine per sample). */
function dtftPower(v: Float64Array, delta: number): number {
  const n = v.length;
  const step = (-2 * Math.PI * delta) / n;
  const c = Math.cos(step);
  const s = Math.sin(step);
  let cr = 1;
  let ci = 0;
  let re = 0;
  let im = 0;
  for (let i = 0; i < n; i++) {
    re += v[i]! * cr;
    im += v[i]! * ci;
    const t = cr * c - ci * s;
    ci = cr * s + ci * c;
    cr = t;
  }
  return re * re + im * im;
}

/**
 * The kernel's density at an offset of `deltaBins` from a line, in bins: h(delta) = |W(delta)|^2 / (N sum w^2),
 * which sums to 1 over the lines k - delta of a periodic window (Parseval). A tone of power A^2/2 at an
 * offset delta from line k puts E[P_k] df = (A^2/2) h(delta) on that line (Percival & Walden 1993, sec. 6.3).
 */
export function kernelDensityAt(window: Float64Array, deltaBins: number): number {
  let sumW2 = 0;
  for (let i = 0; i < window.length; i++) sumW2 += window[i]! * window[i]!;
  return dtftPower(window, deltaBins) / (window.length * sumW2);
}

/**
 * The kernel of a window (by name, for the cache) and segment length under a detrend mode. Costs one
 * DTFT per sub-bin sample; cached, so a batch of recordings pays once.
 */
export function spectralKernel(windowName: string, window: Float64Array, detrend: Detrend): SpectralKernel {
  const n = window.length;
  const key = `${windowName}:${n}:${detrend}`;
  const hit = cache.get(key);
  if (hit) return hit;
  let sumW2 = 0;
  const w2 = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    w2[i] = window[i]! * window[i]!;
    sumW2 += w2[i]!;
  }
  // Kernel in bins: h(delta) = |W(delta)|^2 / (N sum w^2), integrating to 1 over delta, and even in
  // delta (W of a real sequence is conjugate-symmetric). Sampled outward from 0 until the one-sided tail,
  // 1/2 - integral over [0, B] (trapezoid rule on the sub-bin grid), falls below KERNEL_TAIL_SHARE.
  const maxHalf = Math.min(MAX_HALF_WIDTH, Math.max(1, n / 4));
  const side: number[] = [dtftPower(window, 0) / (n * sumW2)];
  let half = maxHalf;
  let tail = 0.5;
  let acc = 0;
  for (let j = 1; j <= maxHalf * OVERSAMPLE; j++) {
    side.push(dtftPower(window, j / OVERSAMPLE) / (n * sumW2));
    acc += (side[j - 1]! + side[j]!) / (2 * OVERSAMPLE);
    if (j % OVERSAMPLE === 0) {
      tail = Math.max(0, 0.5 - acc);
      if (tail < KERNEL_TAIL_SHARE) {
        half = j / OVERSAMPLE;
        break;
      }
    }
  }
  const wideHalf = Math.min(WIDE_HALF_WIDTH, Math.max(1, Math.floor(n / 4)));
  for (let j = side.length; j <= wideHalf * OVERSAMPLE; j++) side.push(dtftPower(window, j / OVERSAMPLE) / (n * sumW2));
  const sampled = (h: number) => {
    const m = h * OVERSAMPLE;
    const out = new Float64Array(2 * m + 1);
    let sum = 0;
    for (let j = -m; j <= m; j++) {
      const edge = j === -m || j === m ? 0.5 : 1;
      out[j + m] = side[Math.abs(j)]! * edge;
      sum += out[j + m]!;
    }
    for (let j = 0; j < out.length; j++) out[j] = out[j]! / sum;
    return out;
  };
  const wideWeights = sampled(Math.max(wideHalf, half));
  const mh = half * OVERSAMPLE;
  const weights = new Float64Array(2 * mh + 1);
  let total = 0;
  for (let j = -mh; j <= mh; j++) {
    const edge = j === -mh || j === mh ? 0.5 : 1;
    weights[j + mh] = side[Math.abs(j)]! * edge;
    total += weights[j + mh]!;
  }
  for (let j = 0; j < weights.length; j++) weights[j] = weights[j]! / total;

  const lineCorrelation = new Float64Array(Math.min(8, n / 2) + 1);
  for (let d = 0; d < lineCorrelation.length; d++) lineCorrelation[d] = dtftPower(w2, d) / (sumW2 * sumW2);

  const detrendBias = new Float64Array(Math.min(64, n / 2) + 1);
  if (detrend !== "none") {
    // Orthonormal detrend basis: the constant, and for "linear" the centred index.
    const mid = (n - 1) / 2;
    const c0 = 1 / Math.sqrt(n);
    const c1 = 1 / Math.sqrt((n * (n * n - 1)) / 12);
    const a = new Float64Array(n);
    const b = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      a[i] = window[i]! * c0;
      b[i] = window[i]! * (i - mid) * c1;
    }
    for (let k = 0; k < detrendBias.length; k++) {
      let p = dtftPower(a, k);
      if (detrend === "linear") p += dtftPower(b, k);
      detrendBias[k] = -p / sumW2;
    }
  }
  const kernel: SpectralKernel = {
    oversample: OVERSAMPLE,
    halfWidthBins: half,
    tailShare: tail,
    weights,
    wideWeights,
    wideHalfWidthBins: Math.max(wideHalf, half),
    lineCorrelation,
    detrendBias,
  };
  cache.set(key, kernel);
  return kernel;
}

/**
 * Variance inflation of a sum of neighbouring lines over independent ones: 1 + 2 sum_{d>=1} rho[d]
 * (about 1.94 for Hann). Used to turn a count of lines into a count of independent looks.
 */
export function lineVarianceInflation(k: SpectralKernel): number {
  let s = 1;
  for (let d = 1; d < k.lineCorrelation.length; d++) s += 2 * k.lineCorrelation[d]!;
  return s;
}

/** Lines 0 .. n-1 whose detrend bias exceeds DETREND_BIAS_LIMIT: the count from DC up. */
export function detrendBiasedLines(k: SpectralKernel): number {
  let last = -1;
  for (let i = 0; i < k.detrendBias.length; i++) if (Math.abs(k.detrendBias[i]!) > DETREND_BIAS_LIMIT) last = i;
  return last + 1;
}

/**
 * The share of the kernel on a band `widthLines` bins wide centred on the line: how much of a departure
 * that wide (the rest of the spectrum unchanged) the centre line shows. Hann: about 0.50 for one line and
 * 0.97 for three (tests/estimate/spectral/spectralKernel.test.ts).
 */
export function departureShare(k: SpectralKernel, widthLines: number): number {
  const w = k.wideWeights;
  const mh = (w.length - 1) / 2;
  const halfSamples = (widthLines / 2) * k.oversample;
  let s = 0;
  for (let j = 0; j < w.length; j++) {
    const d = Math.abs(j - mh);
    if (d < halfSamples - 1e-9) s += w[j]!;
    else if (Math.abs(d - halfSamples) <= 1e-9) s += w[j]! / 2;
  }
  return Math.min(1, s);
}
