import type { ChannelCompliance, Excursion, Verdict } from "../compare/complianceCheck.js";
import { DECISION_RULE } from "../compare/decisionRule.js";
import { LEVEL_GATE } from "../compare/levelGate.js";
import { stretchWidths } from "../compare/lineTests.js";
import { DECIDE_PROBABILITY } from "../compare/runLength.js";
import { fixed } from "./format.js";

/** What each verdict means, said the same way in the text, the HTML report and the help. */
export const VERDICT_MEANING: Record<Verdict, string> = {
  pass: "no failure is shown, and the record had the degrees of freedom, coverage, resolution, duration and data quality to show one",
  fail: `the data show the profile is not met (lines outside their band beyond the allowance, a line beyond an outer limit, or the RMS outside its tolerance), with a false-fail rate of at most ${pct(DECISION_RULE.falseFailRate)} per record (over every channel the verdict rests on) for any conforming record`,
  inconclusive:
    "either no failure is shown but the record cannot support a pass (too few DOF for the rule's power, partial coverage, coarse resolution, short duration, an RMS too close to its limit to call, a level that swings beyond the tolerance over the run or drift that dominates: the run length that would decide is given where a longer run can), or the data are in doubt (clipping, non-Gaussian amplitudes, non-finite samples, a Parseval mismatch), so no verdict can rest on them",
};

const R = DECISION_RULE;

/** The stretch widths tested when a spectrum has lines enough for all of them ("4, 16 and 64"). */
const WIDTHS = words(stretchWidths(Infinity).map(String));

/**
 * The single lines' share of the false-fail rate when stretches are tested: the lines' share less the stretches' part.
 */
export const SINGLE_LINES_SHARE = R.lines * (1 - R.stretchShare);

/**
 * How the rule's false-fail rate is split, in one sentence (the rule summary, README and check --help state
 * it; tests/docsMatch.test.ts holds README to it).
 */
export const RULE_LEVELS =
  `Of the ${pct(R.falseFailRate)} per record, the single-line tests get ${pct(SINGLE_LINES_SHARE)} and the stretches ${pct(R.lines * R.stretchShare)} ` +
  `(when the profile allows lines outside, no stretches are tested and the single lines get the ${pct(R.lines)}), the RMS ${pct(R.rms)}; ` +
  `outer limits, when the profile has them, take ${pct(R.outer)} and sine tones ${pct(R.tones)} from the lines' ${pct(R.lines)} before it is split.`;

/** The decision rule in one paragraph. */
export const RULE_SUMMARY =
  `A line is shown outside its tolerance band only when its estimate lies beyond the band by more than chance explains among all the lines tested ` +
  `(chi-square with the achieved DOF, Bonferroni over the lines in both directions and over stretches of ${WIDTHS} neighbouring lines), and the RMS likewise with the DOF of the whole range. ` +
  `${RULE_LEVELS} ` +
  `FAIL when more lines are shown outside than the profile allows, any line beyond an outer limit, or the RMS outside its tolerance: at most ${pct(DECISION_RULE.falseFailRate)} of records whose true PSD lies inside the bands (RMS inside its tolerance) fail, at any DOF. ` +
  `The rate is per record: with n channels judged, each is tested at ${pct(DECISION_RULE.falseFailRate)}/n. ` +
  `With the largest of k control channels, the upper tests use the distribution of the largest of k estimates (the k-th power of the chi-square CDF; channels of one test are bounded by it), and its upper limits carry the largest's mean reading at the limit. ` +
  `PASS also needs the DOF at which a ${DECISION_RULE.departureDb} dB departure beyond the band over ${pct(DECISION_RULE.departureShare)} of the lines, in runs of ${DECISION_RULE.departureWidthLines} neighbouring lines or wider (seen through the window's kernel), or an RMS ${DECISION_RULE.rmsBeyondDb} dB outside its tolerance, fails with at least ${pct(DECISION_RULE.power)} probability, and the profile's minDof; ` +
  `a profile may state its own requirement (key power: departureDb, departurePercent, widthLines, rmsBeyondDb, probabilityPercent; or "none"), and every verdict states the power against this default. Narrower departures are seen with less power (one line: about 60 % of its excess reaches the line). ` +
  `A run whose level swings beyond the tolerance over its course (blocks of 1 s stretch mean squares, at most ${pct(LEVEL_GATE.falseDoubtRate)} false doubts on a stationary record) or whose drift holds most of its mean square is not a pass: inconclusive. ` +
  `An inconclusive verdict gives the run length in seconds that would decide it with at least ${pct(DECIDE_PROBABILITY)} probability if the spectrum is as measured.`;

/** The mixed-mode part of the rule (profiles with sine tones), in one paragraph. */
export const TONE_RULE =
  `With sine tones (mixed mode): the lines each tone occupies through the window's kernel are left out of the background's tests and the RMS is the total (random plus each tone's peak²/2). ` +
  `Each tone's peak is a least-squares sine fit over the whole record at the frequency that maximises its periodogram, with standard deviation √(G/T) from the background density G around it and the record length T. ` +
  `A tone is shown low, high or off its frequency when it lies beyond its limit by more than the normal quantile at ${pct(DECISION_RULE.tones)} / (4 × tones) of that deviation; the tones' ${pct(DECISION_RULE.tones)} is taken from the lines' share, so the whole stays at ${pct(DECISION_RULE.falseFailRate)}. ` +
  `A missing tone, one shown outside its tolerance or off its frequency FAILs by name; a pass needs the power to see a tone ${DECISION_RULE.departureDb} dB beyond its limits with ${pct(DECISION_RULE.power)} probability.`;

/** The rule as it applied to one judged spectrum: its rates at the achieved DOF. */
export function ruleLine(c: ChannelCompliance): string {
  const r = c.rule;
  const rq = r.requirement;
  const own =
    rq === null
      ? "the profile asks no power"
      : `power ${pct(r.power.least)} against a ${rq.departureDb} dB departure over ${pct(rq.departureShare)} of the lines in runs of ${rq.widthLines} line(s) or wider${rq.source === "profile" ? " (the profile's requirement)" : ""}`;
  const dflt =
    rq === null || rq.source === "profile"
      ? `; ${pct(r.powerDefault.least)} against psdgate's default (${r.dofForDefaultPower} DOF for 95 %)`
      : "";
  const family =
    r.family > 1 ? ` per record (${r.family} spectra, ${pct(r.falseFailBound / r.family)} each)` : " per record";
  const largest = r.largestOf
    ? `; largest of ${r.largestOf.channels}: upper limits +${fixed(r.largestOf.meanAllowanceDb, 2)} dB for its mean reading, ${fixed(r.largestOf.effectiveDof, 1)} DOF for sums`
    : "";
  return `false-fail rate at most ${pct(r.falseFailBound)}${family} (${pctSmall(r.falseFailAtProfile)} if the PSD equals the profile) at ${fixed(c.dof.achieved, 1)} DOF; ${own}${dflt}; a pass needs ${Math.max(r.dofForPower, c.dof.required ?? 0)} DOF${r.allowanceLines > 0 ? `; ${r.allowanceLines} line(s) allowed outside` : ""}${largest}`;
}

/** The run length that would decide an inconclusive verdict, in words (undefined when there is none to give). */
export function decideLine(c: ChannelCompliance): string | undefined {
  const d = c.decide;
  if (!d) return undefined;
  if (d.seconds === undefined)
    return `no run up to 1024 times this one decides it with ${pct(d.probability)} probability if the spectrum is as measured`;
  return `a run of ${fixed(d.seconds, 1)} s (${fixed(d.dof!, 0)} DOF) decides it with at least ${pct(d.probability)} probability if the spectrum is as measured; most likely ${d.likely === "pass" ? "a pass" : "a fail"}`;
}

/** Shown or not, and why (against chance among all the lines tested). */
export function excursionJudgement(e: Excursion): string {
  if (e.shown)
    return `shown (beyond what chance among all lines explains; adjusted p ${e.adjustedP < 1e-6 ? "< 1e-6" : e.adjustedP.toPrecision(2)})`;
  return `not shown (chance among the lines tested could explain it${e.longerRecordFactor ? `; a run ${fixed(e.longerRecordFactor, 1)}x as long${e.secondsToShow !== undefined ? ` (${fixed(e.secondsToShow, 1)} s)` : ""} shows it with 90 % probability if it is as measured` : ""})`;
}

/** "a, b and c". */
function words(list: string[]): string {
  return list.length > 1 ? `${list.slice(0, -1).join(", ")} and ${list.at(-1)}` : (list[0] ?? "");
}

function pct(x: number): string {
  return `${Number((100 * x).toPrecision(3))} %`;
}

export function pctSmall(x: number): string {
  return x < 1e-4 ? "below 0.01 %" : pct(x);
}
