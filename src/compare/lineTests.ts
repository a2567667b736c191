import { chiSquareCdf, chiSquareSurvival } from "../estimate/statistics/distributions.js";
import type { LineDeviation } from "./complianceTypes.js";
import {
  DECISION_RULE,
  largestChance,
  largestUpperFactor,
  lowerFactor,
  ruleLevels,
  upperFactor,
} from "./decisionRule.js";
import type { JudgedSpectrum } from "./judgedGrid.js";

/**
 * The line tests of a judgement: each judged line against its band (and outer limits), and stretches of
 * neighbouring lines at a few widths, each at its share of the rule's family-wise level (decisionRule.ts).
 */

/** Each judged line as measured against what it should show, before the tests (status as measured). */
export function lineDeviations(js: JudgedSpectrum, outer: boolean): LineDeviation[] {
  const { sp, idx, req, upEff, limitsLo, outerUp, outerLo, half } = js;
  const lines: LineDeviation[] = [];
  for (let j = 0; j < idx.length; j++) {
    const i = idx[j]!;
    // The Nyquist line's one-sided value is not doubled (so sum P df is the mean square): judge twice it.
    const measured = i === half ? 2 * sp.psd[i]! : sp.psd[i]!;
    const status = measured > upEff[j]! ? "above" : measured < limitsLo[j]! || !(measured > 0) ? "below" : "within";
    lines.push({
      frequencyHz: sp.frequencyHz[i]!,
      measured,
      required: req[j]!,
      deviationDb: 10 * Math.log10(measured / req[j]!),
      upperDb: 10 * Math.log10(upEff[j]! / req[j]!),
      lowerDb: -10 * Math.log10(limitsLo[j]! / req[j]!),
      status,
      shown: false,
      beyondOuter: false,
      ...(outer
        ? {
            outerUpperDb: 10 * Math.log10((outerUp[j]! * js.meanAt(js.nuAt(i))) / req[j]!),
            outerLowerDb: -10 * Math.log10(outerLo[j]! / req[j]!),
          }
        : {}),
    });
  }
  return lines;
}

/** Stretch widths tested besides single lines (powers of 4 up to a quarter of the lines; chosen here). */
export function stretchWidths(lines: number): number[] {
  const out: number[] = [];
  for (let w = 4; w <= lines / 4 && w <= 64; w *= 4) out.push(w);
  return out;
}

/**
 * Thresholds on measured / raw limit at a DOF: above, the largest-of-k quantile (k = 1: chi-square); below, chi-square.
 */
export interface LineFactors {
  up: number;
  lo: number;
  oUp: number;
  oLo: number;
}

/** The levels of one judgement's tests: the rule's split for m lines, the stretches' share, the thresholds at a DOF. */
export interface LineTestLevels {
  levels: ReturnType<typeof ruleLevels>;
  /** Stretch widths tested (none with an allowance: a stretch shown says "at least one line", not how many). */
  widths: number[];
  /** The single lines' part of the line alpha (1 less the stretches' share when stretches are tested). */
  singleShare: number;
  /** Per-line, per-direction levels of the single-line tests. */
  upLevel: number;
  loLevel: number;
  factors(v: number): LineFactors;
}

export function lineTestLevels(
  m: number,
  allowanceLines: number,
  outer: boolean,
  family: number,
  toneShare: number,
  k: number,
): LineTestLevels {
  const widths = allowanceLines === 0 ? stretchWidths(m) : [];
  const levels = ruleLevels(m, outer, family, toneShare);
  // Single lines get the line alpha less the stretches' share; each stretch width an equal part of that share.
  const singleShare = widths.length > 0 ? 1 - DECISION_RULE.stretchShare : 1;
  const upLevel = levels.upper.lineTest * singleShare;
  const loLevel = levels.lower.lineTest * singleShare;
  const factorCache = new Map<number, LineFactors>();
  const factors = (v: number) => {
    let f = factorCache.get(v);
    if (!f) {
      f = {
        up: largestUpperFactor(v, upLevel, k),
        lo: lowerFactor(v, loLevel),
        oUp: outer ? largestUpperFactor(v, levels.upper.outerTest!, k) : Infinity,
        oLo: outer ? lowerFactor(v, levels.lower.outerTest!) : 0,
      };
      factorCache.set(v, f);
    }
    return f;
  };
  return { levels, widths, singleShare, upLevel, loLevel, factors };
}

/**
 * Marks the lines shown outside their band (single lines, then stretches) and beyond the outer limits; returns the
 * counts.
 */
export function markShownLines(
  js: JudgedSpectrum,
  lines: LineDeviation[],
  t: LineTestLevels,
  outer: boolean,
): { shownOut: number; shownOuter: number } {
  let shownOut = 0;
  let shownOuter = 0;
  if (!(js.nu > 0)) return { shownOut, shownOuter };
  const m = lines.length;
  for (let j = 0; j < m; j++) {
    const l = lines[j]!;
    const f = t.factors(js.nuAt(js.idx[j]!));
    if (l.measured / js.limitsUp[j]! > f.up || l.measured / js.limitsLo[j]! < f.lo) l.shown = true;
    if (outer && (l.measured / js.outerUp[j]! > f.oUp || l.measured / js.outerLo[j]! < f.oLo)) l.beyondOuter = true;
  }
  for (const w of t.widths) markShownStretches(js, lines, t, w);
  for (const l of lines) {
    if (l.shown) shownOut++;
    if (l.beyondOuter) shownOuter++;
  }
  return { shownOut, shownOuter };
}

/**
 * Stretches of w neighbouring lines, every w/2 lines: the mean of measured / limit, with the DOF of a sum of
 * correlated lines (Satterthwaite), Bonferroni over the stretches of each width. Above, the limit carries the
 * largest-of allowance and the DOF is the moment-matched one. A stretch shown outside marks its lines that lie
 * outside as measured.
 */
function markShownStretches(js: JudgedSpectrum, lines: LineDeviation[], t: LineTestLevels, w: number): void {
  const { nu, kernel, upEff, limitsLo } = js;
  const m = lines.length;
  const nuUpEff = js.effAt(nu);
  let c = 1;
  for (let d = 1; d < Math.min(w, kernel.lineCorrelation.length); d++)
    c += 2 * (1 - d / w) * kernel.lineCorrelation[d]!;
  const nuW = (nu * w) / c;
  const nuWUp = (nuUpEff * w) / c;
  const count = Math.max(1, Math.floor((m - w) / (w / 2)) + 1);
  // This width's part of the stretches' share, over its `count` stretches (per direction).
  const part = (m * DECISION_RULE.stretchShare) / (t.widths.length * count);
  const upF = upperFactor(nuWUp, t.levels.upper.lineTest * part);
  const loF = lowerFactor(nuW, t.levels.lower.lineTest * part);
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
      for (let j = s; j < s + w; j++) if (lines[j]!.status === (ru > upF ? "above" : "below")) lines[j]!.shown = true;
    }
  }
}

/**
 * The single-line tests' part of the false-fail rate if the PSD were the profile: union bound over them at G =
 * required.
 */
export function linesFalseFailAtProfile(js: JudgedSpectrum, t: LineTestLevels): number {
  let atProfile = 0;
  const { k, idx, limitsUp, limitsLo, req } = js;
  for (let j = 0; j < idx.length; j++) {
    const v = js.nuAt(idx[j]!);
    const f = t.factors(v);
    const qUp = chiSquareSurvival((v * f.up * limitsUp[j]!) / req[j]!, v);
    atProfile += largestChance(qUp, k) + chiSquareCdf((v * f.lo * limitsLo[j]!) / req[j]!, v);
  }
  return atProfile;
}
