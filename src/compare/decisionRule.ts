import {
  binomialAtLeast,
  chiSquareCdf,
  chiSquareQuantile,
  chiSquareSurvival,
  chiSquareUpperQuantile,
} from "../estimate/statistics/distributions.js";

/**
 * psdgate's decision rule: when a measured PSD shows a profile is not met, and when the evidence is
 * enough to say it is. The reasoning is in DEVELOPERS.md ("The decision rule"); in short:
 *
 * - Each judged line's Welch estimate is G * chi2(nu) / nu (Bendat & Piersol, Random Data, 4th ed.,
 *   Wiley 2010, ch. 8). A line is *shown* above its upper limit U when G_hat / U exceeds the
 *   chi-square quantile chi2_{1-a}(nu) / nu, and below its lower limit L when G_hat / L falls below
 * chi2_a(nu) / nu, at a per-test level a = alphaLines (less the stretches' share, `stretchShare`) / (2 m) for m judged
 * lines (Bonferroni 1936;
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
  /** Family-wise false-fail rate per record: all tests over every spectrum the record's verdict rests on. */
  falseFailRate: 0.05,
  /** Its share for the lines against the tolerance band (less `outer` when the profile has outer limits). */
  lines: 0.04,
  /**
   * The part of the lines' share given to stretches of neighbouring lines (4, 16 and 64), when any are tested
   * (none with an allowance): single lines get the rest, 3 % of the 4 %.
   */
  stretchShare: 0.25,
  /** Its share for the lines against the outer limits, when the profile has them. */
  outer: 0.005,
  /** Its share for the RMS, both directions together. */
  rms: 0.01,
  /**
   * Its share for the sine tones of a mixed-mode profile (taken from the lines' share when the profile has tones;
   * toneCheck.ts).
   */
  tones: 0.01,
  /** The departure a pass must have been able to see (psdgate's default power requirement). */
  departureDb: 1.5,
  departureShare: 0.05,
  /**
   * The narrowest departure the power covers, in neighbouring lines: the departure is seen through the window's kernel
   * at that width.
   */
  departureWidthLines: 3,
  rmsBeyondDb: 0.5,
  power: 0.95,
} as const;

/**
 * What a pass must have been able to see: a departure `departureDb` beyond the band over `departureShare`
 * of the judged lines, in runs at least `widthLines` wide, or an RMS `rmsBeyondDb` outside its tolerance,
 * each failing with probability at least `probability`. psdgate's default is DEFAULT_POWER; a profile may
 * state its own (read/profileFile.ts `power`), or none.
 */
export interface PowerRequirement {
  departureDb: number;
  departureShare: number;
  widthLines: number;
  rmsBeyondDb: number;
  probability: number;
}

export const DEFAULT_POWER: PowerRequirement = {
  departureDb: DECISION_RULE.departureDb,
  departureShare: DECISION_RULE.departureShare,
  widthLines: DECISION_RULE.departureWidthLines,
  rmsBeyondDb: DECISION_RULE.rmsBeyondDb,
  probability: DECISION_RULE.power,
};

export interface RuleLevels {
  /** Per-line, per-direction test level against the tolerance band. */
  lineTest: number;
  /** Per-line test level against the outer limits (upper or lower), undefined without outer limits. */
  outerTest: number | undefined;
  /** Per-direction level of the RMS test. */
  rmsTest: number;
}

/**
 * Per-test levels for m judged lines, in a record whose verdict rests on `family` spectra (every judged
 * channel without control; the one control spectrum with it). The record's 5 % is split evenly over the
 * spectra (Bonferroni), so the rate holds per record, whatever the number of channels. The largest of k
 * control channels does not change the levels: its tests use the distribution of the largest
 * (largestUpperFactor, largestOfMoments).
 */
export function ruleLevels(
  lines: number,
  outerLimits: boolean,
  family = 1,
  toneShare = 0,
): { upper: RuleLevels; lower: RuleLevels } {
  const m = Math.max(1, lines);
  const n = Math.max(1, family);
  const lineAlpha = DECISION_RULE.lines - (outerLimits ? DECISION_RULE.outer : 0) - toneShare;
  const make = (): RuleLevels => ({
    lineTest: lineAlpha / (2 * m * n),
    outerTest: outerLimits ? DECISION_RULE.outer / (2 * m * n) : undefined,
    rmsTest: DECISION_RULE.rms / (2 * n),
  });
  return { upper: make(), lower: make() };
}

/**
 * The largest of k independent estimates G chi2(nu)/nu has the CDF F(nu y / G)^k, F the chi-square CDF
 * (the distribution of a maximum of independent variates: David & Nagaraja, Order Statistics, 3rd ed.,
 * Wiley 2003, sec. 2.1). For channels of one test (driven by one input, so positively dependent)
 * P(max <= y) >= F^k, as it is for associated variates (Esary, Proschan & Walkup 1967, Ann. Math. Statist.
 * 38:1466): the independent case bounds the upper tail. tests/compare/largestOf.montecarlo.test.ts checks it
 * on correlated channels too.
 * This factor is the threshold on max / limit whose chance of being exceeded at the limit is `level`:
 * 1 - F(nu t)^k = level.
 */
export function largestUpperFactor(dof: number, level: number, k: number): number {
  if (k <= 1) return upperFactor(dof, level);
  return chiSquareUpperQuantile(-Math.expm1(Math.log1p(-level) / k), dof) / dof;
}

const momentCache = new Map<string, { mean: number; variance: number }>();

/**
 * Mean and variance of Y = the largest of k independent chi2(nu)/nu: E[Y] = integral of (1 - F(nu y)^k) dy
 * and E[Y^2] = integral of 2 y (1 - F(nu y)^k) dy over y > 0 (the tail-integral form of a moment of a
 * non-negative variate), by Simpson's rule on 4000 intervals up to the 1e-15 upper point of Y. For k = 1
 * this gives 1 and 2/nu (held in the test).
 */
export function largestOfMoments(dof: number, k: number): { mean: number; variance: number } {
  if (k <= 1) return { mean: 1, variance: 2 / dof };
  const key = `${dof}:${k}`;
  const hit = momentCache.get(key);
  if (hit) return hit;
  const top = largestUpperFactor(dof, 1e-15, k);
  const n = 4000;
  const h = top / n;
  let s1 = 0;
  let s2 = 0;
  for (let i = 0; i <= n; i++) {
    const y = i * h;
    const q = chiSquareSurvival(dof * y, dof);
    const tail = -Math.expm1(k * Math.log1p(-Math.min(q, 1 - 1e-300)));
    const wgt = i === 0 || i === n ? 1 : i % 2 ? 4 : 2;
    s1 += wgt * tail;
    s2 += wgt * 2 * y * tail;
  }
  const mean = (s1 * h) / 3;
  const variance = (s2 * h) / 3 - mean * mean;
  const out = { mean, variance };
  if (momentCache.size > 256) momentCache.clear();
  momentCache.set(key, out);
  return out;
}

/**
 * The largest-of spectrum normalised by its mean at the limit, Y / E[Y], has relative variance
 * var / mean^2; a chi-square of nu_eff = 2 mean^2 / var DOF has the same two moments (Satterthwaite's
 * matching, 1946). Sums of such lines (stretches, the RMS) are tested with nu_eff in place of nu.
 */
export function largestEffectiveDof(dof: number, k: number): number {
  if (k <= 1) return dof;
  const m = largestOfMoments(dof, k);
  return (2 * m.mean * m.mean) / m.variance;
}

/**
 * The chance that the largest of k channels shows what one channel shows with chance p: 1 - (1 - p)^k, in
 * logs (exact for independent channels, a bound for channels of one test: largestUpperFactor). p itself for k = 1.
 */
export function largestChance(p: number, k: number): number {
  return k > 1 ? -Math.expm1(k * Math.log1p(-Math.min(p, 1 - 1e-16))) : p;
}

/** G_hat / limit above this factor shows the line above its limit: chi2 upper quantile / nu. */
export function upperFactor(dof: number, level: number): number {
  return chiSquareUpperQuantile(level, dof) / dof;
}

/** G_hat / limit below this factor shows the line below its limit: chi2 lower quantile / nu. */
export function lowerFactor(dof: number, level: number): number {
  return chiSquareQuantile(level, dof) / dof;
}

/**
 * P(chi2(nu)/nu * ratio > factor): the chance an estimate whose true value is `ratio` x the limit exceeds the
 * threshold.
 */
export function chanceAbove(dof: number, ratio: number, factor: number): number {
  return chiSquareSurvival((dof * factor) / ratio, dof);
}

/** P(chi2(nu)/nu * ratio < factor). */
export function chanceBelow(dof: number, ratio: number, factor: number): number {
  return chiSquareCdf((dof * factor) / ratio, dof);
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
  /** The largest of this many control channels is judged (1: one spectrum). */
  upperSharedBy: number;
  /** Spectra the record's verdict rests on (ruleLevels `family`); 1 when absent. */
  family?: number | undefined;
  /** The tones' share of the lines' alpha (mixed mode), 0 without tones. */
  toneShare?: number | undefined;
  /** The single lines' part of the line alpha (the rest goes to the stretches); 1 when absent. */
  singleLineShare?: number | undefined;
  /**
   * The kernel's weight on a departure `widthLines` wide, centred on a line (spectralKernel
   * `departureShare`): how much of it the centre line sees. Absent: 1 (the departure seen whole).
   */
  seenShare?: ((widthLines: number) => number) | undefined;
  /**
   * The widest band, dB, each side: the rest of a run's kernel is taken at the profile's level, the worst case for the
   * centre line.
   */
  widestUpperDb?: number | undefined;
  widestLowerDb?: number | undefined;
}

export interface PowerAt {
  /** Chance of a FAIL for the departure above the band over the departure share of lines. */
  linesAbove: number;
  linesBelow: number;
  rmsAbove: number;
  rmsBelow: number;
  /** The smallest of the four. */
  least: number;
}

/**
 * Power of the rule at a DOF against a requirement. A departure over n lines (the allowance plus the
 * requirement's share of the lines) lies in runs of `widthLines` lines; each run's centre line sees it
 * through the window's kernel: share s on the departure (g beyond the band), 1 - s on its surroundings,
 * taken at the profile's level (the worst case inside the band for the centre line). The centre lines of
 * the runs are independent looks (runs at least the kernel's width apart: a conservative count, and
 * never more looks than n / inflation); the FAIL needs more than allowance / inflation of them shown.
 * The other lines of a run and the stretches only add power.
 */
export function powerAt(dof: number, p: PowerInputs, req: PowerRequirement = DEFAULT_POWER): PowerAt {
  const lv = ruleLevels(p.lines, p.outerLimits, p.family ?? 1, p.toneShare ?? 0);
  const k = p.upperSharedBy;
  const g = Math.pow(10, req.departureDb / 10);
  const s = p.seenShare ? p.seenShare(req.widthLines) : 1;
  const bu = Math.pow(10, (p.widestUpperDb ?? 0) / 10);
  const bl = Math.pow(10, (p.widestLowerDb ?? 0) / 10);
  // Seen / limit at the centre line: above, (s g U + (1 - s) U / bu) / U; below, (s L / g + (1 - s) L bl) / L.
  const seenUp = s * g + (1 - s) / bu;
  const seenDown = s / g + (1 - s) * bl;
  const n = p.allowance + Math.ceil(req.departureShare * p.lines);
  const looks = Math.max(1, Math.floor(n / Math.max(req.widthLines, p.inflation)));
  const need = Math.floor(p.allowance / p.inflation) + 1;
  // With the largest of k control channels, the departure is taken on every one of them alike: the largest
  // shows a line above its threshold unless all k stay below it, 1 - (1 - P1)^k.
  const single = p.singleLineShare ?? 1;
  const one = chanceAbove(dof, seenUp, largestUpperFactor(dof, lv.upper.lineTest * single, k));
  const up = largestChance(one, k);
  // Below, the largest shows a line under its threshold only when all k do: P1^k for independent channels, the least
  // any correlation between them gives (each channel's event is a symmetric convex set of one Gaussian record: the
  // Gaussian correlation inequality, Royen 2014), as the upper side takes the independent case.
  const down = chanceBelow(dof, seenDown, lowerFactor(dof, lv.lower.lineTest * single)) ** k;
  const linesAbove = binomialAtLeast(need, looks, up);
  const linesBelow = binomialAtLeast(need, looks, down);
  const nuR = dof * p.rmsDofRatio;
  const r = Math.pow(10, req.rmsBeyondDb / 10);
  // Above with k channels all r times the limit: the largest-of mean square over its mean at the limit is
  // r times the null's, tested with nu_eff (moment-matched, as judgeSpectrum tests it).
  const nuRe = nuR * (largestEffectiveDof(dof, k) / dof);
  const rmsAbove = chanceAbove(nuRe, r, upperFactor(nuRe, lv.upper.rmsTest));
  // Below with k channels all 1/r of the limit: the largest-of mean square reads its mean at the line's DOF high
  // (largestOfMoments, independent channels: the most it reads high), tested against the plain lower limit.
  const mu = k > 1 ? largestOfMoments(dof, k).mean : 1;
  const rmsBelow = chanceBelow(nuRe, mu / r, lowerFactor(nuR, lv.lower.rmsTest));
  return { linesAbove, linesBelow, rmsAbove, rmsBelow, least: Math.min(linesAbove, linesBelow, rmsAbove, rmsBelow) };
}

/** The smallest DOF at which powerAt(...).least reaches the requirement's probability (to 0.5 %), by bisection. */
export function dofForPower(p: PowerInputs, req: PowerRequirement = DEFAULT_POWER): number {
  let lo = 1;
  let hi = 2;
  while (powerAt(hi, p, req).least < req.probability) {
    lo = hi;
    hi *= 2;
    if (hi > 1e8) return Infinity;
  }
  while (hi / lo > 1.005) {
    const mid = Math.sqrt(lo * hi);
    if (powerAt(mid, p, req).least >= req.probability) hi = mid;
    else lo = mid;
  }
  return Math.ceil(hi);
}
