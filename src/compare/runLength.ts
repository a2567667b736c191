import { chiSquareCdf } from "../estimate/statistics/distributions.js";
import { departureShare, type SpectralKernel } from "../estimate/spectral/spectralKernel.js";
import { welchDofBySegments } from "../estimate/spectral/welchDof.js";
import { spectralWindow } from "../estimate/spectral/windows.js";
import type { Finding } from "../findings.js";
import type { DecideEstimate, SpectrumUnderTest } from "./complianceTypes.js";
import {
  chanceAbove,
  chanceBelow,
  largestChance,
  largestUpperFactor,
  lowerFactor,
  upperFactor,
} from "./decisionRule.js";
import type { JudgedSpectrum } from "./judgedGrid.js";
import type { LineTestLevels } from "./lineTests.js";
import { percent } from "./percent.js";
import type { RmsTest } from "./rmsTest.js";

/**
 * Run lengths: how long a record would have to be to show a line as measured (longerRecordFactor), to reach a
 * DOF (secondsForDof), or to decide an inconclusive verdict (decideRunLength), if the spectrum is what was
 * measured.
 */

/** The probability a run-length estimate aims at (chosen here; the 90 %). */
export const DECIDE_PROBABILITY = 0.9;

const dofCurves = new Map<string, (segments: number) => number>();

/**
 * Seconds of record that give `dof` at this sample rate, segment and overlap: the fewest segments K whose
 * Welch DOF (welchDof, Percival & Walden 1993 eq. 292b) reaches it, then (K - 1) hop + N samples.
 */
export function secondsForDof(
  sp: Pick<SpectrumUnderTest, "window" | "segmentLength" | "overlap" | "sampleRateHz">,
  dof: number,
): number | undefined {
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
 * Smallest DOF multiple at which a line whose true level is `ratio` x its limit would be shown at the
 * per-test level with at least `probability` (0.9 by default; 0.5 is where the expected estimate just
 * reaches the threshold). With `k` > 1 (above, the largest of k channels each at that level), the chance
 * is 1 - (1 - P1)^k. Undefined for a line on or inside its limit, or past 1e6 times the DOF.
 */
export function longerRecordFactor(
  ratio: number,
  dof: number,
  level: number,
  probability = DECIDE_PROBABILITY,
  k = 1,
): number | undefined {
  if (!(dof > 0) || ratio === 1 || !Number.isFinite(ratio) || ratio <= 0) return undefined;
  const chance = (nu: number) => {
    if (ratio > 1) {
      const one = chanceAbove(nu, ratio, largestUpperFactor(nu, level, k));
      return largestChance(one, k);
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

/**
 * The measured spectrum taken as the truth over each line's cell, read again through the window's kernel (what
 * a new run would show on average): c_0 of the line's own cell, c_d of each cell d lines away (departureShare).
 */
export function kernelReread(kernel: SpectralKernel, sp: Pick<SpectrumUnderTest, "psd">): (i: number) => number {
  const half = sp.psd.length - 1;
  const cellShare: number[] = [departureShare(kernel, 1)];
  for (let d = 1; d <= kernel.wideHalfWidthBins; d++)
    cellShare.push((departureShare(kernel, 2 * d + 1) - departureShare(kernel, 2 * d - 1)) / 2);
  return (i: number) => {
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
}

/** What an inconclusive verdict's run length rests on besides the judged spectrum. */
export interface DecideInputs {
  tests: LineTestLevels;
  rms: RmsTest;
  /** The DOF a pass needs (power and the profile's minDof), and whether a longer run can pass at all. */
  needForPass: number;
  passPossible: boolean;
  /** The profile's duration, s, when it states one. */
  durationS: number | undefined;
  reread: (i: number) => number;
  secondsAt: (v: number | undefined) => number | undefined;
}

/**
 * The chance that a run of v DOF decides the verdict, if the spectrum is as measured: P(fail) from the lines
 * outside as read again through the kernel (1 - prod (1 - p_j)^(1/inflation)) and the RMS tests; P(pass) =
 * (1 - P(fail)) P(RMS inside as measured), once the DOF a pass needs and the profile's duration are reached.
 */
function decideChance(
  js: JudgedSpectrum,
  d: DecideInputs,
): (v: number) => { decided: number; likely: "pass" | "fail" } {
  const { nu, k, idx, limitsUp, limitsLo, inflation } = js;
  const { tests: t, rms } = d;
  // The measured spectrum taken as the truth, over each line's cell: a new run reads it through the
  // window's kernel, c_0 of the line's own cell and c_d of each cell d lines away (departureShare), so a
  // lone outlying line reads about 0.6 of its excess again. The lines outside as read that way count.
  const expectUp: number[] = [];
  const expectLo: number[] = [];
  const outside: number[] = [];
  for (let j = 0; j < idx.length; j++) {
    const i = idx[j]!;
    const e = d.reread(i);
    const per = e / js.meanAt(js.nuAt(i));
    expectUp.push(per / limitsUp[j]!);
    expectLo.push(e / limitsLo[j]!);
    if (per > limitsUp[j]! || e < limitsLo[j]!) outside.push(j);
  }
  const msTrue = rms.measuredMs / rms.muNow;
  const { hiLimit, loLimit, tolerance: tol } = rms;
  return (v: number) => {
    // Lines outside as measured, each at its measured level (per channel: over the largest's mean now).
    let lnNone = 0;
    for (const j of outside) {
      const vj = js.nuAt(idx[j]!) * (v / nu);
      const f = { up: largestUpperFactor(vj, t.upLevel, k), lo: lowerFactor(vj, t.loLevel) };
      let pj: number;
      if (expectUp[j]! > 1) {
        const one = chanceAbove(vj, expectUp[j]!, f.up);
        pj = largestChance(one, k);
      } else pj = chanceBelow(vj, expectLo[j]!, f.lo);
      lnNone += Math.log1p(-Math.min(pj, 1 - 1e-16)) / inflation;
    }
    const pLines = -Math.expm1(lnNone);
    let pRmsFail = 0;
    let pRmsOk = 1;
    if (tol !== undefined && rms.dof > 0 && msTrue > 0) {
      const vR = rms.dof * (v / nu);
      const vRe = vR * (js.effAt(v) / v);
      pRmsFail =
        chanceAbove(vRe, msTrue / hiLimit, upperFactor(vRe, t.levels.upper.rmsTest)) +
        chanceBelow(vR, msTrue / loLimit, lowerFactor(vR, t.levels.lower.rmsTest));
      pRmsOk = Math.max(0, chiSquareCdf((vRe * hiLimit) / msTrue, vRe) - chiSquareCdf((vR * loLimit) / msTrue, vR));
    }
    const pFail = 1 - (1 - pLines) * (1 - Math.min(1, pRmsFail));
    const durationOk = d.durationS === undefined || (d.secondsAt(v) ?? 0) >= d.durationS * (1 - 1e-9);
    const pPass = d.passPossible && v >= d.needForPass && durationOk ? (1 - pFail) * pRmsOk : 0;
    return { decided: pFail + pPass, likely: pFail >= pPass ? ("fail" as const) : ("pass" as const) };
  };
}

/**
 * How long a run would decide an inconclusive verdict, if the spectrum is what was measured: doubling up to
 * 1024 times this run, then bisection between the last two points; the DOF a pass needs is tried as well.
 * Returns the estimate and its RUN_TO_DECIDE finding (none when the run length has no seconds to give).
 */
export function decideRunLength(
  js: JudgedSpectrum,
  d: DecideInputs,
): { decide: DecideEstimate; finding: Finding | undefined } {
  const nu = js.nu;
  const chance = decideChance(js, d);
  const needForPass = d.needForPass;
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
  if (found === undefined) {
    return {
      decide: { probability: target, dof: undefined, seconds: undefined, likely: undefined },
      finding: {
        code: "RUN_TO_DECIDE",
        values: { probabilityPercent: percent(target) },
        about: { passPossible: d.passPossible },
      },
    };
  }
  const seconds = d.secondsAt(found);
  const likely = chance(found).likely;
  const decide: DecideEstimate = { probability: target, dof: found, seconds, likely };
  if (seconds === undefined) return { decide, finding: undefined };
  return {
    decide,
    finding: {
      code: "RUN_TO_DECIDE",
      values: { seconds, dof: found, probabilityPercent: percent(target) },
      about: { likely },
    },
  };
}
