import { basename, join } from "node:path";
import type { Command } from "commander";
import type { CheckOptions, CheckResult } from "../analyses/checkRecording.js";
import type { Excursion } from "../compare/complianceCheck.js";
import type { TestProfile } from "../compare/testProfile.js";
import type { TestMeta } from "../read/testMeta.js";
import type { BatchEntry } from "../report/batchIndex.js";
import { EXIT, InputError } from "../errors.js";
import { fixed, sig, signedDb } from "../report/format.js";
import { reportFileNames } from "../report/reportNames.js";
import { RULE_SUMMARY, VERDICT_MEANING } from "../report/ruleText.js";
import { checkOutputPaths, makeFolders, writeAtomic } from "../report/writeAtomic.js";
import { fsReason } from "../read/regularFile.js";
import { accelLabel } from "../units.js";
import { VERSION } from "../version.js";
import { Exit } from "./exit.js";
import { expandFiles } from "./fileList.js";
import type { CliIo } from "./io.js";
import {
  addReadingOptions,
  addSpectrumOptions,
  analysisOptions,
  choice,
  givenOptions,
  rerunOptions,
  type ParsedCommon,
} from "./options.js";
import { addBatchOptions, runnerFor, type BatchFlags, type Runner } from "./runner.js";
import { findingText } from "../report/findingTexts.js";

/** Text folded at 100 columns, each line after the first indented by `indent` plus two spaces. */
function wrap(text: string, indent: string): string {
  const out: string[] = [];
  let line = indent;
  for (const word of text.split(" ")) {
    if (line.trim() !== "" && line.length + word.length + 1 > 100) {
      out.push(line);
      line = `${indent}  ${word}`;
    } else line += line.trim() === "" ? word : ` ${word}`;
  }
  out.push(line);
  return out.join("\n");
}

type CheckFlags = ParsedCommon &
  BatchFlags & {
    profile: string;
    report?: string;
    reportDir?: string;
    control?: string;
    controlRule: "average" | "largest";
    meta?: string;
    metaTable?: string;
    csv?: string;
  };

/** A recording's test identity and where it came from (read/testMeta.ts recordingMeta). */
type RecordingMeta = { meta: TestMeta | undefined; from: string | undefined; file: string | undefined };

/** What a check has read and settled before any recording is analysed; the batch and the single path share it. */
interface CheckRun {
  o: CheckFlags;
  files: string[];
  /** Every file read (recordings, profile, lists, identities): no output may replace one. */
  inputs: string[];
  profile: TestProfile;
  meta: TestMeta | undefined;
  metas: Map<string, RecordingMeta>;
  control: CheckOptions["control"];
  wantsReport: boolean;
  now: Date;
  /** One report name per recording in --report-dir, derived from its path, never shared (report/reportNames.ts). */
  names: string[];
  given: string[];
  rerun: Record<string, unknown>;
}

function verdictCode(r: CheckResult): number {
  return r.verdict === "pass" ? EXIT.ok : r.verdict === "fail" ? EXIT.fail : EXIT.inconclusive;
}

/** `psdgate check FILE… --profile P`: the verdict of one or several recordings against a profile. */
export function registerCheck(program: Command, io: CliIo): void {
  const runner = runnerFor(io);
  addBatchOptions(
    addSpectrumOptions(
      addReadingOptions(
        program
          .command("check")
          .argument("[files...]", "recordings: CSV or WAV, globs, or - for a list on stdin")
          .description("judge recordings against a profile: pass (exit 0), fail (1), inconclusive (3)"),
      ),
      "the profile's resolutionHz, else 4096",
    ),
  )
    .requiredOption("-p, --profile <file>", "the required profile (JSON, YAML or CSV)")
    .option(
      "--control <channels>",
      "judge these channels (names or positions, comma-separated) as one control spectrum; the others are monitoring channels, shown and not judged",
    )
    .option(
      "--control-rule <rule>",
      "how the control channels make one spectrum: average (mean PSD at each line) or largest (the highest at each line)",
      choice("--control-rule", ["average", "largest"]),
      "average",
    )
    .addHelpText(
      "after",
      `\n${wrap(`Decision rule: ${RULE_SUMMARY}`, "")}\n\nVerdicts:\n${(["pass", "fail", "inconclusive"] as const).map((v) => wrap(`${v} (exit ${v === "pass" ? 0 : v === "fail" ? 1 : 3}): ${VERDICT_MEANING[v]}.`, "  ")).join("\n")}\n`,
    )
    .option("--report <out.html>", "also write a self-contained HTML report for review and signature (one recording)")
    .option("--report-dir <dir>", "write one HTML report per recording into this folder, named after it")
    .option(
      "--meta <file>",
      "the test's identity (YAML or JSON: testId, workOrder, item, serialNumber, axis, fixture, sensor, sensorSerial, sensorCalibrated, operator, location, notes), carried into --json and the report",
    )
    .option(
      "--meta-table <file>",
      "per recording its test identity: a CSV (header recording,testId,... with any --meta keys) or a YAML/JSON mapping from each recording's file name to its keys; a row overrides --meta key by key, a RECORDING.meta.yaml beside it overrides the row",
    )
    .option(
      "--csv <out>",
      "also write the lines judged (frequency, measured, required, deviation, limits, status, shown) to this CSV file (one recording)",
    )
    .action((args: string[], o: CheckFlags, cmd: Command) => runCheck(io, runner, args, o, cmd));
}

/**
 * Runs `check`: inputs read and outputs checked, then several recordings on the batch pool or one here; exits with the
 * verdict.
 */
async function runCheck(io: CliIo, runner: Runner, args: string[], o: CheckFlags, cmd: Command): Promise<void> {
  const run = await readCheckInputs(io, args, o, cmd);
  if (run.files.length > 1) return checkMany(runner, run);
  const { runAnalysis } = await import("../analyses/runAnalysis.js");
  const { wantsReport, control } = run;
  const r = await runner.one(o, (onProgress) =>
    runAnalysis(
      {
        kind: "check",
        file: run.files[0]!,
        profile: run.profile,
        options: { ...analysisOptions(o), histogram: wantsReport, forReport: wantsReport || undefined, control },
      },
      onProgress,
    ),
  );
  if (o.csv !== undefined) {
    const { checkCsv } = await import("../report/checkCsv.js");
    await writeAtomic(o.csv, checkCsv(r), { inputs: run.inputs, force: o.force, option: "--csv" });
  }
  if (o.report !== undefined || o.reportDir !== undefined) await writeCheckReport(run, r, 0);
  const { checkJson, checkText } = await import("../report/checkReport.js");
  io.stdout(o.json ? JSON.stringify(checkJson(r, VERSION, metaOf(run, r))) + "\n" : checkText(r, VERSION));
  throw new Exit(verdictCode(r));
}

/**
 * The profile, identities and recordings read, the outputs checked (the report folder made), each recording's identity
 * found.
 */
async function readCheckInputs(io: CliIo, args: string[], o: CheckFlags, cmd: Command): Promise<CheckRun> {
  const { loadProfile } = await import("../analyses/checkRecording.js");
  const control =
    o.control !== undefined
      ? {
          channels: o.control
            .split(",")
            .map((x) => x.trim())
            .filter(Boolean),
          rule: o.controlRule,
        }
      : undefined;
  const profile = await loadProfile(o.profile);
  const meta = o.meta !== undefined ? await (await import("../read/testMeta.js")).loadTestMeta(o.meta) : undefined;
  const files = await expandFiles(args, o.filesFrom, io.readStdin ?? (async () => ""));
  const inputs = [
    ...files,
    o.profile,
    ...(o.filesFrom !== undefined ? [o.filesFrom] : []),
    ...(o.meta !== undefined ? [o.meta] : []),
    ...(o.metaTable !== undefined ? [o.metaTable] : []),
  ];
  const { loadMetaTable, matchMetaTable, recordingMeta } = await import("../read/testMeta.js");
  const table =
    o.metaTable !== undefined ? matchMetaTable(await loadMetaTable(o.metaTable), files, o.metaTable) : undefined;
  if (files.length === 1)
    checkOutputPaths(
      [
        ["--report", o.report],
        ["--csv", o.csv],
      ],
      inputs,
      o.force,
    );
  if (o.reportDir !== undefined) await makeReportDir(o.reportDir);
  const now = new Date();
  const wantsReport = o.report !== undefined || o.reportDir !== undefined;
  const names = o.reportDir !== undefined ? reportFileNames(files) : [];
  const given = givenOptions(cmd);
  const rerun = rerunOptions({
    ...analysisOptions(o),
    histogram: wantsReport,
    forReport: wantsReport || undefined,
    control,
  });
  // Each recording's identity, key by key: --meta, its --meta-table row, a meta file beside it (read/testMeta.ts).
  const metas = new Map<string, RecordingMeta>();
  for (const f of files) {
    const m = await recordingMeta(f, meta, table?.get(f));
    metas.set(f, m);
    if (m.file !== undefined) inputs.push(m.file);
  }
  return { o, files, inputs, profile, meta, metas, control, wantsReport, now, names, given, rerun };
}

/** Makes --report-dir (and its parents); a folder that cannot be made is the user's to fix. */
async function makeReportDir(dir: string): Promise<void> {
  await makeFolders(dir).catch((e: NodeJS.ErrnoException) => {
    throw new InputError("OUTPUT_UNWRITABLE", {
      option: "--report-dir",
      expected: "a folder that exists or can be made",
      received: `${dir} (${fsReason(e)})`,
    });
  });
}

/** Where recording `index`'s report goes: --report, or its own name in --report-dir. */
function reportPath(run: CheckRun, index: number): string {
  return run.o.report !== undefined ? run.o.report : join(run.o.reportDir!, run.names[index]!);
}

/** A recording's test identity: its own (--meta-table row, a meta file beside it) over --meta. */
function metaOf(run: CheckRun, r: CheckResult): TestMeta | undefined {
  return run.metas.get(r.analysis.input.file)?.meta ?? run.meta;
}

/** Writes one recording's HTML report; gives the page's SHA-256 (for the batch index). */
async function writeCheckReport(run: CheckRun, r: CheckResult, index: number): Promise<string> {
  const { checkHtml } = await import("../report/htmlReport.js");
  const { sha256Hex } = await import("../report/embeddedResult.js");
  const html = checkHtml(r, VERSION, run.now, { meta: metaOf(run, r), given: run.given, rerun: run.rerun });
  await writeAtomic(reportPath(run, index), html, {
    inputs: run.inputs,
    force: run.o.force,
    option: run.o.report !== undefined ? "--report" : "--report-dir",
  });
  return sha256Hex(html);
}

/**
 * Several recordings on the batch pool (the one-recording outputs refused), reports and their index beside it; exits
 * with the worst.
 */
async function checkMany(runner: Runner, run: CheckRun): Promise<never> {
  const { o, files, profile, wantsReport, control } = run;
  if (o.report !== undefined)
    throw new InputError("OPTION_CONFLICT", {
      option: "--report",
      expected: "one recording with --report (use --report-dir for several)",
      received: `${files.length}`,
    });
  if (o.csv !== undefined)
    throw new InputError("OPTION_CONFLICT", {
      option: "--csv",
      expected: "one recording with --csv",
      received: `${files.length}`,
    });
  const { checkJson } = await import("../report/checkReport.js");
  const { worstFirst } = await import("../compare/complianceCheck.js");
  // Report writes run beside the batch; the first failure is kept and raised at the end.
  const reports: Promise<void>[] = [];
  const entries: BatchEntry[] = [];
  let reportError: unknown;
  const code = await runner.many<CheckResult>(
    files,
    { ...o, histogram: wantsReport, forReport: wantsReport || undefined, control },
    profile,
    verdictCode,
    (r, index) => {
      if (o.reportDir !== undefined) {
        const entry = batchEntry(run, r, index);
        entries.push(entry);
        reports.push(
          writeCheckReport(run, r, index)
            .then((h) => void (entry.reportSha256 = h))
            .catch((e: unknown) => void (reportError ??= e)),
        );
      }
      return summaryRows(r, worstFirst);
    },
    ["file", "channel", "RMS", "vs required", "DOF", "verdict", "worst excursion"],
    (r) => checkJson(r, VERSION, metaOf(run, r)),
  );
  await Promise.all(reports);
  if (reportError !== undefined) throw reportError;
  if (o.reportDir !== undefined) {
    const { batchIndexHtml, batchIndexName } = await import("../report/batchIndex.js");
    await writeAtomic(
      join(o.reportDir, batchIndexName(run.names)),
      batchIndexHtml(entries, files.length - entries.length, profile, VERSION, run.now, {
        meta: run.meta,
        given: run.given,
      }),
      { inputs: run.inputs, force: o.force, option: "--report-dir" },
    );
  }
  throw new Exit(code);
}

/** A recording's line in the batch index (--report-dir): verdict, channels, the reason and its report's name. */
function batchEntry(run: CheckRun, r: CheckResult, index: number): BatchEntry {
  return {
    file: r.analysis.input.file,
    sha256: r.analysis.input.sha256,
    verdict: r.verdict,
    report: basename(reportPath(run, index)),
    channels: r.channels
      .map((c, i) => `${r.analysis.channels[i]!.name} ${r.roles[i] === "monitor" ? "monitor" : c.verdict}`)
      .join(", "),
    ...batchWhy(r),
    testId: metaOf(run, r)?.testId,
    metaFrom: run.metas.get(r.analysis.input.file)?.from,
  };
}

/** A recording's rows in the batch's summary table: one per channel, with its worst excursion. */
function summaryRows(r: CheckResult, worstFirst: (excursions: Excursion[]) => Excursion[]): string[][] {
  return r.channels.map((c, i) => {
    const ch = r.analysis.channels[i]!;
    const w = worstFirst(c.excursions)[0];
    return [
      r.analysis.input.file,
      ch.name,
      `${sig(c.rms.measured, 4)} ${accelLabel(ch.units)}`,
      signedDb(c.rms.deviationDb),
      fixed(c.dof.achieved, 1),
      c.verdict,
      w ? `${sig(w.worstHz, 5)} Hz ${signedDb(w.worstDb)} ${w.shown ? "shown" : "not shown"}` : "none",
    ];
  });
}

/** A batch row's reason and worst excursion: from the worst judged channel (fail, then inconclusive, then pass). */
function batchWhy(r: CheckResult): { reason: string; worst: string } {
  const rank = { fail: 0, inconclusive: 1, pass: 2 } as const;
  const judged = r.channels
    .map((c, i) => ({ c, i }))
    .filter(({ i }) => r.roles[i] !== "monitor")
    .sort((a, b) => rank[a.c.verdict] - rank[b.c.verdict]);
  const top = judged[0];
  if (!top) return { reason: "", worst: "none" };
  const name = r.analysis.channels[top.i]!.name;
  const reason =
    top.c.findings[0] === undefined
      ? top.c.verdict === "pass"
        ? "every judged line and the RMS within tolerance"
        : `${name}: ${top.c.verdict}`
      : top.c.verdict === "pass"
        ? findingText(top.c.findings[0])
        : `${name}: ${findingText(top.c.findings[0])}`;
  let worst: { w: import("../compare/complianceCheck.js").Excursion; ch: string } | undefined;
  for (const { c, i } of judged)
    for (const w of c.excursions)
      if (!worst || Math.abs(w.worstDb) - Math.abs(w.limitDb) > Math.abs(worst.w.worstDb) - Math.abs(worst.w.limitDb))
        worst = { w, ch: r.analysis.channels[i]!.name };
  return {
    reason,
    worst: worst
      ? `${worst.ch}: ${sig(worst.w.worstHz, 5)} Hz ${signedDb(worst.w.worstDb)} (limit ${signedDb(worst.w.limitDb)}), ${worst.w.shown ? "shown" : "not shown"}`
      : "none",
  };
}
