import type { Finding } from "../findings.js";
import type { LineDeviation, RuleReport, SpectrumUnderTest } from "./complianceTypes.js";
import { DECISION_RULE, DEFAULT_POWER } from "./decisionRule.js";
import type { JudgedSpectrum } from "./judgedGrid.js";
import type { PassPower } from "./passPower.js";
import { percent } from "./percent.js";
import type { RmsTest } from "./rmsTest.js";
import type { TestProfile } from "./testProfile.js";

/**
 * The findings of a judgement (complianceCheck.ts): the failures the data show, what else a pass needs (DOF,
 * power, duration: a longer run can bring them), the coverage a longer run cannot bring, and the pass itself.
 */

/** The failures the data show: lines outside beyond the allowance, a line beyond an outer limit, the RMS outside. */
export function failFindings(
  js: JudgedSpectrum,
  m: number,
  allowanceLines: number,
  shown: { shownOut: number; shownOuter: number },
  rms: RmsTest,
): Finding[] {
  const fails: Finding[] = [];
  const { shownOut, shownOuter } = shown;
  const { f0, fN } = js;
  const top = rms.top;
  if (shownOut > allowanceLines) {
    fails.push({
      code: "LINES_OUTSIDE",
      values: {
        lines: shownOut,
        judged: m,
        ...(allowanceLines > 0 ? { allowance: allowanceLines } : {}),
        falseFailPercent: percent(DECISION_RULE.falseFailRate),
      },
      // The false-fail rate is said per record, and per spectrum when several are judged (the family).
      ...(js.family > 1 ? { about: { family: js.family } } : {}),
    });
  }
  if (shownOuter > 0) fails.push({ code: "OUTER_LIMIT", values: { lines: shownOuter } });
  if (rms.shown) {
    const tol = rms.tolerance!;
    fails.push({
      code: "RMS_OUTSIDE",
      values: {
        rms: rms.measuredRms,
        deviationDb: rms.deviationDb,
        requiredRms: rms.requiredRms,
        ...(top < fN ? { fromHz: f0, toHz: top } : {}),
        upperDb: tol.upper,
        lowerDb: tol.lower,
      },
    });
  }
  return fails;
}

/**
 * What else a pass needs that a longer run can bring: an RMS resolved, judged lines, the DOF, the power, the duration.
 */
export function blockerFindings(
  js: JudgedSpectrum,
  profile: TestProfile,
  m: number,
  rms: RmsTest,
  p: PassPower,
  secondsAt: (v: number | undefined) => number | undefined,
): Finding[] {
  const blockers: Finding[] = [];
  const { nu, sp } = js;
  const { requirement, forPower, power } = p;
  const required = profile.minDof;
  if (!rms.shown && !rms.ok) {
    const tol = rms.tolerance!;
    blockers.push({
      code: "RMS_UNRESOLVED",
      values: { deviationDb: rms.deviationDb, upperDb: tol.upper, lowerDb: tol.lower, dof: rms.dof },
    });
  }
  if (m === 0) blockers.push({ code: "NO_LINES", values: {} });
  if (required !== undefined && nu < required) {
    const sec = secondsAt(required);
    blockers.push({
      code: "DOF_BELOW_PROFILE",
      values: { dof: nu, requiredDof: required, ...(sec !== undefined ? { secondsForDof: sec } : {}) },
    });
  }
  if (m > 0 && requirement !== null && nu < forPower) {
    const sec = secondsAt(forPower);
    blockers.push({
      code: "DOF_BELOW_POWER",
      values: {
        dof: nu,
        dofForPower: forPower,
        departureDb: requirement.departureDb,
        departurePercent: percent(requirement.departureShare),
        widthLines: requirement.widthLines,
        lines: m,
        powerPercent: percent(requirement.probability),
        achievedPowerPercent: percent(power.least),
        ...(sec !== undefined ? { secondsForPower: sec } : {}),
      },
    });
  }
  if (profile.durationS !== undefined && sp.durationS < profile.durationS * (1 - 1e-9))
    blockers.push(durationShort(sp, profile.durationS));
  return blockers;
}

function durationShort(sp: SpectrumUnderTest, requiredS: number): Finding {
  const w = sp.analysedWindow;
  return w
    ? {
        code: "DURATION_SHORT",
        values: { durationS: sp.durationS, requiredDurationS: requiredS, fromS: w.fromS, toS: w.toS },
      }
    : { code: "DURATION_SHORT", values: { durationS: sp.durationS, requiredDurationS: requiredS } };
}

/**
 * What a longer run cannot bring: the profile's top above the record's Nyquist, the bottom of the range unjudged,
 * coarse lines.
 */
export function coverageFindings(js: JudgedSpectrum, profile: TestProfile, lines: LineDeviation[]): Finding[] {
  const fixedBlockers: Finding[] = [];
  const { sp, fN, f0, nyquist, df, kernel } = js;
  if (fN > nyquist * (1 + 1e-12)) {
    fixedBlockers.push({
      code: "RANGE_ABOVE_RECORD",
      values: {
        profileTopHz: fN,
        sampleRateHz: sp.sampleRateHz,
        nyquistHz: nyquist,
        linesUnseen: js.unjudged.aboveRecord,
      },
    });
  }
  if (lines.length > 0) {
    const gapLow = lines[0]!.frequencyHz - f0;
    const allowed = (kernel.halfWidthBins + 1) * df;
    if (gapLow > allowed)
      fixedBlockers.push({ code: "RANGE_BELOW_JUDGED", values: { firstLineHz: lines[0]!.frequencyHz, gapHz: gapLow } });
  }
  if (profile.resolutionHz !== undefined && df > profile.resolutionHz * (1 + 1e-9)) {
    fixedBlockers.push({
      code: "RESOLUTION_COARSE",
      values: { lineSpacingHz: df, profileResolutionHz: profile.resolutionHz },
    });
  }
  return fixedBlockers;
}

/** Lines near the profile's ends left out because the profile changes too steeply there (none: no finding). */
export function notchFinding(notch: number): Finding[] {
  if (notch === 0) return [];
  return [{ code: "NOTCH_LINES_LEFT_OUT", values: { lines: notch } }];
}

/** The pass, with the power it had and the false-fail rate it rests on. */
export function passFinding(m: number, p: PassPower, rule: RuleReport, family: number): Finding {
  const { requirement, power, powerDefault } = p;
  const rq = requirement ?? DEFAULT_POWER;
  return {
    code: "PASS",
    values: {
      lines: m,
      departureDb: rq.departureDb,
      widthLines: rq.widthLines,
      powerPercent: percent(power.least),
      defaultPowerPercent: percent(powerDefault.least),
      falseFailPercent: percent(rule.falseFailAtProfile),
      recordFalseFailPercent: percent(DECISION_RULE.falseFailRate),
    },
    about: {
      requirement: requirement === null ? "none" : requirement.source === "profile" ? "profile" : "default",
      ...(family > 1 ? { family } : {}),
    },
  };
}
