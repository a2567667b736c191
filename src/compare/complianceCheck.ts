import { DECISION_RULE, DEFAULT_POWER } from "./decisionRule.js";
import { departureShare } from "../estimate/spectral/spectralKernel.js";
import type {
  ChannelCompliance,
  DecideEstimate,
  Excursion,
  RuleReport,
  SpectrumUnderTest,
  ToneAllowance,
  Verdict,
} from "./complianceTypes.js";
import { findExcursions } from "./excursions.js";
import type { Finding } from "../findings.js";
import { judgedSpectrum } from "./judgedGrid.js";
import { blockerFindings, coverageFindings, failFindings, notchFinding, passFinding } from "./judgementFindings.js";
import { lineDeviations, lineTestLevels, linesFalseFailAtProfile, markShownLines } from "./lineTests.js";
import { passPower } from "./passPower.js";
import { rmsFalseFailTerms, rmsTest } from "./rmsTest.js";
import { decideRunLength, kernelReread, secondsForDof } from "./runLength.js";
import type { TestProfile } from "./testProfile.js";

export type {
  ChannelCompliance,
  DecideEstimate,
  Excursion,
  LineDeviation,
  RuleReport,
  SpectrumUnderTest,
  ToneAllowance,
  ToneJudgement,
  Verdict,
} from "./complianceTypes.js";
export type { Finding };

/**
 * Judges a measured PSD against a required profile by psdgate's decision rule (decisionRule.ts):
 * every judged line against its tolerance band (and outer limits, when the profile has them), runs of
 * neighbouring lines at a few widths, and the RMS over the profile's range, each test at a family-wise
 * level; then what a pass needs besides (DOF, coverage, resolution, duration). Pure: takes the spectrum
 * and the profile, returns data. The parts: judgedGrid (which lines, what each should show), lineTests
 * (single lines and stretches), excursions, rmsTest, passPower, runLength, judgementFindings.
 */
export function judgeSpectrum(sp: SpectrumUnderTest, profile: TestProfile, tones?: ToneAllowance): ChannelCompliance {
  const js = judgedSpectrum(sp, profile);
  const { nu, k, family, kernel } = js;
  const outer = profile.outerBands !== undefined;
  const lines = lineDeviations(js, outer);
  const m = lines.length;
  const allowanceLines = Math.floor(((profile.allowedOutsidePercent ?? 0) / 100) * m);
  const toneShare = tones?.toneShare ?? 0;
  const tests = lineTestLevels(m, allowanceLines, outer, family, toneShare, k);
  const shown = markShownLines(js, lines, tests, outer);
  const secondsAt = (v: number | undefined) => (v === undefined ? undefined : secondsForDof(sp, v));
  const reread = kernelReread(kernel, sp);
  const excursions = findExcursions(js, lines, tests, reread, secondsAt);
  const rms = rmsTest(js, profile, m, tests.levels, tones);
  const power = passPower(js, profile, {
    lines: m,
    allowanceLines,
    outer,
    toneShare,
    singleShare: tests.singleShare,
    rmsDofRatio: rms.dofRatio,
  });
  const required = profile.minDof;

  // The false-fail rate if the PSD were the profile: union bound over every test at G = required.
  let atProfile = 0;
  if (nu > 0) {
    atProfile = linesFalseFailAtProfile(js, tests);
    for (const term of rmsFalseFailTerms(js, rms, tests.levels)) atProfile += term;
  }
  const rule: RuleReport = {
    falseFailBound: DECISION_RULE.falseFailRate,
    falseFailAtProfile: Math.min(1, atProfile),
    lineTestLevel: tests.upLevel,
    stretchWidths: tests.widths,
    allowanceLines,
    power: power.power,
    dofForPower: power.forPower,
    requirement: power.requirement,
    powerDefault: power.powerDefault,
    dofForDefaultPower: power.forDefault,
    departureSeenShare: departureShare(kernel, (power.requirement ?? DEFAULT_POWER).widthLines),
    family,
    largestOf:
      k > 1 && nu > 0 ? { channels: k, meanAllowanceDb: 10 * Math.log10(rms.muNow), effectiveDof: js.effAt(nu) } : null,
  };

  // Failures the data show, and what else a pass needs.
  const fails = failFindings(js, m, allowanceLines, shown, rms);
  const blockers = blockerFindings(js, profile, m, rms, power, secondsAt);
  const fixedBlockers = coverageFindings(js, profile, lines);
  const allBlockers = [...blockers, ...fixedBlockers];
  const findings = [...fails, ...allBlockers];
  const verdict: Verdict = fails.length > 0 ? "fail" : allBlockers.length > 0 ? "inconclusive" : "pass";

  // How long a run would decide an inconclusive verdict, if the spectrum is what was measured.
  let decide: DecideEstimate | undefined;
  if (verdict === "inconclusive" && m > 0 && nu > 0) {
    const needForPass = Math.max(power.forPower, required ?? 0);
    const d = decideRunLength(js, {
      tests,
      rms,
      needForPass,
      passPossible: fixedBlockers.length === 0,
      durationS: profile.durationS,
      reread,
      secondsAt,
    });
    decide = d.decide;
    if (d.finding) findings.push(d.finding);
  }
  findings.push(...notchFinding(js.unjudged.notch));
  if (verdict === "pass") findings.push(passFinding(m, power, rule, family));
  return {
    channel: sp.name,
    verdict,
    findings,
    lines,
    excursions,
    unjudged: js.unjudged,
    rms: {
      measured: rms.measuredRms,
      required: rms.requiredRms,
      deviationDb: rms.deviationDb,
      upperDb: rms.tolerance?.upper,
      lowerDb: rms.tolerance?.lower,
      ok: rms.ok,
      shown: rms.shown,
      dof: rms.dof,
    },
    dof: { achieved: nu, required, forPower: power.forPower, ok: nu >= (required ?? 0) && nu >= power.forPower },
    rule,
    ...(decide !== undefined ? { decide } : {}),
  };
}

/**
 * Data-quality doubts (clipping, non-finite samples, a Parseval mismatch, a non-Gaussian amplitude
 * distribution) make any verdict inconclusive: the spectrum itself is in question, so neither a pass nor
 * a fail can rest on it.
 */
/** A judgement of a channel with no signal (NO_SIGNAL, withDoubts): its doubt says all there is. */
export function noSignal(c: ChannelCompliance): boolean {
  return c.findings.some((f) => f.code === "NO_SIGNAL");
}

export function withDoubts(c: ChannelCompliance, doubts: Finding[]): ChannelCompliance {
  if (doubts.length === 0) return c;
  // A dead channel (NO_SIGNAL) has no motion to judge: its doubt is the whole answer. The judgement of its spectrum of
  // zeros (an RMS -Infinity dB "within chance at 0 DOF", every line below its band) would say nothing, so none is kept.
  // Its lines and RMS are not shown outside anything either (a JSON reader counting shown lines would count them all).
  if (doubts.some((d) => d.code === "NO_SIGNAL"))
    return {
      ...c,
      verdict: "inconclusive",
      findings: doubts,
      excursions: [],
      decide: undefined,
      lines: c.lines.map((l) => ({ ...l, shown: false, beyondOuter: false })),
      rms: { ...c.rms, shown: false },
    };
  const note: Finding[] = c.verdict === "fail" ? [{ code: "FAIL_IN_DOUBT", values: {} }] : [];
  // A longer run does not remove a doubt about the data: no run length is promised.
  const findings = [...doubts, ...c.findings.filter((f) => f.code !== "PASS" && f.code !== "RUN_TO_DECIDE"), ...note];
  return { ...c, verdict: "inconclusive", findings, decide: undefined };
}

/**
 * The level gate's findings (compare/levelGate.ts: level swings beyond the tolerance over the run, drift
 * dominating) stop a pass: it becomes INCONCLUSIVE with the reason. A shown failure stays a failure (the
 * average is outside whatever the run did), with the finding added.
 */
export function withGate(c: ChannelCompliance, gate: Finding[]): ChannelCompliance {
  if (gate.length === 0) return c;
  const findings = [...gate, ...c.findings.filter((f) => f.code !== "PASS")];
  return { ...c, verdict: c.verdict === "pass" ? "inconclusive" : c.verdict, findings };
}

/** Excursions ordered by how far their worst line lies beyond its limit, largest first (a copy). */
export function worstFirst(excursions: Excursion[]): Excursion[] {
  return [...excursions].sort((a, b) => Math.abs(b.worstDb - b.limitDb) - Math.abs(a.worstDb - a.limitDb));
}

/** Worst of the channel verdicts: fail over inconclusive over pass. */
export function overallVerdict(vs: Verdict[]): Verdict {
  if (vs.includes("fail")) return "fail";
  if (vs.includes("inconclusive") || vs.length === 0) return "inconclusive";
  return "pass";
}
