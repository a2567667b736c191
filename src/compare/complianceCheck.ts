import { chiSquareCdf, chiSquareIntervalFactors, chiSquareSurvival } from "../estimate/chiSquare.js";
import { bandMeanSquare } from "../estimate/psdEstimate.js";
import { detrendBiasedLines, lineVarianceInflation, spectralKernel, type SpectralKernel } from "../estimate/spectralKernel.js";
import type { Detrend } from "../estimate/welchPsd.js";
import { spectralWindow, type WindowName } from "../estimate/windows.js";
import { DECISION_RULE, dofForPower, lowerFactor, powerAt, ruleLevels, upperFactor, type PowerAt } from "./decisionRule.js";
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
  /** For a run not shown: how many times longer a record would show it (same level assumed). */
  longerRecordFactor: number | undefined;
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
  /** Power at the achieved DOF, each case. */
  power: PowerAt;
  /** The DOF at which a pass has the stated power. */
  dofForPower: number;
}

export interface ChannelCompliance {
  channel: string;
  verdict: Verdict;
  reasons: string[];
  findings: Finding[];
  lines: LineDeviation[];
  excursions: Excursion[];
  /** Lines in the profile's range that were not judged, and why. */
  unjudged: { edge: number; detrend: number; aboveRecord: number };
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
  /** With the largest of k control channels taken at each line, k (it shares the upper tests); else 1. */
  upperSharedBy?: number | undefined;
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

function kernelView(k: SpectralKernel, df: number): KernelView {
  const mh = (k.weights.length - 1) / 2;
  const offsetsHz = new Float64Array(k.weights.length);
  for (let j = 0; j < offsetsHz.length; j++) offsetsHz[j] = ((j - mh) / k.oversample) * df;
  return { offsetsHz, weights: k.weights };
}

/**
 * The profile, band limits and outer limits at f seen through the kernel: sum of weight x value at
 * f - offset, with offsets past 0 or fs/2 folded back (the one-sided spectrum of a sampled record).
 * Undefined when any sample falls outside the profile's range: the record's content there is not
 * specified, so the line cannot be held to it (an edge line).
 */
function smoothed(p: TestProfile, kv: KernelView, f: number, nyquist: number, f0: number, fN: number) {
  let req = 0;
  let up = 0;
  let lo = 0;
  let oUp = 0;
  let oLo = 0;
  const tol = 1e-9 * (fN - f0);
  for (let j = 0; j < kv.weights.length; j++) {
    let g = f - kv.offsetsHz[j]!;
    if (g < 0) g = -g;
    if (g > nyquist) g = 2 * nyquist - g;
    if (g < f0 - tol || g > fN + tol) return undefined;
    g = Math.min(fN, Math.max(f0, g));
    const w = kv.weights[j]!;
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
  return { req, up, lo, oUp, oLo };
}

/** Smallest DOF multiple at which `ratio` (measured / limit) would be shown at the per-test level. */
export function longerRecordFactor(ratio: number, dof: number, level: number): number | undefined {
  if (!(dof > 0) || ratio === 1 || !Number.isFinite(ratio) || ratio <= 0) return undefined;
  const shows = (nu: number) => (ratio > 1 ? ratio > upperFactor(nu, level) : ratio < lowerFactor(nu, level));
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
  unjudged: { edge: number; detrend: number };
}

const gridCache = new WeakMap<TestProfile, Map<string, JudgedGrid>>();

/** The judged lines of an analysis grid and the profile and limits each should show. */
function judgedGrid(profile: TestProfile, kernel: SpectralKernel, sp: SpectrumUnderTest, f0: number, fN: number): JudgedGrid {
  const key = `${sp.sampleRateHz}:${sp.segmentLength}:${sp.window}:${sp.detrend}:${sp.frequencyHz.length}`;
  let byProfile = gridCache.get(profile);
  if (!byProfile) gridCache.set(profile, (byProfile = new Map()));
  const hit = byProfile.get(key);
  if (hit) return hit;
  const kv = kernelView(kernel, sp.lineSpacingHz);
  const biased = detrendBiasedLines(kernel);
  const nyquist = sp.sampleRateHz / 2;
  const g: JudgedGrid = { idx: [], req: [], up: [], lo: [], oUp: [], oLo: [], unjudged: { edge: 0, detrend: 0 } };
  for (let i = 1; i < sp.frequencyHz.length; i++) {
    const f = sp.frequencyHz[i]!;
    if (f < f0 || f > fN) continue;
    if (i < biased) {
      g.unjudged.detrend++;
      continue;
    }
    const s = smoothed(profile, kv, f, nyquist, f0, fN);
    if (s === undefined) {
      g.unjudged.edge++;
      continue;
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

export function judgeSpectrum(sp: SpectrumUnderTest, profile: TestProfile): ChannelCompliance {
  const df = sp.lineSpacingHz;
  const nyquist = sp.sampleRateHz / 2;
  const half = sp.psd.length - 1;
  const f0 = profile.breakpoints[0]!.hz;
  const fN = profile.breakpoints[profile.breakpoints.length - 1]!.hz;
  const kernel = spectralKernel(sp.window, spectralWindow(sp.window, sp.segmentLength), sp.detrend);
  const inflation = lineVarianceInflation(kernel);
  const k = sp.upperSharedBy ?? 1;

  // Which lines are judged, and what each should show (cached per profile and analysis grid).
  const grid = judgedGrid(profile, kernel, sp, f0, fN);
  const unjudged = { ...grid.unjudged, aboveRecord: 0 };
  const lines: LineDeviation[] = [];
  const idx = grid.idx;
  const limitsUp = grid.up;
  const limitsLo = grid.lo;
  const outerUp = grid.oUp;
  const outerLo = grid.oLo;
  for (let j = 0; j < idx.length; j++) {
    const i = idx[j]!;
    const req = grid.req[j]!;
    // The Nyquist line's one-sided value is not doubled (so sum P df is the mean square): judge twice it.
    const measured = i === half ? 2 * sp.psd[i]! : sp.psd[i]!;
    const status = measured > limitsUp[j]! ? "above" : measured < limitsLo[j]! || !(measured > 0) ? "below" : "within";
    lines.push({
      frequencyHz: sp.frequencyHz[i]!, measured, required: req, deviationDb: 10 * Math.log10(measured / req),
      upperDb: 10 * Math.log10(limitsUp[j]! / req), lowerDb: -10 * Math.log10(limitsLo[j]! / req), status, shown: false, beyondOuter: false,
    });
  }
  if (fN > nyquist * (1 + 1e-12)) {
    unjudged.aboveRecord = Math.max(0, Math.floor((fN - Math.max(f0, nyquist)) / df));
  }
  const m = lines.length;
  const allowanceLines = Math.floor(((profile.allowedOutsidePercent ?? 0) / 100) * m);
  const outer = profile.outerBands !== undefined;
  const widths = allowanceLines === 0 ? stretchWidths(m) : [];
  const levels = ruleLevels(m, outer, k);
  // Single lines get the line alpha less the stretches' share; each stretch width an equal part of that share.
  const singleShare = widths.length > 0 ? 1 - STRETCH_SHARE : 1;
  const upLevel = levels.upper.lineTest * singleShare;
  const loLevel = levels.lower.lineTest * singleShare;
  const nu = sp.dof;
  const nuAt = (i: number) => (i === half ? nu / 2 : nu);
  const factorCache = new Map<number, { up: number; lo: number }>();
  const factors = (v: number) => {
    let f = factorCache.get(v);
    if (!f) {
      f = { up: upperFactor(v, upLevel), lo: lowerFactor(v, loLevel) };
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
      if (outer) {
        const oUpF = upperFactor(nuAt(idx[j]!), levels.upper.outerTest!);
        const oLoF = lowerFactor(nuAt(idx[j]!), levels.lower.outerTest!);
        if (l.measured / outerUp[j]! > oUpF || l.measured / outerLo[j]! < oLoF) l.beyondOuter = true;
      }
    }
    // Stretches of w neighbouring lines, every w/2 lines: the mean of measured / limit, with the
    // DOF of a sum of correlated lines (Satterthwaite), Bonferroni over the stretches of each width.
    for (const w of widths) {
      let c = 1;
      for (let d = 1; d < Math.min(w, kernel.lineCorrelation.length); d++) c += 2 * (1 - d / w) * kernel.lineCorrelation[d]!;
      const nuW = (nu * w) / c;
      const count = Math.max(1, Math.floor((m - w) / (w / 2)) + 1);
      // This width's part of the stretches' share, over its `count` stretches (per direction).
      const part = (m * STRETCH_SHARE) / (widths.length * count);
      const upF = upperFactor(nuW, levels.upper.lineTest * part);
      const loF = lowerFactor(nuW, levels.lower.lineTest * part);
      for (let s = 0; s + w <= m; s += w / 2) {
        let ru = 0;
        let rl = 0;
        for (let j = s; j < s + w; j++) {
          ru += lines[j]!.measured / limitsUp[j]!;
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

  // Excursions: runs of neighbouring lines outside the band as measured.
  const excursions: Excursion[] = [];
  const plain = nu > 0 ? chiSquareIntervalFactors(nu, sp.confidence) : { lower: 0, upper: Infinity };
  const tests = 2 * Math.max(1, m);
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
    const p = v > 0 ? (above ? chiSquareSurvival(v * ratio, v) : chiSquareCdf(v * ratio, v)) : 1;
    excursions.push({
      fromHz: l.frequencyHz, toHz: lines[j]!.frequencyHz, direction: l.status as "above" | "below", lines: j - i + 1,
      worstDb: w.deviationDb, worstHz: w.frequencyHz, limitDb: above ? w.upperDb : -w.lowerDb,
      clear: above ? ratio * plain.lower > 1 : ratio * plain.upper < 1,
      shown, adjustedP: Math.min(1, p * tests * (above ? k : 1)),
      longerRecordFactor: shown ? undefined : longerRecordFactor(ratio, v, above ? upLevel : loLevel),
    });
    i = j + 1;
  }

  // RMS over the profile's range, with each end line counted for the part of its cell inside.
  // A record that cannot reach the profile's top is compared over the part it covers.
  const top = Math.min(fN, nyquist);
  const requiredRms = top < fN ? Math.sqrt(profileMeanSquare(profile, f0, top)) : profile.rms;
  const measuredMs = bandMeanSquare(sp, f0, top);
  const measuredRms = Math.sqrt(measuredMs);
  const rmsDev = 20 * Math.log10(measuredRms / requiredRms);
  const tol = profile.rmsToleranceDb;
  const rmsOk = tol === undefined || (rmsDev <= tol.upper && rmsDev >= -tol.lower);
  // Each line's contribution to that mean square, for the Satterthwaite DOF of the sum.
  const contrib = new Float64Array(half + 1);
  let nc = 0;
  for (let i = 0; i <= half; i++) {
    const lo = Math.max(f0, (i - 0.5) * df);
    const hi = Math.min(top, (i + 0.5) * df);
    if (hi > lo) contrib[nc++] = bandMeanSquare(sp, lo, hi);
  }
  const rmsDof = nu > 0 ? sumDof(contrib, nc, nu, kernel.lineCorrelation) : 0;
  let rmsShown = false;
  if (tol !== undefined && rmsDof > 0 && measuredMs > 0) {
    const ms0 = requiredRms * requiredRms;
    const hiLimit = ms0 * Math.pow(10, tol.upper / 10);
    const loLimit = ms0 * Math.pow(10, -tol.lower / 10);
    rmsShown = measuredMs / hiLimit > upperFactor(rmsDof, levels.upper.rmsTest) || measuredMs / loLimit < lowerFactor(rmsDof, levels.lower.rmsTest);
  }

  // Power and the DOF a pass needs.
  const powerInputs = { lines: Math.max(1, m), allowance: allowanceLines, inflation, rmsDofRatio: nu > 0 && rmsDof > 0 ? rmsDof / nu : Math.max(1, m) / inflation, outerLimits: outer, upperSharedBy: k };
  const forPower = dofForPower(powerInputs);
  const power = powerAt(Math.max(nu, 1e-9), powerInputs);
  const required = profile.minDof;
  const dofOk = nu >= (required ?? 0) && nu >= forPower;

  // The false-fail rate if the PSD were the profile: union bound over every test at G = required.
  let atProfile = 0;
  if (nu > 0) {
    for (let j = 0; j < m; j++) {
      const f = factors(nuAt(idx[j]!));
      const v = nuAt(idx[j]!);
      atProfile += chiSquareSurvival((v * f.up * limitsUp[j]!) / lines[j]!.required, v) + chiSquareCdf((v * f.lo * limitsLo[j]!) / lines[j]!.required, v);
    }
    if (tol !== undefined && rmsDof > 0) {
      atProfile += chiSquareSurvival(rmsDof * upperFactor(rmsDof, levels.upper.rmsTest) * Math.pow(10, tol.upper / 10), rmsDof);
      atProfile += chiSquareCdf(rmsDof * lowerFactor(rmsDof, levels.lower.rmsTest) * Math.pow(10, -tol.lower / 10), rmsDof);
    }
  }

  // Failures the data show, and what else a pass needs.
  const fails: Finding[] = [];
  const blockers: Finding[] = [];
  if (shownOut > allowanceLines) {
    fails.push({
      code: "LINES_OUTSIDE",
      values: { lines: shownOut, judged: m, ...(allowanceLines > 0 ? { allowance: allowanceLines } : {}), falseFailPercent: percent(DECISION_RULE.falseFailRate) },
      text: `${shownOut} of ${m} lines shown outside their tolerance band${allowanceLines > 0 ? ` (the profile allows ${allowanceLines})` : ""}, beyond what chance among all lines explains (false-fail rate at most ${pct(DECISION_RULE.falseFailRate)})`,
    });
  }
  if (shownOuter > 0) fails.push({ code: "OUTER_LIMIT", values: { lines: shownOuter }, text: `${shownOuter} line(s) shown beyond the outer limits, which no line may cross` });
  if (rmsShown) {
    fails.push({
      code: "RMS_OUTSIDE",
      values: { rms: measuredRms, deviationDb: rmsDev, requiredRms, ...(top < fN ? { fromHz: f0, toHz: top } : {}), upperDb: tol!.upper, lowerDb: tol!.lower },
      text: `RMS ${measuredRms.toPrecision(4)} is ${signed(rmsDev)} dB from the required ${requiredRms.toPrecision(4)}${top < fN ? ` (over the ${f0}–${top} Hz the record covers)` : ""}, shown outside the allowed +${tol!.upper.toFixed(2)} / -${tol!.lower.toFixed(2)} dB` });
  } else if (!rmsOk) {
    blockers.push({ code: "RMS_UNRESOLVED", values: { deviationDb: rmsDev, upperDb: tol!.upper, lowerDb: tol!.lower, dof: rmsDof }, text: `RMS ${signed(rmsDev)} dB is outside the allowed +${tol!.upper.toFixed(2)} / -${tol!.lower.toFixed(2)} dB as measured, but within what chance explains at ${rmsDof.toFixed(0)} DOF` });
  }
  if (m === 0) blockers.push({ code: "NO_LINES", values: {}, text: "no spectral line of the record can be judged inside the profile's range" });
  if (required !== undefined && nu < required) {
    blockers.push({ code: "DOF_BELOW_PROFILE", values: { dof: nu, requiredDof: required }, text: `degrees of freedom ${nu.toFixed(1)} below the required ${required}: record too short for the statistical accuracy the profile asks` });
  }
  if (m > 0 && nu < forPower) {
    blockers.push({
      code: "DOF_BELOW_POWER",
      values: {
        dof: nu, dofForPower: forPower, departureDb: DECISION_RULE.departureDb, departurePercent: percent(DECISION_RULE.departureShare), lines: m,
        powerPercent: percent(DECISION_RULE.power), achievedPowerPercent: percent(power.least),
      },
      text: `degrees of freedom ${nu.toFixed(1)} below the ${forPower} at which a ${DECISION_RULE.departureDb} dB departure beyond the band over ${pct(DECISION_RULE.departureShare)} of the ${m} lines would be seen with ${pct(DECISION_RULE.power)} probability (here ${pct(power.least)})`,
    });
  }
  if (fN > nyquist * (1 + 1e-12)) {
    blockers.push({ code: "RANGE_ABOVE_RECORD", values: { profileTopHz: fN, sampleRateHz: sp.sampleRateHz, nyquistHz: nyquist, linesUnseen: unjudged.aboveRecord }, text: `the profile runs to ${fN} Hz but the record's sample rate ${sp.sampleRateHz} Hz shows only up to ${nyquist} Hz: ${unjudged.aboveRecord} line(s) of the profile cannot be seen` });
  }
  if (m > 0) {
    const gapLow = lines[0]!.frequencyHz - f0;
    const allowed = (kernel.halfWidthBins + 1) * df;
    if (gapLow > allowed) blockers.push({ code: "RANGE_BELOW_JUDGED", values: { firstLineHz: lines[0]!.frequencyHz, gapHz: gapLow }, text: `the first judged line is ${lines[0]!.frequencyHz} Hz, ${gapLow.toPrecision(3)} Hz above the profile's start (lines below are biased by detrending or leakage): the analysis cannot show the bottom of the range; use a finer resolution or no detrending` });
  }
  if (profile.resolutionHz !== undefined && df > profile.resolutionHz * (1 + 1e-9)) {
    blockers.push({ code: "RESOLUTION_COARSE", values: { lineSpacingHz: df, profileResolutionHz: profile.resolutionHz }, text: `line spacing ${df.toPrecision(4)} Hz is coarser than the profile's resolution ${profile.resolutionHz} Hz: narrow excursions could hide between lines` });
  }
  if (profile.durationS !== undefined && sp.durationS < profile.durationS * (1 - 1e-9)) {
    const w = sp.analysedWindow;
    blockers.push(w
      ? { code: "DURATION_SHORT", values: { durationS: sp.durationS, requiredDurationS: profile.durationS, fromS: w.fromS, toS: w.toS }, text: `the analysed window ${w.fromS.toFixed(3)} to ${w.toS.toFixed(3)} s lasts ${sp.durationS.toFixed(2)} s, shorter than the ${profile.durationS} s the profile requires: it cannot show the whole test` }
      : { code: "DURATION_SHORT", values: { durationS: sp.durationS, requiredDurationS: profile.durationS }, text: `the record lasts ${sp.durationS.toFixed(2)} s, shorter than the ${profile.durationS} s the profile requires: it cannot show the whole test` });
  }

  const rule: RuleReport = {
    falseFailBound: DECISION_RULE.falseFailRate,
    falseFailAtProfile: Math.min(1, atProfile),
    lineTestLevel: upLevel,
    stretchWidths: widths,
    allowanceLines,
    power,
    dofForPower: forPower,
  };
  const findings = [...fails, ...blockers];
  const verdict: Verdict = fails.length > 0 ? "fail" : blockers.length > 0 ? "inconclusive" : "pass";
  if (verdict === "pass") findings.push({
    code: "PASS",
    values: { lines: m, departureDb: DECISION_RULE.departureDb, powerPercent: percent(power.least), falseFailPercent: percent(rule.falseFailAtProfile) },
    text: `no line and not the RMS shown outside tolerance across ${m} lines, with the power to see a ${DECISION_RULE.departureDb} dB departure (${pct(power.least)}); false-fail rate here ${pctSmall(rule.falseFailAtProfile)} if the PSD equals the profile` });
  return {
    channel: sp.name, verdict, reasons: findings.map((f) => f.text), findings, lines, excursions, unjudged,
    rms: { measured: measuredRms, required: requiredRms, deviationDb: rmsDev, upperDb: tol?.upper, lowerDb: tol?.lower, ok: rmsOk, shown: rmsShown, dof: rmsDof },
    dof: { achieved: nu, required, forPower, ok: dofOk },
    rule,
  };
}

/**
 * Data-quality doubts (clipping, non-finite samples, a Parseval mismatch, a non-Gaussian amplitude
 * distribution) make any verdict inconclusive: the spectrum itself is in question, so neither a pass nor
 * a fail can rest on it.
 */
export function withDoubts(c: ChannelCompliance, doubts: Finding[]): ChannelCompliance {
  if (doubts.length === 0) return c;
  const note: Finding[] = c.verdict === "fail" ? [{ code: "FAIL_IN_DOUBT", values: {}, text: "a failure was shown, but the data are in doubt (above), so it cannot stand as a verdict" }] : [];
  const findings = [...doubts, ...c.findings.filter((f) => f.code !== "PASS"), ...note];
  return { ...c, verdict: "inconclusive", findings, reasons: findings.map((f) => f.text) };
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

function pct(x: number): string {
  return `${Number(percent(x).toPrecision(3))} %`;
}

/** A share in percent, as a finding's values keep it. */
function percent(x: number): number {
  return 100 * x;
}

function pctSmall(x: number): string {
  return x < 1e-4 ? "below 0.01 %" : pct(x);
}

function signed(x: number): string {
  return `${x >= 0 ? "+" : ""}${x.toFixed(2)}`;
}
