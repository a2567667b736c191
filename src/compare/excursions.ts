import { chiSquareCdf, chiSquareIntervalFactors, chiSquareSurvival } from "../estimate/statistics/distributions.js";
import type { Excursion, LineDeviation } from "./complianceTypes.js";
import { largestChance } from "./decisionRule.js";
import type { JudgedSpectrum } from "./judgedGrid.js";
import type { LineTestLevels } from "./lineTests.js";
import { DECIDE_PROBABILITY, longerRecordFactor } from "./runLength.js";

/**
 * Excursions: runs of neighbouring lines outside the band as measured, each with its worst line, whether the
 * rule shows it, its Bonferroni-adjusted p-value and, when not shown, the run length that would show it.
 */
export function findExcursions(
  js: JudgedSpectrum,
  lines: LineDeviation[],
  t: LineTestLevels,
  reread: (i: number) => number,
  secondsAt: (v: number | undefined) => number | undefined,
): Excursion[] {
  const excursions: Excursion[] = [];
  const m = lines.length;
  const plain = js.nu > 0 ? chiSquareIntervalFactors(js.nu, js.sp.confidence) : { lower: 0, upper: Infinity };
  const tests = 2 * Math.max(1, m) * js.family;
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
      const better =
        l.status === "above"
          ? lines[j]!.deviationDb > lines[worst]!.deviationDb
          : lines[j]!.deviationDb < lines[worst]!.deviationDb;
      if (better) worst = j;
    }
    excursions.push(excursion(js, lines, i, j, worst, shown, { t, reread, secondsAt, plain, tests }));
    i = j + 1;
  }
  return excursions;
}

interface ExcursionContext {
  t: LineTestLevels;
  reread: (i: number) => number;
  secondsAt: (v: number | undefined) => number | undefined;
  /** The plain interval factors at the analysis confidence, and the number of line tests (for the adjusted p). */
  plain: { lower: number; upper: number };
  tests: number;
}

/** The run of lines i..j (its worst line `worst`) as an excursion. */
function excursion(
  js: JudgedSpectrum,
  lines: LineDeviation[],
  i: number,
  j: number,
  worst: number,
  shown: boolean,
  c: ExcursionContext,
): Excursion {
  const { k, idx } = js;
  const l = lines[i]!;
  const w = lines[worst]!;
  const above = l.status === "above";
  const limit = above ? js.limitsUp[worst]! : js.limitsLo[worst]!;
  const ratio = w.measured / limit;
  const v = js.nuAt(idx[worst]!);
  const pOne = v > 0 ? (above ? chiSquareSurvival(v * ratio, v) : chiSquareCdf(v * ratio, v)) : 1;
  // With the largest of k, the chance that any of k at the limit reaches this: 1 - (1 - p)^k.
  const p = largestChance(pOne, above ? k : 1);
  // The worst line's true level taken as measured, read again through the kernel as a new run would (for the
  // largest of k: over its mean at the limit, per channel); undefined when that reading is inside the limit.
  const again = c.reread(idx[worst]!) / limit;
  const trueRatio = above ? again / js.meanAt(v) : again;
  const factor =
    shown || (above ? trueRatio <= 1 : trueRatio >= 1)
      ? undefined
      : longerRecordFactor(trueRatio, v, above ? c.t.upLevel : c.t.loLevel, DECIDE_PROBABILITY, above ? k : 1);
  return {
    fromHz: l.frequencyHz,
    toHz: lines[j]!.frequencyHz,
    direction: l.status as "above" | "below",
    lines: j - i + 1,
    worstDb: w.deviationDb,
    worstHz: w.frequencyHz,
    limitDb: above ? w.upperDb : -w.lowerDb,
    clear: above ? (ratio / js.meanAt(v)) * c.plain.lower > 1 : ratio * c.plain.upper < 1,
    shown,
    adjustedP: Math.min(1, p * c.tests),
    longerRecordFactor: factor,
    secondsToShow: factor === undefined ? undefined : c.secondsAt(factor * v),
  };
}
