import type { RecordingAnalysis } from "../analyzeRecording.js";
import { worstFirst, type ChannelCompliance, type Excursion, type Verdict } from "../compare/complianceCheck.js";
import type { TestProfile } from "../compare/testProfile.js";
import { accelLabel, densityAscii } from "../units.js";
import { VERDICT_CAUTION } from "./cautions.js";
import { fixed, sig, signedDb } from "./format.js";
import { toleranceSummary } from "./profileText.js";
import { finiteOrNull, inputJson, settingsJson, statsJson, toolInfo } from "./psdJson.js";
import { findingLines, recordingLines, settingsLine } from "./psdText.js";
import { printable } from "./printable.js";

export interface CheckResult {
  verdict: Verdict;
  analysis: RecordingAnalysis;
  profile: TestProfile;
  channels: ChannelCompliance[];
}

const WORD: Record<Verdict, string> = { pass: "PASS", fail: "FAIL", inconclusive: "INCONCLUSIVE" };

/** Clear or marginal, and why (the confidence interval of the worst line against the limit). */
export function excursionJudgement(e: Excursion): string {
  return e.clear
    ? `clear (whole confidence interval beyond the limit${e.clearAmongAllLines ? ", even allowing for the number of lines tested" : "; chance among many lines could still explain it"})`
    : `marginal (interval straddles the limit${e.longerRecordFactor ? `; a record ${fixed(e.longerRecordFactor, 1)}x longer would tell` : ""})`;
}

export function excursionText(e: Excursion): string {
  const range = e.fromHz === e.toHz ? `${sig(e.fromHz, 5)} Hz` : `${sig(e.fromHz, 5)}–${sig(e.toHz, 5)} Hz`;
  return `${range}: ${e.direction} by up to ${signedDb(e.worstDb)} at ${sig(e.worstHz, 5)} Hz, limit ${signedDb(e.limitDb)}, ${excursionJudgement(e)}`;
}

export function checkText(r: CheckResult, version: string): string {
  const a = r.analysis;
  const p = r.profile;
  const out = [
    `psdgate ${version}: check of ${printable(a.input.file)} against "${printable(p.title)}"`,
    ...recordingLines(a),
    `  profile    ${printable(p.file)}, sha256 ${p.sha256}`,
    `             ${sig(p.breakpoints[0]!.hz)}–${sig(p.breakpoints[p.breakpoints.length - 1]!.hz)} Hz, ${sig(p.rms, 4)} ${accelLabel(p.units)} RMS; tolerance ${toleranceSummary(p)}`,
    settingsLine(a),
    "",
    `VERDICT  ${WORD[r.verdict]}`,
    "",
  ];
  r.channels.forEach((c, i) => {
    const ch = a.channels[i]!;
    const u = accelLabel(ch.units);
    out.push(`channel ${ch.position} "${printable(ch.name)}": ${WORD[c.verdict]}`);
    for (const reason of c.reasons) out.push(`  because    ${reason}`);
    const tol = c.rms.upperDb !== undefined ? ` (allowed +${fixed(c.rms.upperDb, 2)} / -${fixed(c.rms.lowerDb!, 2)} dB)` : "";
    out.push(`  RMS        ${sig(c.rms.measured, 4)} ${u} measured in the profile's range, ${sig(c.rms.required, 4)} ${u} required: ${signedDb(c.rms.deviationDb)}${tol}`);
    out.push(`  DOF        ${fixed(c.dof.achieved, 1)} achieved${c.dof.required !== undefined ? `, ${c.dof.required} required` : ""} (${ch.psd.averages} averages, ${sig(ch.psd.lineSpacingHz, 4)} Hz lines)`);
    out.push(`  Parseval   time RMS ${sig(ch.parseval.rmsTime, 4)} ${u}, PSD RMS ${sig(ch.parseval.rmsPsd, 4)} ${u}, ratio ${fixed(ch.parseval.ratio, 4)}`);
    const shown = worstFirst(c.excursions).slice(0, 8);
    if (shown.length === 0) out.push(`  excursions none: ${c.lines.length} lines checked`);
    else {
      out.push(`  excursions ${c.excursions.length} (worst first${c.excursions.length > shown.length ? `, ${shown.length} shown` : ""}):`);
      for (const e of shown) out.push(`             ${excursionText(e)}`);
    }
    out.push(...findingLines(ch).filter((l) => !l.startsWith("  DOUBT")), "");
  });
  out.push(`CAUTION: ${VERDICT_CAUTION}`, "");
  return out.join("\n");
}

export function checkJson(r: CheckResult, version: string) {
  const a = r.analysis;
  const p = r.profile;
  return {
    tool: toolInfo(version),
    verdict: r.verdict,
    input: inputJson(a),
    profile: { file: p.file, sha256: p.sha256, title: p.title, units: densityAscii(p.units), rms: p.rms, bands: p.bands, rmsToleranceDb: p.rmsToleranceDb ?? null, minDof: p.minDof ?? null },
    settings: settingsJson(a),
    channels: r.channels.map((c, i) => {
      const ch = a.channels[i]!;
      return {
        name: ch.name,
        position: ch.position,
        verdict: c.verdict,
        reasons: c.reasons,
        rms: { ...c.rms, upperDb: c.rms.upperDb ?? null, lowerDb: c.rms.lowerDb ?? null, units: ch.units },
        dof: { achieved: c.dof.achieved, required: c.dof.required ?? null, ok: c.dof.ok },
        averages: ch.psd.averages,
        parseval: { rmsTime: finiteOrNull(ch.parseval.rmsTime), rmsPsd: finiteOrNull(ch.parseval.rmsPsd), ratio: finiteOrNull(ch.parseval.ratio), tolerance: ch.parseval.tolerance, ok: ch.parseval.ok },
        excursions: c.excursions.map((e) => ({ ...e, longerRecordFactor: e.longerRecordFactor ?? null })),
        lines: {
          frequencyHz: c.lines.map((l) => l.frequencyHz),
          measured: c.lines.map((l) => finiteOrNull(l.measured)),
          required: c.lines.map((l) => l.required),
          deviationDb: c.lines.map((l) => finiteOrNull(l.deviationDb)),
          upperDb: c.lines.map((l) => l.upperDb),
          lowerDb: c.lines.map((l) => l.lowerDb),
          status: c.lines.map((l) => l.status),
        },
        stats: statsJson(ch),
        warnings: ch.warnings,
        doubts: ch.doubts,
      };
    }),
    caution: VERDICT_CAUTION,
  };
}
