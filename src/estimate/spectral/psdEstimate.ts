import { chiSquareIntervalFactors } from "../statistics/distributions.js";
import { SegmentPower } from "./segmentPower.js";
import { welchDof } from "./welchDof.js";
import { normalizeWelchOptions, type ResolvedWelchOptions, type WelchOptions } from "./welchOptions.js";
import { WelchAccumulator, type WelchSums } from "./welchPsd.js";
import { spectralWindow } from "./windows.js";

/** A one-sided PSD with its chi-square confidence bounds, in the squared input unit per Hz. */
export interface PsdEstimate {
  frequencyHz: Float64Array;
  psd: Float64Array;
  lower: Float64Array;
  upper: Float64Array;
  /** Segments averaged. */
  averages: number;
  skippedSegments: number;
  /** Equivalent degrees of freedom of lines 0 < f < fs/2 (half that at DC and Nyquist). */
  dof: number;
  /** Random error sqrt(2 / dof) of one line (Bendat & Piersol 2010, ch. 8). */
  randomError: number;
  /** sqrt(sum P df). */
  rmsPsd: number;
  windowedMeanSquare: number;
  /** Plain mean square of the detrended segments, and the record's own standard error of the gap to
   * windowedMeanSquare (batch means; see WelchSums). */
  segmentMeanSquare: number;
  /** What windowedMeanSquare - segmentMeanSquare is expected to be from the segments' own shape (WelchSums). */
  expectedGap: number;
  meanSquareGapError: number;
  meanSquareGapBatches: number;
  slowGapError: number;
  /** Kurtosis and crest factor of the detrended segments (WelchSums). */
  detrendedKurtosis: number;
  detrendedCrestFactor: number;
  lineSpacingHz: number;
}

export function frequencyAxis(segmentLength: number, sampleRateHz: number): Float64Array {
  const f = new Float64Array(segmentLength / 2 + 1);
  for (let k = 0; k < f.length; k++) f[k] = (k * sampleRateHz) / segmentLength;
  return f;
}

/** Turn the Welch sums into the estimate: frequencies, DOF from the window and hop, bounds. */
export function completePsd(
  sums: WelchSums,
  window: Float64Array,
  s: ResolvedWelchOptions,
  sampleRateHz: number,
): PsdEstimate {
  const n = s.segmentLength;
  const psd = sums.psd;
  const dof = welchDof(window, s.hop, sums.segments);
  const lower = new Float64Array(psd.length);
  const upper = new Float64Array(psd.length);
  if (sums.segments > 0) {
    const mid = chiSquareIntervalFactors(dof, s.confidence);
    const edge = chiSquareIntervalFactors(dof / 2, s.confidence);
    for (let k = 0; k < psd.length; k++) {
      const f = k === 0 || k === n / 2 ? edge : mid;
      lower[k] = psd[k]! * f.lower;
      upper[k] = psd[k]! * f.upper;
    }
  } else {
    lower.fill(NaN);
    upper.fill(NaN);
    psd.fill(NaN);
  }
  const df = sampleRateHz / n;
  let area = 0;
  for (let k = 0; k < psd.length; k++) area += psd[k]!;
  return {
    frequencyHz: frequencyAxis(n, sampleRateHz),
    psd,
    lower,
    upper,
    averages: sums.segments,
    skippedSegments: sums.skippedSegments,
    dof,
    randomError: dof > 0 ? Math.sqrt(2 / dof) : NaN,
    rmsPsd: Math.sqrt(area * df),
    windowedMeanSquare: sums.windowedMeanSquare,
    segmentMeanSquare: sums.segmentMeanSquare,
    expectedGap: sums.expectedGap,
    meanSquareGapError: sums.meanSquareGapError,
    meanSquareGapBatches: sums.meanSquareGapBatches,
    slowGapError: sums.slowGapError,
    detrendedKurtosis: sums.detrendedKurtosis,
    detrendedCrestFactor: sums.detrendedCrestFactor,
    lineSpacingHz: df,
  };
}

/** Welch PSD of one whole signal held in memory. For files, use analyzeRecording (streaming). */
export function welchPsd(
  x: Float64Array,
  sampleRateHz: number,
  options: WelchOptions = {},
): PsdEstimate & { settings: ResolvedWelchOptions } {
  const s = normalizeWelchOptions(options, sampleRateHz);
  const w = spectralWindow(s.window, s.segmentLength);
  const acc = new WelchAccumulator(
    { segmentLength: s.segmentLength, hop: s.hop, window: w, detrend: s.detrend },
    new SegmentPower(s.segmentLength),
  );
  acc.push(x);
  return { ...completePsd(acc.finish(sampleRateHz), w, s, sampleRateHz), settings: s };
}

/**
 * Mean square in the band [fmin, fmax]: each line stands for the cell f_k +- df/2 (DC and Nyquist for
 * the half cell inside 0..fs/2, at twice their stored density, since their single-sided value is not
 * doubled), and only the part of each cell inside the band counts. So a band that ends mid-cell, or a
 * one-line band, gets its true width, not a whole line at each end.
 */
export function bandMeanSquare(
  p: Pick<PsdEstimate, "psd" | "frequencyHz" | "lineSpacingHz">,
  fminHz: number,
  fmaxHz: number,
): number {
  const df = p.lineSpacingHz;
  const last = p.psd.length - 1;
  const top = last * df;
  let s = 0;
  const k0 = Math.max(0, Math.floor(fminHz / df - 0.5));
  const k1 = Math.min(last, Math.ceil(fmaxHz / df + 0.5));
  for (let k = k0; k <= k1; k++) {
    const lo = Math.max(0, (k - 0.5) * df, fminHz);
    const hi = Math.min(top, (k + 0.5) * df, fmaxHz);
    if (hi <= lo) continue;
    const density = k === 0 || k === last ? 2 * p.psd[k]! : p.psd[k]!;
    s += density * (hi - lo);
  }
  return s;
}

/** sqrt(bandMeanSquare): the RMS in [fmin, fmax]. */
export function bandRms(
  p: Pick<PsdEstimate, "psd" | "frequencyHz" | "lineSpacingHz">,
  fminHz: number,
  fmaxHz: number,
): number {
  return Math.sqrt(bandMeanSquare(p, fminHz, fmaxHz));
}

export interface SpectralPeak {
  frequencyHz: number;
  level: number;
}

/** The strongest local maxima of the PSD (DC excluded), highest first. */
export function strongestPeaks(p: PsdEstimate, count: number): SpectralPeak[] {
  const peaks: SpectralPeak[] = [];
  const x = p.psd;
  for (let k = 1; k < x.length; k++) {
    const left = x[k - 1]!;
    const right = k + 1 < x.length ? x[k + 1]! : -Infinity;
    if (x[k]! > left && x[k]! >= right) peaks.push({ frequencyHz: p.frequencyHz[k]!, level: x[k]! });
  }
  peaks.sort((a, b) => b.level - a.level);
  return peaks.slice(0, count);
}
