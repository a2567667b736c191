import type { Finding } from "../findings.js";
import type { LineDeviation, RuleReport, SpectrumUnderTest } from "./complianceTypes.js";
import { DECISION_RULE, DEFAULT_POWER } from "./decisionRule.js";
import type { JudgedSpectrum } from "./judgedGrid.js";
import type { PassPower } from "./passPower.js";
import { pct, pctSmall, percent, signed } from "./percentWords.js";
import type { RmsTest } from "./rmsTest.js";
import type { TestProfile } from "./testProfile.js";

/**
 * The findings of a judgement (complianceCheck.ts): the failures the data show, what else a pass needs (DOF,
 * power, duration: a longer run can bring them), the coverage a longer run cannot bring, and the pass itself.
 */

/** "false-fail rate at most 5 % per record", with the split over the spectra when there are several. */
function rateWords(family: number): string {
  const perRecord = DECISION_RULE.falseFailRate;
  const perSpectrum = perRecord / family;
  return `false-fail rate at most ${pct(perRecord)} per record${family > 1 ? ` (${family} spectra judged, ${pct(perSpectrum)} each)` : ""}`;
}

/** The failures the data show: lines outside beyond the allowance, a line beyond an outer limit, the RMS outside. */
export function failFindings(js: JudgedSpectrum, m: number, allowanceLines: number, shown: { shownOut: number; shownOuter: number }, rms: RmsTest): Finding[] {
  const fails: Finding[] = [];
  const { shownOut, shownOuter } = shown;
  const { f0, fN } = js;
  const top = rms.top;
  if (shownOut > allowanceLines) {
    fails.push({
      code: "LINES_OUTSIDE",
      values: { lines: shownOut, judged: m, ...(allowanceLines > 0 ? { allowance: allowanceLines } : {}), falseFailPercent: percent(DECISION_RULE.falseFailRate) },
      text: `${shownOut} of ${m} lines shown outside their tolerance band${allowanceLines > 0 ? ` (the profile allows ${allowanceLines})` : ""}, beyond what chance among all lines explains (${rateWords(js.family)})`,
    });
  }
  if (shownOuter > 0) fails.push({ code: "OUTER_LIMIT", values: { lines: shownOuter }, text: `${shownOuter} line(s) shown beyond the outer limits, which no line may cross` });
  if (rms.shown) {
    const tol = rms.tolerance!;
    fails.push({
      code: "RMS_OUTSIDE",
      values: { rms: rms.measuredRms, deviationDb: rms.deviationDb, requiredRms: rms.requiredRms, ...(top < fN ? { fromHz: f0, toHz: top } : {}), upperDb: tol.upper, lowerDb: tol.lower },
      text: `RMS ${rms.measuredRms.toPrecision(4)} is ${signed(rms.deviationDb)} dB from the required ${rms.requiredRms.toPrecision(4)}${top < fN ? ` (over the ${f0}–${top} Hz the record covers)` : ""}, shown outside the allowed +${tol.upper.toFixed(2)} / -${tol.lower.toFixed(2)} dB` });
  }
  return fails;
}

/** What else a pass needs that a longer run can bring: an RMS resolved, judged lines, the DOF, the power, the duration. */
export function blockerFindings(
  js: JudgedSpectrum, profile: TestProfile, m: number, rms: RmsTest, p: PassPower, secondsAt: (v: number | undefined) => number | undefined,
): Finding[] {
  const blockers: Finding[] = [];
  const { nu, sp } = js;
  const { requirement, forPower, power } = p;
  const required = profile.minDof;
  if (!rms.shown && !rms.ok) {
    const tol = rms.tolerance!;
    blockers.push({ code: "RMS_UNRESOLVED", values: { deviationDb: rms.deviationDb, upperDb: tol.upper, lowerDb: tol.lower, dof: rms.dof }, text: `RMS ${signed(rms.deviationDb)} dB is outside the allowed +${tol.upper.toFixed(2)} / -${tol.lower.toFixed(2)} dB as measured, but within what chance explains at ${rms.dof.toFixed(0)} DOF` });
  }
  if (m === 0) blockers.push({ code: "NO_LINES", values: {}, text: "no spectral line of the record can be judged inside the profile's range" });
  if (required !== undefined && nu < required) {
    const sec = secondsAt(required);
    blockers.push({
      code: "DOF_BELOW_PROFILE", values: { dof: nu, requiredDof: required, ...(sec !== undefined ? { secondsForDof: sec } : {}) },
      text: `degrees of freedom ${nu.toFixed(1)} below the required ${required}: record too short for the statistical accuracy the profile asks${sec !== undefined ? ` (${required} DOF take a run of ${sec.toFixed(1)} s at this rate, segment and overlap)` : ""}` });
  }
  if (m > 0 && requirement !== null && nu < forPower) {
    const sec = secondsAt(forPower);
    blockers.push({
      code: "DOF_BELOW_POWER",
      values: {
        dof: nu, dofForPower: forPower, departureDb: requirement.departureDb, departurePercent: percent(requirement.departureShare), widthLines: requirement.widthLines, lines: m,
        powerPercent: percent(requirement.probability), achievedPowerPercent: percent(power.least), ...(sec !== undefined ? { secondsForPower: sec } : {}),
      },
      text: `degrees of freedom ${nu.toFixed(1)} below the ${forPower} at which a ${requirement.departureDb} dB departure beyond the band over ${pct(requirement.departureShare)} of the ${m} lines, in runs of ${requirement.widthLines} line(s) or wider, would be seen with ${pct(requirement.probability)} probability (here ${pct(power.least)})${sec !== undefined ? `; ${forPower} DOF take a run of ${sec.toFixed(1)} s` : ""}`,
    });
  }
  if (profile.durationS !== undefined && sp.durationS < profile.durationS * (1 - 1e-9)) blockers.push(durationShort(sp, profile.durationS));
  return blockers;
}

function durationShort(sp: SpectrumUnderTest, requiredS: number): Finding {
  const w = sp.analysedWindow;
  return w
    ? { code: "DURATION_SHORT", values: { durationS: sp.durationS, requiredDurationS: requiredS, fromS: w.fromS, toS: w.toS }, text: `the analysed window ${w.fromS.toFixed(3)} to ${w.toS.toFixed(3)} s lasts ${sp.durationS.toFixed(2)} s, shorter than the ${requiredS} s the profile requires: it cannot show the whole test` }
    : { code: "DURATION_SHORT", values: { durationS: sp.durationS, requiredDurationS: requiredS }, text: `the record lasts ${sp.durationS.toFixed(2)} s, shorter than the ${requiredS} s the profile requires: it cannot show the whole test` };
}

/** What a longer run cannot bring: the profile's top above the record's Nyquist, the bottom of the range unjudged, coarse lines. */
export function coverageFindings(js: JudgedSpectrum, profile: TestProfile, lines: LineDeviation[]): Finding[] {
  const fixedBlockers: Finding[] = [];
  const { sp, fN, f0, nyquist, df, kernel } = js;
  if (fN > nyquist * (1 + 1e-12)) {
    fixedBlockers.push({ code: "RANGE_ABOVE_RECORD", values: { profileTopHz: fN, sampleRateHz: sp.sampleRateHz, nyquistHz: nyquist, linesUnseen: js.unjudged.aboveRecord }, text: `the profile runs to ${fN} Hz but the record's sample rate ${sp.sampleRateHz} Hz shows only up to ${nyquist} Hz: ${js.unjudged.aboveRecord} line(s) of the profile cannot be seen` });
  }
  if (lines.length > 0) {
    const gapLow = lines[0]!.frequencyHz - f0;
    const allowed = (kernel.halfWidthBins + 1) * df;
    if (gapLow > allowed) fixedBlockers.push({ code: "RANGE_BELOW_JUDGED", values: { firstLineHz: lines[0]!.frequencyHz, gapHz: gapLow }, text: `the first judged line is ${lines[0]!.frequencyHz} Hz, ${gapLow.toPrecision(3)} Hz above the profile's start (lines below are biased by detrending or leakage): the analysis cannot show the bottom of the range; use a finer resolution or no detrending` });
  }
  if (profile.resolutionHz !== undefined && df > profile.resolutionHz * (1 + 1e-9)) {
    fixedBlockers.push({ code: "RESOLUTION_COARSE", values: { lineSpacingHz: df, profileResolutionHz: profile.resolutionHz }, text: `line spacing ${df.toPrecision(4)} Hz is coarser than the profile's resolution ${profile.resolutionHz} Hz: narrow excursions could hide between lines` });
  }
  return fixedBlockers;
}

/** Lines near the profile's ends left out because the profile changes too steeply there (none: no finding). */
export function notchFinding(notch: number): Finding[] {
  if (notch === 0) return [];
  return [{ code: "NOTCH_LINES_LEFT_OUT", values: { lines: notch }, text: `${notch} line(s) near the profile's ends left out: the profile changes too steeply there for the window's kernel to say what the line should show` }];
}

/** The pass, with the power it had and the false-fail rate it rests on. */
export function passFinding(m: number, p: PassPower, rule: RuleReport, family: number): Finding {
  const { requirement, power, powerDefault } = p;
  const rq = requirement ?? DEFAULT_POWER;
  return {
    code: "PASS",
    values: {
      lines: m, departureDb: rq.departureDb, widthLines: rq.widthLines, powerPercent: percent(power.least), defaultPowerPercent: percent(powerDefault.least),
      falseFailPercent: percent(rule.falseFailAtProfile), recordFalseFailPercent: percent(DECISION_RULE.falseFailRate),
    },
    text: `no line and not the RMS shown outside tolerance across ${m} lines, ${requirement === null ? "with no power asked by the profile" : `with the power to see a ${rq.departureDb} dB departure in runs of ${rq.widthLines} line(s) or wider (${pct(power.least)}${requirement.source === "profile" ? ", the profile's requirement" : ""})`}; against psdgate's default requirement ${pct(powerDefault.least)}; ${rateWords(family)}, ${pctSmall(rule.falseFailAtProfile)} here if the PSD equals the profile`,
  };
}
