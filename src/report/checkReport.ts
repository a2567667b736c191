import type { ChannelAnalysis } from "../pass/analyzeRecording.js";
import type { CheckResult } from "../analyses/checkRecording.js";
import {
  noSignal,
  worstFirst,
  type ChannelCompliance,
  type Excursion,
  type Verdict,
} from "../compare/complianceCheck.js";
import { accelLabel, densityAscii } from "../units.js";
import { VERDICT_CAUTION } from "./cautions.js";
import { fixed, parsevalWord, sig, signedDb } from "./format.js";
import { provenanceSummary, toleranceSummary } from "./profileText.js";
import type { TestMeta } from "../read/testMeta.js";
import { finiteOrNull, inputJson, settingsJson, statsJson, toolInfo } from "./psdJson.js";
import { findingLines, recordingLines, settingsLine } from "./psdText.js";
import { printable } from "./printable.js";
import { excursionJudgement, RULE_SUMMARY, ruleLine, TONE_RULE, VERDICT_MEANING } from "./ruleText.js";
import { findingsJson, findingTexts } from "./findingTexts.js";

export type { CheckResult };

const WORD: Record<Verdict, string> = { pass: "PASS", fail: "FAIL", inconclusive: "INCONCLUSIVE" };

export function excursionText(e: Excursion): string {
  const range = e.fromHz === e.toHz ? `${sig(e.fromHz, 5)} Hz` : `${sig(e.fromHz, 5)}–${sig(e.toHz, 5)} Hz`;
  return `${range}: ${e.direction} by up to ${signedDb(e.worstDb)} at ${sig(e.worstHz, 5)} Hz, limit ${signedDb(e.limitDb)}, ${excursionJudgement(e)}`;
}

/** Lines of the profile's range not judged, and why, in words (empty when all were judged). */
export function unjudgedText(c: ChannelCompliance): string {
  const un = c.unjudged;
  return [
    un.edge ? `${un.edge} line(s) at the profile's ends (the window's kernel reaches past them)` : "",
    un.detrend ? `${un.detrend} line(s) biased by detrending` : "",
    un.aboveRecord ? `${un.aboveRecord} line(s) above the record's Nyquist frequency` : "",
    un.notch
      ? `${un.notch} line(s) in a steep notch near the profile's ends (the kernel cannot say what they should show)`
      : "",
    un.excluded
      ? `${un.excluded} line(s) ${c.tones?.length ? "occupied by the tones (judged as tones)" : "left out by the caller"}`
      : "",
  ]
    .filter(Boolean)
    .join(", ");
}

function judgementLines(c: ChannelCompliance, ch: ChannelAnalysis, label: string): string[] {
  const u = accelLabel(ch.units);
  const out = [`${label}: ${WORD[c.verdict]}`];
  for (const reason of findingTexts(c.findings)) out.push(`  because    ${reason}`);
  // A dead channel's doubt is its answer (compare/complianceCheck.ts withDoubts): no RMS, rule or excursion of zeros.
  if (noSignal(c)) return out;
  const tol =
    c.rms.upperDb !== undefined ? ` (allowed +${fixed(c.rms.upperDb, 2)} / -${fixed(c.rms.lowerDb!, 2)} dB)` : "";
  out.push(
    `  RMS        ${sig(c.rms.measured, 4)} ${u} measured in the profile's range, ${sig(c.rms.required, 4)} ${u} required: ${signedDb(c.rms.deviationDb)}${tol}`,
  );
  out.push(
    `  DOF        ${fixed(c.dof.achieved, 1)} achieved${c.dof.required !== undefined ? `, ${c.dof.required} required by the profile` : ""}, ${c.dof.forPower} for the rule's power (${ch.psd.averages} averages, ${sig(ch.psd.lineSpacingHz, 4)} Hz lines)`,
  );
  out.push(`  rule       ${ruleLine(c)}`);
  for (const t of c.tones ?? []) {
    if (t.unseen) {
      out.push(
        `  tone       ${sig(t.hz, 6)} Hz ${printable(t.name)}: ${WORD[t.verdict]}, not seen (at or above the record's Nyquist frequency)`,
      );
      continue;
    }
    out.push(
      `  tone       ${sig(t.hz, 6)} Hz ${printable(t.name)}: ${WORD[t.verdict]}, peak ${sig(t.measuredPeak, 4)} ${u} at ${sig(t.measuredHz, 7)} Hz (required ${sig(t.requiredPeak, 4)}, limits ${sig(t.lowerPeak, 4)}–${sig(t.upperPeak, 4)} ${u}, ±${sig(t.toleranceHz, 3)} Hz; ${signedDb(t.deviationDb)}, sd ${sig(t.peakSd, 2)} ${u})`,
    );
  }
  const un = unjudgedText(c);
  if (un) out.push(`  unjudged   ${un}`);
  const shown = worstFirst(c.excursions).slice(0, 8);
  if (shown.length === 0) out.push(`  excursions none: ${c.lines.length} lines checked`);
  else {
    out.push(
      `  excursions ${c.excursions.length} (worst first${c.excursions.length > shown.length ? `, ${shown.length} shown here, all in --json and the report` : ""}):`,
    );
    for (const e of shown) out.push(`             ${excursionText(e)}`);
  }
  return out;
}

export function checkText(r: CheckResult, version: string): string {
  const a = r.analysis;
  const p = r.profile;
  const out = [
    `psdgate ${version}: check of ${printable(a.input.file)} against "${printable(p.title)}"`,
    ...recordingLines(a),
    `  profile    ${printable(p.file)}, sha256 ${p.sha256}`,
    `             ${sig(p.breakpoints[0]!.hz)}–${sig(p.breakpoints[p.breakpoints.length - 1]!.hz)} Hz, ${sig(p.rms, 4)} ${accelLabel(p.units)} RMS${p.tones.length > 0 ? ` random, ${p.tones.length} tone(s), ${sig(p.totalRms, 4)} ${accelLabel(p.units)} RMS total` : ""}; tolerance ${toleranceSummary(p)}`,
    ...p.defaultsApplied.map((d) => `             default: ${d}`),
    ...(p.provenance ? [`             profile ${printable(provenanceSummary(p)!)}`] : []),
    settingsLine(a),
    "",
    `VERDICT  ${WORD[r.verdict]}: ${VERDICT_MEANING[r.verdict]}`,
    "",
  ];
  if (r.control) {
    out.push(
      ...judgementLines(
        r.control.judgement,
        a.channels[a.channels.findIndex((c) => c.name === r.control!.channels[0])]!,
        `control (${r.control.rule} of ${printable(r.control.channels.join(", "))})`,
      ),
      "",
    );
  }
  r.channels.forEach((c, i) => {
    const ch = a.channels[i]!;
    const role = r.roles[i];
    const parseval = `  Parseval   RMS of the detrended segments ${sig(ch.parseval.rmsSegments, 4)} ${accelLabel(ch.units)}, PSD RMS ${sig(ch.parseval.rmsPsd, 4)}, ratio ${fixed(ch.parseval.ratio, 4)} (±${sig(100 * ch.parseval.tolerance, 2)} %)${parsevalWord(ch.parseval).startsWith("agree with") ? `; ${parsevalWord(ch.parseval)}` : ""}`;
    if (role === "monitor" || role === "control") {
      // Under control every channel's own verdict is still shown: judged alone, it is not the record's verdict.
      out.push(
        ...judgementLines(
          c,
          ch,
          `channel ${ch.position} "${printable(ch.name)}" (${role === "monitor" ? "monitoring" : "control"} channel judged alone; the record's verdict rests on the control spectrum)`,
        ),
      );
    } else {
      out.push(...judgementLines(c, ch, `channel ${ch.position} "${printable(ch.name)}"`));
    }
    if (!noSignal(c)) out.push(parseval);
    out.push(...findingLines(ch).filter((l) => !l.startsWith("  DOUBT")), "");
  });
  out.push(
    `RULE: ${RULE_SUMMARY}`,
    ...(p.tones.length > 0 ? ["", `TONES: ${TONE_RULE}`] : []),
    "",
    `CAUTION: ${VERDICT_CAUTION}`,
    "",
  );
  return out.join("\n");
}

function judgementJson(c: ChannelCompliance) {
  return {
    verdict: c.verdict,
    reasons: findingTexts(c.findings),
    findings: findingsJson(c.findings),
    rms: { ...c.rms, upperDb: c.rms.upperDb ?? null, lowerDb: c.rms.lowerDb ?? null },
    dof: { achieved: c.dof.achieved, required: c.dof.required ?? null, forPower: c.dof.forPower, ok: c.dof.ok },
    rule: c.rule,
    unjudged: c.unjudged,
    excursions: c.excursions.map((e) => ({
      ...e,
      longerRecordFactor: e.longerRecordFactor ?? null,
      secondsToShow: e.secondsToShow ?? null,
    })),
    decide: c.decide
      ? {
          probability: c.decide.probability,
          dof: c.decide.dof ?? null,
          seconds: c.decide.seconds ?? null,
          likely: c.decide.likely ?? null,
        }
      : null,
    // Mixed mode: each required tone (empty for a random-only profile).
    tones: (c.tones ?? []).map((t) => ({
      name: t.name,
      hz: t.hz,
      requiredPeak: t.requiredPeak,
      measuredPeak: finiteOrNull(t.measuredPeak),
      lowerPeak: t.lowerPeak,
      upperPeak: t.upperPeak,
      verdict: t.verdict,
      measuredHz: finiteOrNull(t.measuredHz),
      toleranceHz: t.toleranceHz,
      deviationDb: finiteOrNull(t.deviationDb),
      status: t.status,
      shown: t.shown,
      peakSd: finiteOrNull(t.peakSd),
      frequencySd: finiteOrNull(t.frequencySd),
      backgroundDensity: finiteOrNull(t.backgroundDensity),
      linesFromHz: t.linesFromHz,
      linesToHz: t.linesToHz,
      testLevel: t.testLevel,
      falseFailRate: t.falseFailRate,
    })),
    lines: {
      frequencyHz: c.lines.map((l) => l.frequencyHz),
      measured: c.lines.map((l) => finiteOrNull(l.measured)),
      required: c.lines.map((l) => l.required),
      deviationDb: c.lines.map((l) => finiteOrNull(l.deviationDb)),
      upperDb: c.lines.map((l) => l.upperDb),
      lowerDb: c.lines.map((l) => l.lowerDb),
      status: c.lines.map((l) => l.status),
      shown: c.lines.map((l) => l.shown),
    },
  };
}

export function checkJson(r: CheckResult, version: string, meta?: TestMeta) {
  const a = r.analysis;
  const p = r.profile;
  return {
    tool: toolInfo(version),
    verdict: r.verdict,
    meta: meta ?? null,
    input: inputJson(a),
    profile: {
      file: p.file,
      sha256: p.sha256,
      title: p.title,
      units: densityAscii(p.units),
      rms: p.rms,
      bands: p.bands,
      rmsToleranceDb: p.rmsToleranceDb ?? null,
      minDof: p.minDof ?? null,
      resolutionHz: p.resolutionHz ?? null,
      durationS: p.durationS ?? null,
      allowedOutsidePercent: p.allowedOutsidePercent ?? null,
      outerLimits: p.outerBands ?? null,
      defaultsApplied: p.defaultsApplied,
      provenance: p.provenance ?? null,
      origin: provenanceSummary(p) ?? null,
      tones: p.tones.map((t) => ({
        name: t.label,
        hz: t.hz,
        peak: t.peak,
        upperDb: t.upperDb,
        lowerDb: t.lowerDb,
        toleranceHz: t.toleranceHz,
      })),
      totalRms: p.totalRms,
    },
    settings: settingsJson(a),
    analysis: a.analysis,
    rule: {
      summary: RULE_SUMMARY,
      meaning: VERDICT_MEANING[r.verdict],
      ...(p.tones.length > 0 ? { tones: TONE_RULE } : {}),
    },
    control: r.control
      ? { combine: r.control.rule, channels: r.control.channels, ...judgementJson(r.control.judgement) }
      : null,
    channels: r.channels.map((c, i) => {
      const ch = a.channels[i]!;
      const j = judgementJson(c);
      return {
        name: ch.name,
        position: ch.position,
        role: r.roles[i],
        ...j,
        verdict: r.roles[i] === "monitor" ? null : j.verdict,
        // A monitoring channel's verdict judged alone (its `verdict` stays null: it does not decide the record).
        aloneVerdict: j.verdict,
        rms: { ...j.rms, units: ch.units },
        reading: ch.reading,
        averages: ch.psd.averages,
        parseval: {
          rmsTime: finiteOrNull(ch.parseval.rmsTime),
          rmsPsd: finiteOrNull(ch.parseval.rmsPsd),
          rmsSegments: finiteOrNull(ch.parseval.rmsSegments),
          slowPart: {
            rmsReference: finiteOrNull(ch.parseval.slowPart.rmsReference),
            ratio: finiteOrNull(ch.parseval.slowPart.ratio),
            tolerance: ch.parseval.slowPart.tolerance,
            ok: ch.parseval.slowPart.ok,
          },
          ratio: finiteOrNull(ch.parseval.ratio),
          tolerance: ch.parseval.tolerance,
          toleranceFrom: ch.parseval.toleranceFrom,
          ok: ch.parseval.ok,
          belowFirstLineShare: finiteOrNull(ch.parseval.belowFirstLineShare),
        },
        stats: statsJson(ch),
        warnings: findingTexts(ch.notes),
        doubts: findingTexts(ch.doubts),
        notes: findingsJson(ch.notes),
        doubtFindings: findingsJson(ch.doubts),
      };
    }),
    caution: VERDICT_CAUTION,
  };
}
