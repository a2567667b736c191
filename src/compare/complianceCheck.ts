import { chiSquareCdf, chiSquareIntervalFactors, chiSquareSurvival } from "../estimate/statistics/chiSquare.js";
import { bandMeanSquare } from "../estimate/spectral/psdEstimate.js";
import { departureShare, detrendBiasedLines, lineVarianceInflation, spectralKernel, type SpectralKernel } from "../estimate/spectral/spectralKernel.js";
import { welchDofBySegments } from "../estimate/spectral/welchDof.js";
import type { Detrend } from "../estimate/spectral/welchPsd.js";
import { spectralWindow, type WindowName } from "../estimate/spectral/windows.js";
import {
  chanceAbove, chanceBelow, DECISION_RULE, DEFAULT_POWER, dofForPower, largestEffectiveDof, largestOfMoments, largestUpperFactor, lowerFactor, powerAt, ruleLevels, upperFactor,
  type PowerAt, type PowerInputs, type PowerRequirement,
} from "./decisionRule.js";
import type { Finding } from "../findings.js";
import { profileLevel, profileMeanSquare, type TestProfile, type ToleranceBand } from "./testProfile.js";

/**
 * Judges a measured PSD against a required profile by psdgate's decision rule (decisionRule.ts):
 * every judged line against its tolerance band (and outer limits, when the profile has them), runs of
 * neighbouring lines at a few widths, and the RMS over the profile's range, each test at a family-wise
 * level; then what a pass needs besides (DOF, coverage, resolution, duration). Pure: takes the spectrum
 * and the profile, returns data.
 */
export type Verdict = "pass" | "fail" | "inconclusive";

export type { Finding };

export interface LineDeviation {
  frequencyHz: number;
  /** The estimate as judged (the Nyquist line at twice its stored one-sided value). */
  measured: number;
  /** The profile seen through the analysis window's spectral kernel: what the estimate should show. */
  required: number;
  /** 10 log10(measured / required). */
  deviationDb: number;
  /** The band's limits at this line, dB, as seen through the same kernel. */
  upperDb: number;
  lowerDb: number;
  status: "within" | "above" | "below";
  /** Shown outside its band at the rule's family-wise level (not explained by chance among all lines). */
  shown: boolean;
  /** Shown beyond an outer limit. */
  beyondOuter: boolean;
  /** The outer limits at this line, dB, as seen through the kernel (when the profile has them). */
  outerUpperDb?: number | undefined;
  outerLowerDb?: number | undefined;
}

export interface Excursion {
  fromHz: number;
  toHz: number;
  direction: "above" | "below";
  lines: number;
  /** The largest deviation in the run, dB. */
  worstDb: number;
  worstHz: number;
  /** The band limit crossed at the worst line, dB (positive for above, negative for below). */
  limitDb: number;
  /** The worst line's own confidence interval (at the analysis confidence) lies wholly beyond the limit. */
  clear: boolean;
  /** Shown by the rule: a line of the run, or a stretch of lines around it, is outside at the family-wise level. */
  shown: boolean;
  /** Bonferroni-adjusted p-value of the worst line: the chance of a line this far out among all tests if the PSD were on the limit. */
  adjustedP: number;
  /**
   * For a run not shown: how many times longer a record would show its worst line with at least 90 %
   * probability, if the true spectrum is what was measured (read again through the window's kernel, as a
   * new run would show it). Undefined when that reading is inside the limit: no run length shows it.
   */
  longerRecordFactor: number | undefined;
  /** The same as a run length in seconds at this sample rate, segment and overlap. */
  secondsToShow: number | undefined;
}

export interface RuleReport {
  /** Upper bound of the false-fail rate for any true PSD inside the bands (Bonferroni). */
  falseFailBound: number;
  /** False-fail rate (union bound) if the true PSD equalled the profile, at the achieved DOF. */
  falseFailAtProfile: number;
  /** Per-line, per-direction test level against the band. */
  lineTestLevel: number;
  /** Stretches of neighbouring lines also tested, in lines. */
  stretchWidths: number[];
  /** Lines the profile allows outside the band. */
  allowanceLines: number;
  /** Power at the achieved DOF, each case, against the requirement that applies (the profile's or the default). */
  power: PowerAt;
  /** The DOF at which a pass has the stated power (0 when the profile asks none). */
  dofForPower: number;
  /** The power requirement that applies: psdgate's default, the profile's own, or none (null). */
  requirement: (PowerRequirement & { source: "default" | "profile" }) | null;
  /** Power at the achieved DOF against psdgate's default requirement, whatever the profile asks. */
  powerDefault: PowerAt;
  /** The DOF at which the default requirement is met. */
  dofForDefaultPower: number;
  /** The kernel's share on a departure of the requirement's width at its centre line (how much of it a line shows). */
  departureSeenShare: number;
  /** Spectra the record's verdict rests on; each is tested at falseFailBound / family. */
  family: number;
  /** With the largest of k control channels: k, the mean of the largest at the limit (dB), its moment-matched DOF. */
  largestOf: { channels: number; meanAllowanceDb: number; effectiveDof: number } | null;
}

/** How long a run must be for the verdict to be decided (pass or fail) with `probability`, if the spectrum is what was measured. */
export interface DecideEstimate {
  probability: number;
  /** The DOF and the run length in seconds at this sample rate, segment and overlap; undefined when not within 1000x this run. */
  dof: number | undefined;
  seconds: number | undefined;
  /** The decision most likely at that length. */
  likely: "pass" | "fail" | undefined;
}

export interface ChannelCompliance {
  channel: string;
  verdict: Verdict;
  /** Why the verdict is what it is, as findings (report/findingTexts.ts says them). */
  findings: Finding[];
  lines: LineDeviation[];
  excursions: Excursion[];
  /** Lines in the profile's range that were not judged, and why (notch: the window's kernel is not modelled well enough there; excluded: left out by the caller's mask). */
  unjudged: { edge: number; detrend: number; aboveRecord: number; notch: number; excluded: number };
  rms: {
    measured: number; required: number; deviationDb: number; upperDb: number | undefined; lowerDb: number | undefined;
    /** Within tolerance as measured. */
    ok: boolean;
    /** Shown outside its tolerance by the rule. */
    shown: boolean;
    /** Satterthwaite DOF of the mean square over the range. */
    dof: number;
  };
  dof: { achieved: number; required: number | undefined; forPower: number; ok: boolean };
  rule: RuleReport;
  /** For an inconclusive verdict that a longer run could decide: how long. Undefined otherwise. */
  decide?: DecideEstimate | undefined;
  /** Mixed mode: each required tone and its verdict (compare/toneCheck.ts). */
  tones?: ToneJudgement[] | undefined;
}

/** What the judgement needs of a measured spectrum. */
export interface SpectrumUnderTest {
  name: string;
  frequencyHz: Float64Array;
  psd: Float64Array;
  /** Equivalent DOF of the interior lines. */
  dof: number;
  lineSpacingHz: number;
  sampleRateHz: number;
  /** Length of what was analysed, s: the --from/--to window when there is one. */
  durationS: number;
  /** The --from/--to window (s from the record's first sample), when only part of the record was analysed. */
  analysedWindow?: { fromS: number; toS: number } | undefined;
  window: WindowName;
  segmentLength: number;
  detrend: Detrend;
  confidence: number;
  /** With the largest of k control channels taken at each line, k (its upper tests use the largest's distribution); else 1. */
  upperSharedBy?: number | undefined;
  /** Spectra the record's verdict rests on (every judged channel, or the one control spectrum): the 5 % is split over them. Default 1. */
  family?: number | undefined;
  /** Fraction of a segment shared with the next (for run lengths in seconds); default 0.5. */
  overlap?: number | undefined;
  /**
   * Lines left out of the judgement by the caller (index into psd, non-zero to leave out), e.g. the lines
   * of a sine tone on a sine-on-random profile. They are counted in `unjudged.excluded`; the RMS is not changed.
   */
  excludedLines?: Uint8Array | undefined;
}

/** The band of a line; at a shared edge (e.g. exactly 1000 Hz) the tighter band applies (common practice: read a shared edge strictly). */
export function bandAt(bands: ToleranceBand[], f: number): ToleranceBand | undefined {
  let best: ToleranceBand | undefined;
  for (const b of bands) {
    if (f >= b.fromHz && f <= b.toHz && (best === undefined || b.upperDb + b.lowerDb < best.upperDb + best.lowerDb)) best = b;
  }
  return best;
}

/** Stretch widths tested besides single lines (powers of 4 up to a quarter of the lines; chosen here). */
function stretchWidths(lines: number): number[] {
  const out: number[] = [];
  for (let w = 4; w <= lines / 4 && w <= 64; w *= 4) out.push(w);
  return out;
}

/** Share of the line alpha given to the stretches when there are any and no allowance (chosen here). */
const STRETCH_SHARE = 0.25;

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
function fineGrid(p: TestProfile, kernel: SpectralKernel, sp: SpectrumUnderTest, nyquist: number, f0: number, fN: number): FineGrid | undefined {
  const os = kernel.oversample;
  const df = sp.lineSpacingHz;
  const m = Math.round((nyquist * os) / df);
  if (!Number.isInteger(os) || Math.abs((nyquist * os) / df - m) > 1e-6 || ![kernel.weights, kernel.wideWeights].every((w) => w.length % 2 === 1)) return undefined;
  for (let i = 0; i < sp.frequencyHz.length; i++) if (Math.abs(sp.frequencyHz[i]! - i * df) > 1e-9 * df * (i + 1)) return undefined;
  const n = m + 1;
  const grid: FineGrid = { oversample: os, nyquistIndex: m, req: new Float64Array(n), up: new Float64Array(n), lo: new Float64Array(n), oUp: new Float64Array(n), oLo: new Float64Array(n) };
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

/** `smoothed` for line i on a fine grid: the kernel's samples fall on sub-bins i x oversample - (j - mh), folded at 0 and Nyquist. */
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

/** Where the core kernel and the wide one differ by more than this, a line near the profile's ends is left out (1 %, 0.04 dB; chosen here). */
const NOTCH_LIMIT = 0.01;

/**
 * Smallest DOF multiple at which a line whose true level is `ratio` x its limit would be shown at the
 * per-test level with at least `probability` (0.9 by default; 0.5 is where the expected estimate just
 * reaches the threshold). With `k` > 1 (above, the largest of k channels each at that level), the chance
 * is 1 - (1 - P1)^k. Undefined for a line on or inside its limit, or past 1e6 times the DOF.
 */
export function longerRecordFactor(ratio: number, dof: number, level: number, probability = DECIDE_PROBABILITY, k = 1): number | undefined {
  if (!(dof > 0) || ratio === 1 || !Number.isFinite(ratio) || ratio <= 0) return undefined;
  const chance = (nu: number) => {
    if (ratio > 1) {
      const one = chanceAbove(nu, ratio, largestUpperFactor(nu, level, k));
      return k > 1 ? -Math.expm1(k * Math.log1p(-Math.min(one, 1 - 1e-16))) : one;
    }
    return chanceBelow(nu, ratio, lowerFactor(nu, level));
  };
  const shows = (nu: number) => chance(nu) >= probability;
  if (shows(dof)) return 1;
  let hi = dof * 2;
  while (!shows(hi)) {
    hi *= 2;
    if (hi > dof * 1e6) return undefined;
  }
  let lo = dof;
  for (let i = 0; i < 60 && hi / lo > 1.01; i++) {
    const mid = Math.sqrt(lo * hi);
    if (shows(mid)) hi = mid;
    else lo = mid;
  }
  return hi / dof;
}

/** Satterthwaite DOF of sum_k a_k G_k, lines correlated by rho: nu (sum a)^2 / sum_k sum_j a_k a_j rho_|k-j|. */
function sumDof(a: Float64Array, n: number, dof: number, rho: Float64Array): number {
  let s = 0;
  let q = 0;
  for (let k = 0; k < n; k++) {
    s += a[k]!;
    let c = a[k]! * a[k]!;
    for (let d = 1; d < rho.length; d++) {
      if (k + d < n) c += 2 * a[k]! * a[k + d]! * rho[d]!;
    }
    q += c;
  }
  return q > 0 ? (dof * s * s) / q : 0;
}

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
function judgedGrid(profile: TestProfile, kernel: SpectralKernel, sp: SpectrumUnderTest, f0: number, fN: number): JudgedGrid {
  const key = `${sp.sampleRateHz}:${sp.segmentLength}:${sp.window}:${sp.detrend}:${sp.frequencyHz.length}`;
  let byProfile = gridCache.get(profile);
  if (!byProfile) gridCache.set(profile, (byProfile = new Map()));
  const hit = byProfile.get(key);
  if (hit) return hit;
  const kv = kernelView(kernel.weights, kernel.oversample, sp.lineSpacingHz);
  const kw = kernelView(kernel.wideWeights, kernel.oversample, sp.lineSpacingHz);
  const biased = detrendBiasedLines(kernel);
  const nyquist = sp.sampleRateHz / 2;
  const g: JudgedGrid = { idx: [], req: [], up: [], lo: [], oUp: [], oLo: [], unjudged: { edge: 0, detrend: 0, notch: 0 } };
  // The profile and limits sampled once on the kernel's sub-bin grid (when the lines sit on it, as Welch's do): each
  // line then reads them by index instead of evaluating the profile again under every kernel sample. Same values.
  const fine = fineGrid(profile, kernel, sp, nyquist, f0, fN);
  const look = (view: KernelView, i: number, partial = false) =>
    fine ? smoothedOnGrid(fine, view.weights, i, partial) : smoothed(profile, view, sp.frequencyHz[i]!, nyquist, f0, fN, partial);
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
      if (probe !== undefined && (Math.abs(probe.req / core.req - 1) > NOTCH_LIMIT || Math.abs(probe.up / core.up - 1) > NOTCH_LIMIT || Math.abs(probe.lo / core.lo - 1) > NOTCH_LIMIT)) {
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

/** The power requirement that applies to a profile: its own (parts it leaves out from the default), none, or the default. */
export function powerRequirement(profile: TestProfile): (PowerRequirement & { source: "default" | "profile" }) | null {
  const p = profile.power;
  if (p === "none") return null;
  if (p === undefined) return { ...DEFAULT_POWER, source: "default" };
  return {
    departureDb: p.departureDb ?? DEFAULT_POWER.departureDb,
    departureShare: p.departurePercent !== undefined ? p.departurePercent / 100 : DEFAULT_POWER.departureShare,
    widthLines: p.widthLines ?? DEFAULT_POWER.widthLines,
    rmsBeyondDb: p.rmsBeyondDb ?? DEFAULT_POWER.rmsBeyondDb,
    probability: p.probabilityPercent !== undefined ? p.probabilityPercent / 100 : DEFAULT_POWER.probability,
    source: "profile",
  };
}

/** The probability a run-length estimate aims at (chosen here; the 90 %). */
export const DECIDE_PROBABILITY = 0.9;

const dofCurves = new Map<string, (segments: number) => number>();

/**
 * Seconds of record that give `dof` at this sample rate, segment and overlap: the fewest segments K whose
 * Welch DOF (welchDof, Percival & Walden 1993 eq. 292b) reaches it, then (K - 1) hop + N samples.
 */
export function secondsForDof(sp: Pick<SpectrumUnderTest, "window" | "segmentLength" | "overlap" | "sampleRateHz">, dof: number): number | undefined {
  if (!(dof > 0) || !Number.isFinite(dof)) return undefined;
  const n = sp.segmentLength;
  const hop = Math.max(1, n - Math.round((sp.overlap ?? 0.5) * n));
  // One curve per window, length and hop: a check asks this for every excursion, and a 131072-point window's lag
  // correlations cost milliseconds each time.
  const key = `${sp.window}|${n}|${hop}`;
  let welchDof = dofCurves.get(key);
  if (welchDof === undefined) {
    if (dofCurves.size > 8) dofCurves.clear();
    welchDof = welchDofBySegments(spectralWindow(sp.window, n), hop);
    dofCurves.set(key, welchDof);
  }
  let hi = 1;
  while (welchDof(hi) < dof) {
    hi *= 2;
    if (hi > 1e9) return undefined;
  }
  let lo = Math.max(1, Math.floor(hi / 2));
  if (welchDof(lo) >= dof) hi = lo;
  while (hi - lo > 1) {
    const mid = Math.floor((lo + hi) / 2);
    if (welchDof(mid) >= dof) hi = mid;
    else lo = mid;
  }
  return ((hi - 1) * hop + n) / sp.sampleRateHz;
}

/**
 * Mixed mode (compare/toneCheck.ts): the tones' lines come in `excludedLines`; here the tones' mean square is added to
 * the required RMS (the RMS is the total) and the tones' share of the family-wise budget is taken from the lines'.
 */
export interface ToneAllowance {
  /** Sum of peak^2 / 2 of the required tones inside the compared range. */
  toneMeanSquare: number;
  /** Alpha taken from the lines' share for the tones. */
  toneShare: number;
}

export function judgeSpectrum(sp: SpectrumUnderTest, profile: TestProfile, tones?: ToneAllowance): ChannelCompliance {
  const df = sp.lineSpacingHz;
  const nyquist = sp.sampleRateHz / 2;
  const half = sp.psd.length - 1;
  const f0 = profile.breakpoints[0]!.hz;
  const fN = profile.breakpoints[profile.breakpoints.length - 1]!.hz;
  const kernel = spectralKernel(sp.window, spectralWindow(sp.window, sp.segmentLength), sp.detrend);
  const inflation = lineVarianceInflation(kernel);
  const k = Math.max(1, sp.upperSharedBy ?? 1);
  const family = Math.max(1, sp.family ?? 1);

  // Which lines are judged, and what each should show (cached per profile and analysis grid).
  const grid = judgedGrid(profile, kernel, sp, f0, fN);
  const unjudged = { edge: grid.unjudged.edge, detrend: grid.unjudged.detrend, aboveRecord: 0, notch: grid.unjudged.notch, excluded: 0 };
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

  const lines: LineDeviation[] = [];
  for (let j = 0; j < idx.length; j++) {
    const i = idx[j]!;
    // The Nyquist line's one-sided value is not doubled (so sum P df is the mean square): judge twice it.
    const measured = i === half ? 2 * sp.psd[i]! : sp.psd[i]!;
    const status = measured > upEff[j]! ? "above" : measured < limitsLo[j]! || !(measured > 0) ? "below" : "within";
    lines.push({
      frequencyHz: sp.frequencyHz[i]!, measured, required: req[j]!, deviationDb: 10 * Math.log10(measured / req[j]!),
      upperDb: 10 * Math.log10(upEff[j]! / req[j]!), lowerDb: -10 * Math.log10(limitsLo[j]! / req[j]!), status, shown: false, beyondOuter: false,
      ...(profile.outerBands ? { outerUpperDb: 10 * Math.log10((outerUp[j]! * meanAt(nuAt(i))) / req[j]!), outerLowerDb: -10 * Math.log10(outerLo[j]! / req[j]!) } : {}),
    });
  }
  if (fN > nyquist * (1 + 1e-12)) {
    unjudged.aboveRecord = Math.max(0, Math.floor((fN - Math.max(f0, nyquist)) / df));
  }
  const m = lines.length;
  const allowanceLines = Math.floor(((profile.allowedOutsidePercent ?? 0) / 100) * m);
  const outer = profile.outerBands !== undefined;
  const widths = allowanceLines === 0 ? stretchWidths(m) : [];
  const toneShare = tones?.toneShare ?? 0;
  const levels = ruleLevels(m, outer, family, toneShare);
  // Single lines get the line alpha less the stretches' share; each stretch width an equal part of that share.
  const singleShare = widths.length > 0 ? 1 - STRETCH_SHARE : 1;
  const upLevel = levels.upper.lineTest * singleShare;
  const loLevel = levels.lower.lineTest * singleShare;
  const factorCache = new Map<number, { up: number; lo: number; oUp: number; oLo: number }>();
  // Thresholds on measured / raw limit: above, the largest-of-k quantile (k = 1: chi-square); below, chi-square.
  const factors = (v: number) => {
    let f = factorCache.get(v);
    if (!f) {
      f = {
        up: largestUpperFactor(v, upLevel, k), lo: lowerFactor(v, loLevel),
        oUp: outer ? largestUpperFactor(v, levels.upper.outerTest!, k) : Infinity, oLo: outer ? lowerFactor(v, levels.lower.outerTest!) : 0,
      };
      factorCache.set(v, f);
    }
    return f;
  };

  let shownOut = 0;
  let shownOuter = 0;
  if (nu > 0) {
    for (let j = 0; j < m; j++) {
      const l = lines[j]!;
      const f = factors(nuAt(idx[j]!));
      if (l.measured / limitsUp[j]! > f.up || l.measured / limitsLo[j]! < f.lo) l.shown = true;
      if (outer && (l.measured / outerUp[j]! > f.oUp || l.measured / outerLo[j]! < f.oLo)) l.beyondOuter = true;
    }
    // Stretches of w neighbouring lines, every w/2 lines: the mean of measured / limit, with the
    // DOF of a sum of correlated lines (Satterthwaite), Bonferroni over the stretches of each width.
    // Above, the limit carries the largest-of allowance and the DOF is the moment-matched one.
    const nuUpEff = effAt(nu);
    for (const w of widths) {
      let c = 1;
      for (let d = 1; d < Math.min(w, kernel.lineCorrelation.length); d++) c += 2 * (1 - d / w) * kernel.lineCorrelation[d]!;
      const nuW = (nu * w) / c;
      const nuWUp = (nuUpEff * w) / c;
      const count = Math.max(1, Math.floor((m - w) / (w / 2)) + 1);
      // This width's part of the stretches' share, over its `count` stretches (per direction).
      const part = (m * STRETCH_SHARE) / (widths.length * count);
      const upF = upperFactor(nuWUp, levels.upper.lineTest * part);
      const loF = lowerFactor(nuW, levels.lower.lineTest * part);
      for (let s = 0; s + w <= m; s += w / 2) {
        let ru = 0;
        let rl = 0;
        for (let j = s; j < s + w; j++) {
          ru += lines[j]!.measured / upEff[j]!;
          rl += lines[j]!.measured / limitsLo[j]!;
        }
        ru /= w;
        rl /= w;
        if (ru > upF || rl < loF) {
          // The stretch is shown outside: mark its lines that lie outside as measured.
          for (let j = s; j < s + w; j++) if (lines[j]!.status === (ru > upF ? "above" : "below")) lines[j]!.shown = true;
        }
      }
    }
    for (const l of lines) {
      if (l.shown) shownOut++;
      if (l.beyondOuter) shownOuter++;
    }
  }

  const secondsAt = (v: number | undefined) => (v === undefined ? undefined : secondsForDof(sp, v));

  // The measured spectrum taken as the truth over each line's cell, read again through the window's kernel
  // (what a new run would show on average): c_0 of the line's own cell, c_d of each cell d lines away.
  const cellShare: number[] = [departureShare(kernel, 1)];
  for (let d = 1; d <= kernel.wideHalfWidthBins; d++) cellShare.push((departureShare(kernel, 2 * d + 1) - departureShare(kernel, 2 * d - 1)) / 2);
  const reread = (i: number) => {
    let e = 0;
    let wsum = 0;
    for (let d = -(cellShare.length - 1); d < cellShare.length; d++) {
      const q = i + d;
      if (q < 1 || q > half) continue;
      const c = cellShare[Math.abs(d)]!;
      e += c * (q === half ? 2 * sp.psd[q]! : sp.psd[q]!);
      wsum += c;
    }
    return e / wsum;
  };

  // Excursions: runs of neighbouring lines outside the band as measured.
  const excursions: Excursion[] = [];
  const plain = nu > 0 ? chiSquareIntervalFactors(nu, sp.confidence) : { lower: 0, upper: Infinity };
  const tests = 2 * Math.max(1, m) * family;
  for (let i = 0; i < m; ) {
    const l = lines[i]!;
    if (l.status === "within") {
      i++;
      continue;
    }
    let j = i;
    let worst = i;
    let shown = l.shown;
    while (j + 1 < m && lines[j + 1]!.status === l.status) {
      j++;
      shown ||= lines[j]!.shown;
      const better = l.status === "above" ? lines[j]!.deviationDb > lines[worst]!.deviationDb : lines[j]!.deviationDb < lines[worst]!.deviationDb;
      if (better) worst = j;
    }
    const w = lines[worst]!;
    const above = l.status === "above";
    const limit = above ? limitsUp[worst]! : limitsLo[worst]!;
    const ratio = w.measured / limit;
    const v = nuAt(idx[worst]!);
    const pOne = v > 0 ? (above ? chiSquareSurvival(v * ratio, v) : chiSquareCdf(v * ratio, v)) : 1;
    // With the largest of k, the chance that any of k at the limit reaches this: 1 - (1 - p)^k.
    const p = above && k > 1 ? -Math.expm1(k * Math.log1p(-Math.min(pOne, 1 - 1e-16))) : pOne;
    // The worst line's true level taken as measured, read again through the kernel as a new run would (for the
    // largest of k: over its mean at the limit, per channel); undefined when that reading is inside the limit.
    const again = reread(idx[worst]!) / limit;
    const trueRatio = above ? again / meanAt(v) : again;
    const factor = shown || (above ? trueRatio <= 1 : trueRatio >= 1) ? undefined : longerRecordFactor(trueRatio, v, above ? upLevel : loLevel, DECIDE_PROBABILITY, above ? k : 1);
    excursions.push({
      fromHz: l.frequencyHz, toHz: lines[j]!.frequencyHz, direction: l.status as "above" | "below", lines: j - i + 1,
      worstDb: w.deviationDb, worstHz: w.frequencyHz, limitDb: above ? w.upperDb : -w.lowerDb,
      clear: above ? (ratio / meanAt(v)) * plain.lower > 1 : ratio * plain.upper < 1,
      shown, adjustedP: Math.min(1, p * tests),
      longerRecordFactor: factor, secondsToShow: factor === undefined ? undefined : secondsAt(factor * v),
    });
    i = j + 1;
  }

  // RMS over the profile's range, with each end line counted for the part of its cell inside.
  // A record that cannot reach the profile's top is compared over the part it covers.
  const top = Math.min(fN, nyquist);
  const requiredRms = Math.sqrt((top < fN ? profileMeanSquare(profile, f0, top) : profile.rms * profile.rms) + (tones?.toneMeanSquare ?? 0));
  const measuredMs = bandMeanSquare(sp, f0, top);
  const measuredRms = Math.sqrt(measuredMs);
  const rmsDev = 20 * Math.log10(measuredRms / requiredRms);
  const tol = profile.rmsToleranceDb;
  const muNow = meanAt(nu);
  // As measured: above against the tolerance with the largest-of allowance (its mean at the limit), below plain.
  const rmsOk = tol === undefined || (rmsDev - 10 * Math.log10(muNow) <= tol.upper && rmsDev >= -tol.lower);
  // Each line's contribution to that mean square, for the Satterthwaite DOF of the sum.
  const contrib = new Float64Array(half + 1);
  let nc = 0;
  for (let i = 0; i <= half; i++) {
    const lo = Math.max(f0, (i - 0.5) * df);
    const hi = Math.min(top, (i + 0.5) * df);
    if (hi > lo) contrib[nc++] = bandMeanSquare(sp, lo, hi);
  }
  const rmsDof = nu > 0 ? sumDof(contrib, nc, nu, kernel.lineCorrelation) : 0;
  const rmsRatio = nu > 0 && rmsDof > 0 ? rmsDof / nu : Math.max(1, m) / inflation;
  const ms0 = requiredRms * requiredRms;
  const hiLimit = tol !== undefined ? ms0 * Math.pow(10, tol.upper / 10) : Infinity;
  const loLimit = tol !== undefined ? ms0 * Math.pow(10, -tol.lower / 10) : 0;
  let rmsShown = false;
  if (tol !== undefined && rmsDof > 0 && measuredMs > 0) {
    const rmsDofUp = rmsDof * (effAt(nu) / nu);
    rmsShown = measuredMs / (hiLimit * muNow) > upperFactor(rmsDofUp, levels.upper.rmsTest) || measuredMs / loLimit < lowerFactor(rmsDof, levels.lower.rmsTest);
  }

  // Power and the DOF a pass needs: against the requirement that applies, and against the default always.
  const bandsUp = Math.max(...profile.bands.map((b) => b.upperDb));
  const bandsLo = Math.max(...profile.bands.map((b) => b.lowerDb));
  const powerInputs: PowerInputs = {
    lines: Math.max(1, m), allowance: allowanceLines, inflation, rmsDofRatio: rmsRatio, outerLimits: outer, upperSharedBy: k, family, toneShare,
    seenShare: (w) => departureShare(kernel, w), widestUpperDb: bandsUp, widestLowerDb: bandsLo, singleLineShare: singleShare,
  };
  const requirement = powerRequirement(profile);
  const forDefault = dofForPower(powerInputs, DEFAULT_POWER);
  const powerDefault = powerAt(Math.max(nu, 1e-9), powerInputs, DEFAULT_POWER);
  const forPower = requirement === null ? 0 : requirement.source === "default" ? forDefault : dofForPower(powerInputs, requirement);
  const power = requirement === null ? powerDefault : requirement.source === "default" ? powerDefault : powerAt(Math.max(nu, 1e-9), powerInputs, requirement);
  const required = profile.minDof;
  const dofOk = nu >= (required ?? 0) && nu >= forPower;

  // The false-fail rate if the PSD were the profile: union bound over every test at G = required.
  let atProfile = 0;
  if (nu > 0) {
    for (let j = 0; j < m; j++) {
      const v = nuAt(idx[j]!);
      const f = factors(v);
      const qUp = chiSquareSurvival((v * f.up * limitsUp[j]!) / req[j]!, v);
      atProfile += (k > 1 ? -Math.expm1(k * Math.log1p(-Math.min(qUp, 1 - 1e-16))) : qUp) + chiSquareCdf((v * f.lo * limitsLo[j]!) / req[j]!, v);
    }
    if (tol !== undefined && rmsDof > 0) {
      const rmsDofUp = rmsDof * (effAt(nu) / nu);
      atProfile += chiSquareSurvival(rmsDofUp * upperFactor(rmsDofUp, levels.upper.rmsTest) * Math.pow(10, tol.upper / 10), rmsDofUp);
      atProfile += chiSquareCdf(rmsDof * lowerFactor(rmsDof, levels.lower.rmsTest) * Math.pow(10, -tol.lower / 10), rmsDof);
    }
  }
  const perRecord = DECISION_RULE.falseFailRate;
  // The false-fail rate is said per record, and per spectrum when several are judged (the family).
  const ofFamily = family > 1 ? { about: { family } } : {};

  // Failures the data show, and what else a pass needs.
  const fails: Finding[] = [];
  const blockers: Finding[] = [];
  if (shownOut > allowanceLines) {
    fails.push({
      code: "LINES_OUTSIDE",
      values: { lines: shownOut, judged: m, ...(allowanceLines > 0 ? { allowance: allowanceLines } : {}), falseFailPercent: percent(perRecord) },
      ...ofFamily,
    });
  }
  if (shownOuter > 0) fails.push({ code: "OUTER_LIMIT", values: { lines: shownOuter } });
  if (rmsShown) {
    fails.push({
      code: "RMS_OUTSIDE",
      values: { rms: measuredRms, deviationDb: rmsDev, requiredRms, ...(top < fN ? { fromHz: f0, toHz: top } : {}), upperDb: tol!.upper, lowerDb: tol!.lower } });
  } else if (!rmsOk) {
    blockers.push({ code: "RMS_UNRESOLVED", values: { deviationDb: rmsDev, upperDb: tol!.upper, lowerDb: tol!.lower, dof: rmsDof } });
  }
  if (m === 0) blockers.push({ code: "NO_LINES", values: {} });
  if (required !== undefined && nu < required) {
    const sec = secondsAt(required);
    blockers.push({
      code: "DOF_BELOW_PROFILE", values: { dof: nu, requiredDof: required, ...(sec !== undefined ? { secondsForDof: sec } : {}) } });
  }
  if (m > 0 && requirement !== null && nu < forPower) {
    const sec = secondsAt(forPower);
    blockers.push({
      code: "DOF_BELOW_POWER",
      values: {
        dof: nu, dofForPower: forPower, departureDb: requirement.departureDb, departurePercent: percent(requirement.departureShare), widthLines: requirement.widthLines, lines: m,
        powerPercent: percent(requirement.probability), achievedPowerPercent: percent(power.least), ...(sec !== undefined ? { secondsForPower: sec } : {}),
      },
    });
  }
  const fixedBlockers: Finding[] = [];
  if (fN > nyquist * (1 + 1e-12)) {
    fixedBlockers.push({ code: "RANGE_ABOVE_RECORD", values: { profileTopHz: fN, sampleRateHz: sp.sampleRateHz, nyquistHz: nyquist, linesUnseen: unjudged.aboveRecord } });
  }
  if (m > 0) {
    const gapLow = lines[0]!.frequencyHz - f0;
    const allowed = (kernel.halfWidthBins + 1) * df;
    if (gapLow > allowed) fixedBlockers.push({ code: "RANGE_BELOW_JUDGED", values: { firstLineHz: lines[0]!.frequencyHz, gapHz: gapLow } });
  }
  if (profile.resolutionHz !== undefined && df > profile.resolutionHz * (1 + 1e-9)) {
    fixedBlockers.push({ code: "RESOLUTION_COARSE", values: { lineSpacingHz: df, profileResolutionHz: profile.resolutionHz } });
  }
  if (profile.durationS !== undefined && sp.durationS < profile.durationS * (1 - 1e-9)) {
    const w = sp.analysedWindow;
    blockers.push(w
      ? { code: "DURATION_SHORT", values: { durationS: sp.durationS, requiredDurationS: profile.durationS, fromS: w.fromS, toS: w.toS }}
      : { code: "DURATION_SHORT", values: { durationS: sp.durationS, requiredDurationS: profile.durationS } });
  }
  const rule: RuleReport = {
    falseFailBound: perRecord,
    falseFailAtProfile: Math.min(1, atProfile),
    lineTestLevel: upLevel,
    stretchWidths: widths,
    allowanceLines,
    power,
    dofForPower: forPower,
    requirement,
    powerDefault,
    dofForDefaultPower: forDefault,
    departureSeenShare: departureShare(kernel, (requirement ?? DEFAULT_POWER).widthLines),
    family,
    largestOf: k > 1 && nu > 0 ? { channels: k, meanAllowanceDb: 10 * Math.log10(muNow), effectiveDof: effAt(nu) } : null,
  };
  const allBlockers = [...blockers, ...fixedBlockers];
  const findings = [...fails, ...allBlockers];
  const verdict: Verdict = fails.length > 0 ? "fail" : allBlockers.length > 0 ? "inconclusive" : "pass";

  // How long a run would decide an inconclusive verdict, if the spectrum is what was measured.
  let decide: DecideEstimate | undefined;
  if (verdict === "inconclusive" && m > 0 && nu > 0) {
    const passPossible = fixedBlockers.length === 0;
    const needForPass = Math.max(forPower, required ?? 0);
    // The measured spectrum taken as the truth, over each line's cell: a new run reads it through the
    // window's kernel, c_0 of the line's own cell and c_d of each cell d lines away (departureShare), so a
    // lone outlying line reads about 0.6 of its excess again. The lines outside as read that way count.
    const expectUp: number[] = [];
    const expectLo: number[] = [];
    const outside: number[] = [];
    for (let j = 0; j < m; j++) {
      const i = idx[j]!;
      const e = reread(i);
      const per = e / meanAt(nuAt(i));
      expectUp.push(per / limitsUp[j]!);
      expectLo.push(e / limitsLo[j]!);
      if (per > limitsUp[j]! || e < limitsLo[j]!) outside.push(j);
    }
    const msTrue = measuredMs / muNow;
    const chance = (v: number) => {
      // Lines outside as measured, each at its measured level (per channel: over the largest's mean now).
      let lnNone = 0;
      for (const j of outside) {
        const vj = nuAt(idx[j]!) * (v / nu);
        const f = { up: largestUpperFactor(vj, upLevel, k), lo: lowerFactor(vj, loLevel) };
        let pj: number;
        if (expectUp[j]! > 1) {
          const one = chanceAbove(vj, expectUp[j]!, f.up);
          pj = k > 1 ? -Math.expm1(k * Math.log1p(-Math.min(one, 1 - 1e-16))) : one;
        } else pj = chanceBelow(vj, expectLo[j]!, f.lo);
        lnNone += Math.log1p(-Math.min(pj, 1 - 1e-16)) / inflation;
      }
      const pLines = -Math.expm1(lnNone);
      let pRmsFail = 0;
      let pRmsOk = 1;
      if (tol !== undefined && rmsDof > 0 && msTrue > 0) {
        const vR = rmsDof * (v / nu);
        const vRe = vR * (effAt(v) / v);
        pRmsFail = chanceAbove(vRe, msTrue / hiLimit, upperFactor(vRe, levels.upper.rmsTest)) + chanceBelow(vR, msTrue / loLimit, lowerFactor(vR, levels.lower.rmsTest));
        pRmsOk = Math.max(0, chiSquareCdf((vRe * hiLimit) / msTrue, vRe) - chiSquareCdf((vR * loLimit) / msTrue, vR));
      }
      const pFail = 1 - (1 - pLines) * (1 - Math.min(1, pRmsFail));
      const durationOk = profile.durationS === undefined || (secondsAt(v) ?? 0) >= profile.durationS * (1 - 1e-9);
      const pPass = passPossible && v >= needForPass && durationOk ? (1 - pFail) * pRmsOk : 0;
      return { decided: pFail + pPass, likely: pFail >= pPass ? ("fail" as const) : ("pass" as const) };
    };
    // Doubling, then bisection between the last two points; the DOF a pass needs is tried as well.
    const target = DECIDE_PROBABILITY;
    let found: number | undefined;
    let prev = nu;
    for (let f = 1; f <= 1024; f *= 2) {
      const v = nu * f;
      const cand = needForPass > prev && needForPass <= v ? [needForPass, v] : [v];
      for (const c of cand) {
        if (chance(c).decided >= target) {
          found = c;
          break;
        }
        prev = c;
      }
      if (found !== undefined) break;
    }
    if (found !== undefined && found > nu) {
      let lo = prev;
      let hi = found;
      for (let i = 0; i < 30 && hi / lo > 1.01; i++) {
        const mid = Math.sqrt(lo * hi);
        if (chance(mid).decided >= target) hi = mid;
        else lo = mid;
      }
      found = hi;
    }
    if (found !== undefined) {
      const seconds = secondsAt(found);
      const likely = chance(found).likely;
      decide = { probability: target, dof: found, seconds, likely };
      if (seconds !== undefined) {
        findings.push({
          code: "RUN_TO_DECIDE",
          values: { seconds, dof: found, probabilityPercent: percent(target) },
          about: { likely },
        });
      }
    } else {
      decide = { probability: target, dof: undefined, seconds: undefined, likely: undefined };
      findings.push({
        code: "RUN_TO_DECIDE",
        values: { probabilityPercent: percent(target) },
        about: { passPossible },
      });
    }
  }
  if (unjudged.notch > 0) {
    findings.push({ code: "NOTCH_LINES_LEFT_OUT", values: { lines: unjudged.notch } });
  }
  if (verdict === "pass") {
    const rq = requirement ?? DEFAULT_POWER;
    findings.push({
      code: "PASS",
      values: {
        lines: m, departureDb: rq.departureDb, widthLines: rq.widthLines, powerPercent: percent(power.least), defaultPowerPercent: percent(powerDefault.least),
        falseFailPercent: percent(rule.falseFailAtProfile), recordFalseFailPercent: percent(perRecord),
      },
      about: { requirement: requirement === null ? "none" : requirement.source === "profile" ? "profile" : "default", ...(family > 1 ? { family } : {}) },
    });
  }
  return {
    channel: sp.name, verdict, findings, lines, excursions, unjudged,
    rms: { measured: measuredRms, required: requiredRms, deviationDb: rmsDev, upperDb: tol?.upper, lowerDb: tol?.lower, ok: rmsOk, shown: rmsShown, dof: rmsDof },
    dof: { achieved: nu, required, forPower, ok: dofOk },
    rule,
    ...(decide !== undefined ? { decide } : {}),
  };
}

/**
 * Data-quality doubts (clipping, non-finite samples, a Parseval mismatch, a non-Gaussian amplitude
 * distribution) make any verdict inconclusive: the spectrum itself is in question, so neither a pass nor
 * a fail can rest on it.
 */
export function withDoubts(c: ChannelCompliance, doubts: Finding[]): ChannelCompliance {
  if (doubts.length === 0) return c;
  const note: Finding[] = c.verdict === "fail" ? [{ code: "FAIL_IN_DOUBT", values: {} }] : [];
  // A longer run does not remove a doubt about the data: no run length is promised.
  const findings = [...doubts, ...c.findings.filter((f) => f.code !== "PASS" && f.code !== "RUN_TO_DECIDE"), ...note];
  return { ...c, verdict: "inconclusive", findings, decide: undefined };
}

/**
 * The level gate's findings (compare/levelGate.ts: level swings beyond the tolerance over the run, drift
 * dominating) stop a pass: it becomes INCONCLUSIVE with the reason. A shown failure stays a failure (the
 * average is outside whatever the run did), with the finding added.
 */
export function withGate(c: ChannelCompliance, gate: Finding[]): ChannelCompliance {
  if (gate.length === 0) return c;
  const findings = [...gate, ...c.findings.filter((f) => f.code !== "PASS")];
  return { ...c, verdict: c.verdict === "pass" ? "inconclusive" : c.verdict, findings };
}

/** Excursions ordered by how far their worst line lies beyond its limit, largest first (a copy). */
export function worstFirst(excursions: Excursion[]): Excursion[] {
  return [...excursions].sort((a, b) => Math.abs(b.worstDb - b.limitDb) - Math.abs(a.worstDb - a.limitDb));
}

/** Worst of the channel verdicts: fail over inconclusive over pass. */
export function overallVerdict(vs: Verdict[]): Verdict {
  if (vs.includes("fail")) return "fail";
  if (vs.includes("inconclusive") || vs.length === 0) return "inconclusive";
  return "pass";
}

/** A share in percent, as a finding's values keep it. */
function percent(x: number): number {
  return 100 * x;
}

/** One sine tone of a mixed-mode profile as judged (compare/toneCheck.ts). */
export interface ToneJudgement {
  name: string;
  /** Nominal frequency, Hz, and how far the tone may lie from it. */
  hz: number;
  toleranceHz: number;
  requiredPeak: number;
  /** Fitted peak and frequency. */
  measuredPeak: number;
  measuredHz: number;
  lowerPeak: number;
  upperPeak: number;
  /** 20 log10(measured / required). */
  deviationDb: number;
  /** Standard deviation of the fitted peak and frequency, and the background density they rest on. */
  peakSd: number;
  frequencySd: number;
  backgroundDensity: number;
  /** The lines the tone occupies (left out of the background's judgement). */
  linesFromHz: number;
  linesToHz: number;
  status: "within" | "low" | "high" | "missing" | "off-frequency";
  /** Shown outside its tolerance (peak or frequency) at the tone's level. */
  shown: boolean;
  /** The tone lies at or above the record's Nyquist frequency (with its allowance): not seen, inconclusive. */
  unseen?: boolean | undefined;
  /** Per-test level (each of the tone's four tests), and the tone's share of the false-fail rate. */
  testLevel: number;
  falseFailRate: number;
  verdict: Verdict;
}
