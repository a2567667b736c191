import type { ChannelCompliance, Excursion, Verdict } from "../compare/complianceCheck.js";
import { DECISION_RULE } from "../compare/decisionRule.js";
import { fixed } from "./format.js";

/** What each verdict means, said the same way in the text, the HTML report and the help. */
export const VERDICT_MEANING: Record<Verdict, string> = {
  pass: "no failure is shown, and the record had the degrees of freedom, coverage, resolution, duration and data quality to show one",
  fail: `the data show the profile is not met (lines outside their band beyond the allowance, a line beyond an outer limit, or the RMS outside its tolerance), with a false-fail rate of at most ${pct(DECISION_RULE.falseFailRate)} for any conforming record`,
  inconclusive: "either no failure is shown but the record cannot support a pass (too few DOF for the rule's power, partial coverage, coarse resolution, short duration, an RMS too close to its limit to call), or the data are in doubt (clipping, non-Gaussian amplitudes, non-finite samples, a Parseval mismatch), so no verdict can rest on them",
};

/** The decision rule in one paragraph. */
export const RULE_SUMMARY =
  `A line is shown outside its tolerance band only when its estimate lies beyond the band by more than chance explains among all the lines tested ` +
  `(chi-square with the achieved DOF, Bonferroni over the lines, both directions and stretches of 4, 16 and 64 neighbouring lines), and the RMS likewise with the DOF of the whole range. ` +
  `FAIL when more lines are shown outside than the profile allows, any line beyond an outer limit, or the RMS outside its tolerance: at most ${pct(DECISION_RULE.falseFailRate)} of records whose true PSD lies inside the bands (RMS inside its tolerance) fail, at any DOF. ` +
  `PASS also needs the DOF at which a ${DECISION_RULE.departureDb} dB departure beyond the band over ${pct(DECISION_RULE.departureShare)} of the lines, or an RMS ${DECISION_RULE.rmsBeyondDb} dB outside its tolerance, fails with at least ${pct(DECISION_RULE.power)} probability, and the profile's minDof.`;

/** The mixed-mode part of the rule (profiles with sine tones), in one paragraph. */
export const TONE_RULE =
  `With sine tones (mixed mode): the lines each tone occupies through the window's kernel are left out of the background's tests and the RMS is the total (random plus each tone's peak²/2). ` +
  `Each tone's peak is a least-squares sine fit over the whole record at the frequency that maximises its periodogram, with standard deviation √(G/T) from the background density G around it and the record length T. ` +
  `A tone is shown low, high or off its frequency when it lies beyond its limit by more than the normal quantile at ${pct(DECISION_RULE.tones)} / (4 × tones) of that deviation; the tones' ${pct(DECISION_RULE.tones)} is taken from the lines' share, so the whole stays at ${pct(DECISION_RULE.falseFailRate)}. ` +
  `A missing tone, one shown outside its tolerance or off its frequency FAILs by name; a pass needs the power to see a tone ${DECISION_RULE.departureDb} dB beyond its limits with ${pct(DECISION_RULE.power)} probability.`;

/** The rule as it applied to one judged spectrum: its rates at the achieved DOF. */
export function ruleLine(c: ChannelCompliance): string {
  const r = c.rule;
  return `false-fail rate at most ${pct(r.falseFailBound)} (${pctSmall(r.falseFailAtProfile)} if the PSD equals the profile) at ${fixed(c.dof.achieved, 1)} DOF; power ${pct(r.power.least)} against a ${DECISION_RULE.departureDb} dB departure over ${pct(DECISION_RULE.departureShare)} of the lines; a pass needs ${Math.max(r.dofForPower, c.dof.required ?? 0)} DOF${r.allowanceLines > 0 ? `; ${r.allowanceLines} line(s) allowed outside` : ""}`;
}

/** Shown or not, and why (against chance among all the lines tested). */
export function excursionJudgement(e: Excursion): string {
  if (e.shown) return `shown (beyond what chance among all lines explains; adjusted p ${e.adjustedP < 1e-6 ? "< 1e-6" : e.adjustedP.toPrecision(2)})`;
  return `not shown (chance among the lines tested could explain it${e.longerRecordFactor ? `; a record ${fixed(e.longerRecordFactor, 1)}x longer would settle it` : ""})`;
}

function pct(x: number): string {
  return `${Number((100 * x).toPrecision(3))} %`;
}

export function pctSmall(x: number): string {
  return x < 1e-4 ? "below 0.01 %" : pct(x);
}
