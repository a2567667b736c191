import {
  detrendBiasedLines,
  lineVarianceInflation,
  spectralKernel,
  type SpectralKernel,
} from "../estimate/spectral/spectralKernel.js";
import { spectralWindow } from "../estimate/spectral/windows.js";
import type { SpectrumUnderTest } from "./complianceTypes.js";
import { largestEffectiveDof, largestOfMoments } from "./decisionRule.js";
import { profileLevel, type TestProfile, type ToleranceBand } from "./testProfile.js";

/**
 * The grid of a judgement: which lines of a measured spectrum are judged against a profile, and what each
 * should show (the profile, its band limits and outer limits seen through the analysis window's kernel).
 */
/**
 * The band of a line; at a shared edge (e.g. exactly 1000 Hz) each side takes the tighter limit of the bands that meet
 * there (common practice: read a shared edge strictly), so +1/-3 meeting +3/-1 gives +1/-1.
 */
export function bandAt(bands: ToleranceBand[], f: number): ToleranceBand | undefined {
  let best: ToleranceBand | undefined;
  for (const b of bands) {
    if (!(f >= b.fromHz && f <= b.toHz)) continue;
    if (best === undefined) best = b;
    else if (b.upperDb < best.upperDb || b.lowerDb < best.lowerDb)
      best = {
        fromHz: f,
        toHz: f,
        upperDb: Math.min(b.upperDb, best.upperDb),
        lowerDb: Math.min(b.lowerDb, best.lowerDb),
      };
  }
  return best;
}

interface KernelView {
  /** Offsets of the kernel's sub-bin samples, in Hz. */
  offsetsHz: Float64Array;
  weights: Float64Array;
}

function kernelView(weights: Float64Array, oversample: number, df: number): KernelView {
  const mh = (weights.length - 1) / 2;
  const offsetsHz = new Float64Array(weights.length);
  for (let j = 0; j < offsetsHz.length; j++) offsetsHz[j] = ((j - mh) / oversample) * df;
  return { offsetsHz, weights };
}

/**
 * The profile, band limits and outer limits at f seen through the kernel: sum of weight x value at
 * f - offset, with offsets past 0 or fs/2 folded back (the one-sided spectrum of a sampled record).
 * Undefined when any sample falls outside the profile's range: the record's content there is not
 * specified, so the line cannot be held to it (an edge line). With `partial`, such samples are left out
 * and the rest renormalised instead (a probe of how much the far kernel matters near the ends).
 */
function smoothed(p: TestProfile, kv: KernelView, f: number, nyquist: number, f0: number, fN: number, partial = false) {
  let req = 0;
  let up = 0;
  let lo = 0;
  let oUp = 0;
  let oLo = 0;
  let total = 0;
  const tol = 1e-9 * (fN - f0);
  for (let j = 0; j < kv.weights.length; j++) {
    let g = f - kv.offsetsHz[j]!;
    if (g < 0) g = -g;
    if (g > nyquist) g = 2 * nyquist - g;
    if (g < f0 - tol || g > fN + tol) {
      if (partial) continue;
      return undefined;
    }
    g = Math.min(fN, Math.max(f0, g));
    const w = kv.weights[j]!;
    total += w;
    const level = profileLevel(p, g);
    const b = bandAt(p.bands, g)!;
    req += w * level;
    up += w * level * Math.pow(10, b.upperDb / 10);
    lo += w * level * Math.pow(10, -b.lowerDb / 10);
    if (p.outerBands) {
      const o = bandAt(p.outerBands, g)!;
      oUp += w * level * Math.pow(10, o.upperDb / 10);
      oLo += w * level * Math.pow(10, -o.lowerDb / 10);
    }
  }
  if (!(total > 0)) return undefined;
  return { req: req / total, up: up / total, lo: lo / total, oUp: oUp / total, oLo: oLo / total };
}

interface FineGrid {
  /** Sub-bins per line, and the index of the Nyquist frequency on the sub-bin grid. */
  oversample: number;
  nyquistIndex: number;
  /** Profile, band limits and outer limits at m x df / oversample; NaN outside the profile's range. */
  req: Float64Array;
  up: Float64Array;
  lo: Float64Array;
  oUp: Float64Array;
  oLo: Float64Array;
}

/** The values `smoothed` reads, sampled once on the sub-bin grid; undefined where the lines do not sit on that grid. */
function fineGrid(
  p: TestProfile,
  kernel: SpectralKernel,
  sp: SpectrumUnderTest,
  nyquist: number,
  f0: number,
  fN: number,
): FineGrid | undefined {
  const os = kernel.oversample;
  const df = sp.lineSpacingHz;
  const m = Math.round((nyquist * os) / df);
  if (
    !Number.isInteger(os) ||
    Math.abs((nyquist * os) / df - m) > 1e-6 ||
    ![kernel.weights, kernel.wideWeights].every((w) => w.length % 2 === 1)
  )
    return undefined;
  for (let i = 0; i < sp.frequencyHz.length; i++)
    if (Math.abs(sp.frequencyHz[i]! - i * df) > 1e-9 * df * (i + 1)) return undefined;
  const n = m + 1;
  const grid: FineGrid = {
    oversample: os,
    nyquistIndex: m,
    req: new Float64Array(n),
    up: new Float64Array(n),
    lo: new Float64Array(n),
    oUp: new Float64Array(n),
    oLo: new Float64Array(n),
  };
  const tol = 1e-9 * (fN - f0);
  for (let k = 0; k < n; k++) {
    let g = (k / os) * df;
    if (g < f0 - tol || g > fN + tol) {
      grid.req[k] = grid.up[k] = grid.lo[k] = grid.oUp[k] = grid.oLo[k] = NaN;
      continue;
    }
    g = Math.min(fN, Math.max(f0, g));
    const level = profileLevel(p, g);
    const b = bandAt(p.bands, g)!;
    grid.req[k] = level;
    grid.up[k] = level * Math.pow(10, b.upperDb / 10);
    grid.lo[k] = level * Math.pow(10, -b.lowerDb / 10);
    if (p.outerBands) {
      const o = bandAt(p.outerBands, g)!;
      grid.oUp[k] = level * Math.pow(10, o.upperDb / 10);
      grid.oLo[k] = level * Math.pow(10, -o.lowerDb / 10);
    }
  }
  return grid;
}

/**
 * `smoothed` for line i on a fine grid: the kernel's samples fall on sub-bins i x oversample - (j - mh), folded at 0
 * and Nyquist.
 */
function smoothedOnGrid(grid: FineGrid, weights: Float64Array, i: number, partial: boolean) {
  const mh = (weights.length - 1) / 2;
  const centre = i * grid.oversample + mh;
  const top = grid.nyquistIndex;
  let req = 0;
  let up = 0;
  let lo = 0;
  let oUp = 0;
  let oLo = 0;
  let total = 0;
  for (let j = 0; j < weights.length; j++) {
    let k = centre - j;
    if (k < 0) k = -k;
    if (k > top) k = 2 * top - k;
    const level = k >= 0 && k <= top ? grid.req[k]! : NaN;
    if (Number.isNaN(level)) {
      if (partial) continue;
      return undefined;
    }
    const w = weights[j]!;
    total += w;
    req += w * level;
    up += w * grid.up[k]!;
    lo += w * grid.lo[k]!;
    oUp += w * grid.oUp[k]!;
    oLo += w * grid.oLo[k]!;
  }
  if (!(total > 0)) return undefined;
  return { req: req / total, up: up / total, lo: lo / total, oUp: oUp / total, oLo: oLo / total };
}

/**
 * Where the core kernel and the wide one differ by more than this, a line near the profile's ends is left out (1 %,
 * 0.04 dB; chosen here).
 */
const NOTCH_LIMIT = 0.01;

interface JudgedGrid {
  idx: number[];
  req: number[];
  up: number[];
  lo: number[];
  oUp: number[];
  oLo: number[];
  unjudged: { edge: number; detrend: number; notch: number };
}

const gridCache = new WeakMap<TestProfile, Map<string, JudgedGrid>>();

/** The judged lines of an analysis grid and the profile and limits each should show. */
function judgedGrid(
  profile: TestProfile,
  kernel: SpectralKernel,
  sp: SpectrumUnderTest,
  f0: number,
  fN: number,
): JudgedGrid {
  const key = `${sp.sampleRateHz}:${sp.segmentLength}:${sp.window}:${sp.detrend}:${sp.frequencyHz.length}`;
  let byProfile = gridCache.get(profile);
  if (!byProfile) gridCache.set(profile, (byProfile = new Map()));
  const hit = byProfile.get(key);
  if (hit) return hit;
  const kv = kernelView(kernel.weights, kernel.oversample, sp.lineSpacingHz);
  const kw = kernelView(kernel.wideWeights, kernel.oversample, sp.lineSpacingHz);
  const biased = detrendBiasedLines(kernel);
  const nyquist = sp.sampleRateHz / 2;
  const g: JudgedGrid = {
    idx: [],
    req: [],
    up: [],
    lo: [],
    oUp: [],
    oLo: [],
    unjudged: { edge: 0, detrend: 0, notch: 0 },
  };
  // The profile and limits sampled once on the kernel's sub-bin grid (when the lines sit on it, as Welch's do): each
  // line then reads them by index instead of evaluating the profile again under every kernel sample. Same values.
  const fine = fineGrid(profile, kernel, sp, nyquist, f0, fN);
  const look = (view: KernelView, i: number, partial = false) =>
    fine
      ? smoothedOnGrid(fine, view.weights, i, partial)
      : smoothed(profile, view, sp.frequencyHz[i]!, nyquist, f0, fN, partial);
  for (let i = 1; i < sp.frequencyHz.length; i++) {
    const f = sp.frequencyHz[i]!;
    if (f < f0 || f > fN) continue;
    if (i < biased) {
      g.unjudged.detrend++;
      continue;
    }
    const core = look(kv, i);
    if (core === undefined) {
      g.unjudged.edge++;
      continue;
    }
    // The wide kernel where it fits inside the profile (exact to its 1e-9 tails: the bottom of a deep notch
    // sees the walls through the far side lobes). Near the ends it does not fit: the core kernel stands if
    // the wide one over the part inside agrees with it, else the line is left out (a notch near an end).
    let s = look(kw, i);
    if (s === undefined) {
      const probe = look(kw, i, true);
      if (
        probe !== undefined &&
        (Math.abs(probe.req / core.req - 1) > NOTCH_LIMIT ||
          Math.abs(probe.up / core.up - 1) > NOTCH_LIMIT ||
          Math.abs(probe.lo / core.lo - 1) > NOTCH_LIMIT)
      ) {
        g.unjudged.notch++;
        continue;
      }
      s = core;
    }
    g.idx.push(i);
    g.req.push(s.req);
    g.up.push(s.up);
    g.lo.push(s.lo);
    g.oUp.push(s.oUp);
    g.oLo.push(s.oLo);
  }
  if (byProfile.size > 16) byProfile.clear();
  byProfile.set(key, g);
  return g;
}

/** A spectrum's judged lines with what each should show, and the DOF each line's test uses. */
export interface JudgedSpectrum {
  sp: SpectrumUnderTest;
  kernel: SpectralKernel;
  /** Variance inflation of neighbouring lines (spectralKernel lineVarianceInflation). */
  inflation: number;
  /** The largest of k control channels is judged (1: one spectrum). */
  k: number;
  /** Spectra the record's verdict rests on. */
  family: number;
  /** The profile's range, Hz; the record's Nyquist frequency; the line spacing; the index of the Nyquist line. */
  f0: number;
  fN: number;
  nyquist: number;
  df: number;
  half: number;
  /** The spectrum's DOF (interior lines). */
  nu: number;
  /** Index into the spectrum of each judged line, and what it should show: profile, limits, outer limits. */
  idx: number[];
  req: number[];
  limitsUp: number[];
  limitsLo: number[];
  outerUp: number[];
  outerLo: number[];
  /** The upper limits as the estimate should show them: with the largest of k, times its mean at the limit. */
  upEff: number[];
  unjudged: { edge: number; detrend: number; aboveRecord: number; notch: number; excluded: number };
  /** The DOF of line i (the Nyquist line has half). */
  nuAt(i: number): number;
  /** The largest of k estimates at the limit reads this times the limit on average (1 for one spectrum). */
  meanAt(v: number): number;
  /** The moment-matched DOF of the largest of k (v itself for one spectrum). */
  effAt(v: number): number;
}

/** The judged lines of a spectrum against a profile (the caller's excluded lines left out and counted). */
export function judgedSpectrum(sp: SpectrumUnderTest, profile: TestProfile): JudgedSpectrum {
  const df = sp.lineSpacingHz;
  const nyquist = sp.sampleRateHz / 2;
  const half = sp.psd.length - 1;
  const f0 = profile.breakpoints[0]!.hz;
  const fN = profile.breakpoints[profile.breakpoints.length - 1]!.hz;
  const kernel = spectralKernel(sp.window, spectralWindow(sp.window, sp.segmentLength), sp.detrend);
  const k = Math.max(1, sp.upperSharedBy ?? 1);
  // Which lines are judged, and what each should show (cached per profile and analysis grid).
  const grid = judgedGrid(profile, kernel, sp, f0, fN);
  const unjudged = {
    edge: grid.unjudged.edge,
    detrend: grid.unjudged.detrend,
    aboveRecord: 0,
    notch: grid.unjudged.notch,
    excluded: 0,
  };
  const idx: number[] = [];
  const req: number[] = [];
  const limitsUp: number[] = [];
  const limitsLo: number[] = [];
  const outerUp: number[] = [];
  const outerLo: number[] = [];
  for (let j = 0; j < grid.idx.length; j++) {
    const i = grid.idx[j]!;
    if (sp.excludedLines?.[i]) {
      unjudged.excluded++;
      continue;
    }
    idx.push(i);
    req.push(grid.req[j]!);
    limitsUp.push(grid.up[j]!);
    limitsLo.push(grid.lo[j]!);
    outerUp.push(grid.oUp[j]!);
    outerLo.push(grid.oLo[j]!);
  }
  const nu = sp.dof;
  const nuAt = (i: number) => (i === half ? nu / 2 : nu);
  // The largest of k estimates at the limit reads mean(nu) x the limit on average (largestOfMoments): its
  // upper limits as the estimate should show them carry that allowance, and its sums are tested with the
  // moment-matched DOF. One spectrum: mean 1, nu itself.
  const meanAt = (v: number) => (k > 1 && v > 0 ? largestOfMoments(v, k).mean : 1);
  const effAt = (v: number) => (k > 1 && v > 0 ? largestEffectiveDof(v, k) : v);
  const upEff = limitsUp.map((u, j) => u * meanAt(nuAt(idx[j]!)));
  if (fN > nyquist * (1 + 1e-12)) {
    unjudged.aboveRecord = Math.max(0, Math.floor((fN - Math.max(f0, nyquist)) / df));
  }
  return {
    sp,
    kernel,
    inflation: lineVarianceInflation(kernel),
    k,
    family: Math.max(1, sp.family ?? 1),
    f0,
    fN,
    nyquist,
    df,
    half,
    nu,
    idx,
    req,
    limitsUp,
    limitsLo,
    outerUp,
    outerLo,
    upEff,
    unjudged,
    nuAt,
    meanAt,
    effAt,
  };
}
