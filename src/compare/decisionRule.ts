import { chiSquareCdf, chiSquareQuantile, chiSquareSurvival, chiSquareUpperQuantile } from "../estimate/chiSquare.js";

/**
 * psdgate's decision rule: when a measured PSD shows a profile is not met, and when the evidence is
 * enough to say it is. The reasoning is in DEVELOPERS.md ("The decision rule"); in short:
 *
 * - Each judged line's Welch estimate is G * chi2(nu) / nu (Bendat & Piersol, Random Data, 4th ed.,
 *   Wiley 2010, ch. 8). A line is *shown* above its upper limit U when G_hat / U exceeds the
 *   chi-square quantile chi2_{1-a}(nu) / nu, and below its lower limit L when G_hat / L falls below
 *   chi2_a(nu) / nu, at a per-test level a = alphaLines / (2 m) for m judged lines (Bonferroni 1936;
 *   Miller, Simultaneous Statistical Inference, 2nd ed., Springer 1981, ch. 1). Whatever the true PSD
 *   inside the bands, the chance that any line is shown outside is then at most alphaLines.
 * - The RMS over the profile's range is shown outside its tolerance the same way, with the
 *   Satterthwaite degrees of freedom of a sum of correlated lines (Satterthwaite 1946, Biometrics
 *   Bulletin 2(6):110-114), at alphaRms split over the two directions.
 * - FAIL when more lines are shown outside than the profile allows, a line is shown beyond an outer
 *   limit, or the RMS is shown outside: a false-fail rate of at most alphaLines + alphaOuter + alphaRms
 *   = 5 % for any true PSD inside the bands with its RMS inside tolerance, at any DOF.
 * - PASS only when no failure is shown and the record had the power to show one: the DOF at which a
 *   departure of `departureDb` beyond the band over `departureShare` of the lines, or an RMS
 *   `rmsBeyondDb` outside its tolerance, would FAIL with probability `power`. Below that DOF (or below
 *   the profile's minDof) an unshown failure gives INCONCLUSIVE, not PASS.
 */
export const DECISION_RULE = {
  /** Family-wise false-fail rate, all tests together. */
  falseFailRate: 0.05,
  /** Its share for the lines against the tolerance band (less `outer` when the profile has outer limits). */
  lines: 0.04,
  /** Its share for the lines against the outer limits, when the profile has them. */
  outer: 0.005,
  /** Its share for the RMS, both directions together. */
  rms: 0.01,
  /** Its share for the sine tones of a mixed-mode profile (taken from the lines' share when the profile has tones; toneCheck.ts). */
  tones: 0.01,
  /** The departure a pass must have been able to see. */
  departureDb: 1.5,
  departureShare: 0.05,
  rmsBeyondDb: 0.5,
  power: 0.95,
} as const;

export interface RuleLevels {
  /** Per-line, per-direction test level against the tolerance band. */
  lineTest: number;
  /** Per-line test level against the outer limits (upper or lower), undefined without outer limits. */
  outerTest: number | undefined;
  /** Per-direction level of the RMS test. */
  rmsTest: number;
}

/**
 * Per-test levels for m judged lines. With the largest of k control channels taken at each line, the
 * upper tests are shared by k estimates (P(max > t) <= k P(one > t)), so their level is divided by k.
 */
export function ruleLevels(lines: number, outerLimits: boolean, upperSharedBy = 1, toneShare = 0): { upper: RuleLevels; lower: RuleLevels } {
  const m = Math.max(1, lines);
  const lineAlpha = DECISION_RULE.lines - (outerLimits ? DECISION_RULE.outer : 0) - toneShare;
  const make = (k: number): RuleLevels => ({
    lineTest: lineAlpha / (2 * m * k),
    outerTest: outerLimits ? DECISION_RULE.outer / (2 * m * k) : undefined,
    rmsTest: DECISION_RULE.rms / (2 * k),
  });
  return { upper: make(upperSharedBy), lower: make(1) };
}

/** G_hat / limit above this factor shows the line above its limit: chi2 upper quantile / nu. */
export function upperFactor(dof: number, level: number): number {
  return chiSquareUpperQuantile(level, dof) / dof;
}

/** G_hat / limit below this factor shows the line below its limit: chi2 lower quantile / nu. */
export function lowerFactor(dof: number, level: number): number {
  return chiSquareQuantile(level, dof) / dof;
}

/** P(chi2(nu)/nu * ratio > factor): the chance an estimate whose true value is `ratio` x the limit exceeds the threshold. */
export function chanceAbove(dof: number, ratio: number, factor: number): number {
  return chiSquareSurvival((dof * factor) / ratio, dof);
}

/** P(chi2(nu)/nu * ratio < factor). */
export function chanceBelow(dof: number, ratio: number, factor: number): number {
  return chiSquareCdf((dof * factor) / ratio, dof);
}

/** P(X >= r) for X ~ Binomial(n, p), by summing the terms (n is at most a few thousand here). */
export function binomialAtLeast(r: number, n: number, p: number): number {
  if (r <= 0) return 1;
  if (r > n) return 0;
  if (p <= 0) return 0;
  if (p >= 1) return 1;
  let term = Math.pow(1 - p, n);
  let below = 0;
  if (term > 0) {
    for (let i = 0; i < r; i++) {
      below += term;
      term *= ((n - i) / (i + 1)) * (p / (1 - p));
    }
    return Math.max(0, Math.min(1, 1 - below));
  }
  // (1 - p)^n underflowed: work in logs from the mode outwards.
  const lnP = Math.log(p);
  const ln1p = Math.log1p(-p);
  let lnC = 0;
  let sum = 0;
  for (let i = 0; i <= n; i++) {
    if (i > 0) lnC += Math.log((n - i + 1) / i);
    if (i >= r) sum += Math.exp(lnC + i * lnP + (n - i) * ln1p);
  }
  return Math.min(1, sum);
}

export interface PowerInputs {
  /** Judged lines. */
  lines: number;
  /** Lines allowed outside the band. */
  allowance: number;
  /** Variance inflation of neighbouring lines (spectralKernel lineVarianceInflation). */
  inflation: number;
  /** nu_rms / nu for this spectrum's shape (Satterthwaite). */
  rmsDofRatio: number;
  outerLimits: boolean;
  upperSharedBy: number;
  /** The tones' share of the lines' alpha (mixed mode), 0 without tones. */
  toneShare?: number | undefined;
}

export interface PowerAt {
  /** Chance of a FAIL for `departureDb` above the band over the departure share of lines. */
  linesAbove: number;
  linesBelow: number;
  rmsAbove: number;
  rmsBelow: number;
  /** The smallest of the four. */
  least: number;
}

/**
 * Power of the rule at a DOF. A departure over n lines (the allowance plus departureShare of the lines)
 * is seen through n / inflation independent looks (neighbouring lines are correlated, so a run of
 * lines is fewer looks: a conservative count); the FAIL needs more than allowance / inflation of them.
 */
export function powerAt(dof: number, p: PowerInputs): PowerAt {
  const lv = ruleLevels(p.lines, p.outerLimits, p.upperSharedBy, p.toneShare ?? 0);
  const g = Math.pow(10, DECISION_RULE.departureDb / 10);
  const n = p.allowance + Math.ceil(DECISION_RULE.departureShare * p.lines);
  const looks = Math.max(1, Math.round(n / p.inflation));
  const need = Math.floor(p.allowance / p.inflation) + 1;
  const up = chanceAbove(dof, g, upperFactor(dof, lv.upper.lineTest));
  const down = chanceBelow(dof, 1 / g, lowerFactor(dof, lv.lower.lineTest));
  const linesAbove = binomialAtLeast(need, looks, up);
  const linesBelow = binomialAtLeast(need, looks, down);
  const nuR = dof * p.rmsDofRatio;
  const r = Math.pow(10, DECISION_RULE.rmsBeyondDb / 10);
  const rmsAbove = chanceAbove(nuR, r, upperFactor(nuR, lv.upper.rmsTest));
  const rmsBelow = chanceBelow(nuR, 1 / r, lowerFactor(nuR, lv.lower.rmsTest));
  return { linesAbove, linesBelow, rmsAbove, rmsBelow, least: Math.min(linesAbove, linesBelow, rmsAbove, rmsBelow) };
}

/** The smallest DOF at which powerAt(...).least reaches DECISION_RULE.power (to 0.5 %), by bisection. */
export function dofForPower(p: PowerInputs): number {
  let lo = 1;
  let hi = 2;
  while (powerAt(hi, p).least < DECISION_RULE.power) {
    lo = hi;
    hi *= 2;
    if (hi > 1e8) return Infinity;
  }
  while (hi / lo > 1.005) {
    const mid = Math.sqrt(lo * hi);
    if (powerAt(mid, p).least >= DECISION_RULE.power) hi = mid;
    else lo = mid;
  }
  return Math.ceil(hi);
}
