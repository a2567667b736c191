import { chiSquareCdf, chiSquareSurvival } from "../estimate/statistics/distributions.js";
import { bandMeanSquare } from "../estimate/spectral/psdEstimate.js";
import type { ToneAllowance } from "./complianceTypes.js";
import { lowerFactor, upperFactor, type RuleLevels } from "./decisionRule.js";
import type { JudgedSpectrum } from "./judgedGrid.js";
import { profileMeanSquare, type TestProfile } from "./testProfile.js";

/**
 * The RMS test of a judgement: the mean square over the profile's range against its tolerance, with the
 * Satterthwaite DOF of a sum of correlated lines, at the rule's RMS share (decisionRule.ts).
 */

/** Satterthwaite DOF of sum_k a_k G_k, lines correlated by rho: nu (sum a)^2 / sum_k sum_j a_k a_j rho_|k-j|. */
export function sumDof(a: Float64Array, n: number, dof: number, rho: Float64Array): number {
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

export interface RmsTest {
  /** The top of the compared range: the profile's, or the record's Nyquist frequency when lower. */
  top: number;
  measuredMs: number;
  measuredRms: number;
  requiredRms: number;
  /** 20 log10(measured / required). */
  deviationDb: number;
  tolerance: { upper: number; lower: number } | undefined;
  /** Within tolerance as measured. */
  ok: boolean;
  /** Shown outside its tolerance by the rule. */
  shown: boolean;
  /** Satterthwaite DOF of the mean square over the range, and its ratio to the lines' DOF. */
  dof: number;
  dofRatio: number;
  /** The largest of k's mean reading at the limit (1 for one spectrum). */
  muNow: number;
  /** The mean-square limits. */
  hiLimit: number;
  loLimit: number;
}

/**
 * RMS over the profile's range, with each end line counted for the part of its cell inside. A record that
 * cannot reach the profile's top is compared over the part it covers.
 */
export function rmsTest(
  js: JudgedSpectrum,
  profile: TestProfile,
  m: number,
  levels: { upper: RuleLevels; lower: RuleLevels },
  tones?: ToneAllowance,
): RmsTest {
  const { sp, f0, fN, nyquist, nu, df, half } = js;
  const top = Math.min(fN, nyquist);
  const requiredRms = Math.sqrt(
    (top < fN ? profileMeanSquare(profile, f0, top) : profile.rms * profile.rms) + (tones?.toneMeanSquare ?? 0),
  );
  const measuredMs = bandMeanSquare(sp, f0, top);
  const measuredRms = Math.sqrt(measuredMs);
  const rmsDev = 20 * Math.log10(measuredRms / requiredRms);
  const tol = profile.rmsToleranceDb;
  const muNow = js.meanAt(nu);
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
  const rmsDof = nu > 0 ? sumDof(contrib, nc, nu, js.kernel.lineCorrelation) : 0;
  const rmsRatio = nu > 0 && rmsDof > 0 ? rmsDof / nu : Math.max(1, m) / js.inflation;
  const ms0 = requiredRms * requiredRms;
  const hiLimit = tol !== undefined ? ms0 * Math.pow(10, tol.upper / 10) : Infinity;
  const loLimit = tol !== undefined ? ms0 * Math.pow(10, -tol.lower / 10) : 0;
  let rmsShown = false;
  if (tol !== undefined && rmsDof > 0 && measuredMs > 0) {
    const rmsDofUp = rmsDof * (js.effAt(nu) / nu);
    rmsShown =
      measuredMs / (hiLimit * muNow) > upperFactor(rmsDofUp, levels.upper.rmsTest) ||
      measuredMs / loLimit < lowerFactor(rmsDof, levels.lower.rmsTest);
  }
  return {
    top,
    measuredMs,
    measuredRms,
    requiredRms,
    deviationDb: rmsDev,
    tolerance: tol,
    ok: rmsOk,
    shown: rmsShown,
    dof: rmsDof,
    dofRatio: rmsRatio,
    muNow,
    hiLimit,
    loLimit,
  };
}

/**
 * The RMS tests' terms of the false-fail rate if the PSD were the profile, upper then lower (none without a
 * tolerance): the caller adds them to the lines' union bound in that order.
 */
export function rmsFalseFailTerms(
  js: JudgedSpectrum,
  r: RmsTest,
  levels: { upper: RuleLevels; lower: RuleLevels },
): number[] {
  const tol = r.tolerance;
  if (tol === undefined || !(r.dof > 0)) return [];
  const rmsDof = r.dof;
  const rmsDofUp = rmsDof * (js.effAt(js.nu) / js.nu);
  return [
    chiSquareSurvival(rmsDofUp * upperFactor(rmsDofUp, levels.upper.rmsTest) * Math.pow(10, tol.upper / 10), rmsDofUp),
    chiSquareCdf(rmsDof * lowerFactor(rmsDof, levels.lower.rmsTest) * Math.pow(10, -tol.lower / 10), rmsDof),
  ];
}
