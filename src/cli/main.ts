import { mkdir, stat } from "node:fs/promises";
import { availableParallelism } from "node:os";
import { basename, join } from "node:path";
import { Command, CommanderError } from "commander";
import type { RecordingAnalysis } from "../analyzeRecording.js";
import type { TestProfile } from "../compare/testProfile.js";
import { EXIT, InputError } from "../errors.js";
import type { CheckOptions, CheckResult } from "../checkRecording.js";
import { fixed, sig, signedDb, table } from "../report/format.js";
import { psdCsv, psdJson, toolInfo } from "../report/psdJson.js";
import { inspectText, psdText } from "../report/psdText.js";
import { RULE_SUMMARY, VERDICT_MEANING } from "../report/ruleText.js";
import { checkOutputPath, writeAtomic } from "../report/writeAtomic.js";
import { reportFileNames } from "../report/reportNames.js";
import { printable } from "../report/printable.js";
import { fsReason } from "../read/regularFile.js";
import { accelLabel } from "../units.js";
import { VERSION } from "../version.js";
import type { Outcome } from "./batch.js";
import { expandFiles } from "./fileList.js";
import { addBandOptions, addReadingOptions, addSpectrumOptions, analysisOptions, choice, givenOptions, numberOption, rerunOptions, type ParsedCommon } from "./options.js";
import { createProgress, progressEnabled } from "./progress.js";
import { Exit } from "./exit.js";
import { registerRide } from "./ride.js";
import { registerRespond } from "./respond.js";
import { registerDerive } from "./derive.js";
import { registerTransfer } from "./transfer.js";
import { registerVerify } from "./verify.js";
import { registerQueue } from "./queue.js";

// Modules that only some commands need (zod and yaml for profiles, d3 for the report, the batch pool)
// load on first use, so that a plain `psd` starts fast.
const analysis = () => import("../analyzeRecording.js");
const checking = () => import("../checkRecording.js");
const html = () => import("../report/htmlReport.js");
const checkReport = () => import("../report/checkReport.js");
const compliance = () => import("../compare/complianceCheck.js");
const profileReport = () => import("../report/profileText.js");
const batch = () => import("./batch.js");
const testMeta = () => import("../read/testMeta.js");
const psdReport = () => import("../report/psdHtml.js");

export interface CliIo {
  stdout: (s: string) => void;
  stderr: (s: string) => void;
  /** Whether stderr is a terminal (progress bars are drawn only there). */
  stderrIsTTY?: boolean | undefined;
  readStdin?: (() => Promise<string>) | undefined;
  env?: NodeJS.ProcessEnv | undefined;
}

async function readProcessStdin(): Promise<string> {
  let s = "";
  for await (const chunk of process.stdin) s += chunk;
  return s;
}

const processIo: CliIo = {
  stdout: (s) => process.stdout.write(s),
  stderr: (s) => process.stderr.write(s),
  stderrIsTTY: process.stderr.isTTY === true,
  readStdin: readProcessStdin,
  env: process.env,
};

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


/** Exit code of a set of outcomes: input error over fail over inconclusive over pass. */
const RANK: Record<number, number> = { [EXIT.ok]: 0, [EXIT.inconclusive]: 1, [EXIT.fail]: 2, [EXIT.input]: 3, [EXIT.internal]: 4 };
function worst(codes: number[]): number {
  return codes.reduce((a, b) => (RANK[b]! > RANK[a]! ? b : a), EXIT.ok);
}

function tooShort(a: RecordingAnalysis): InputError | undefined {
  if (!a.channels.some((c) => c.psd.averages === 0)) return undefined;
  return new InputError("RECORD_TOO_SHORT", {
    file: a.input.file, expected: `at least one segment of ${a.settings.segmentLength} samples`, received: `${a.input.samples} samples`,
    hint: "use a shorter --segment or a coarser --resolution",
  });
}

function verdictCode(r: CheckResult): number {
  return r.verdict === "pass" ? EXIT.ok : r.verdict === "fail" ? EXIT.fail : EXIT.inconclusive;
}

interface BatchFlags {
  json?: boolean;
  force?: boolean;
  jobs?: number;
  quiet?: boolean;
  filesFrom?: string;
}

function addBatchOptions(cmd: Command): Command {
  return cmd
    .option("--json", "print the result as JSON (one JSON line per recording when there are several)")
    .option("-j, --jobs <n>", "recordings analysed at once (default: the number of cores)", numberOption("--jobs", (x) => Number.isInteger(x) && x >= 1 && x <= 256, "a whole number from 1 to 256"))
    .option("--files-from <list>", "read recording paths, one per line, from this file (- for stdin)")
    .option("-q, --quiet", "no progress bar")
    .option("--force", "replace an existing output file");
}

export function buildProgram(io: CliIo): Command {
  const env = io.env ?? {};
  const readStdin = io.readStdin ?? (async () => "");
  const program = new Command("psdgate")
    .description("Acceleration PSD by Welch's method with confidence bounds, checked against a test profile")
    .version(VERSION, "-V, --version")
    .exitOverride()
    // commander's own errors (unknown command or option, missing value) become one USAGE line in runCli.
    .configureOutput({ writeOut: io.stdout, writeErr: io.stderr, outputError: () => undefined });

  const progressFor = (o: BatchFlags) => createProgress(progressEnabled(io.stderrIsTTY === true, o.quiet === true, env), io.stderr);

  /** One recording, with a progress bar on a terminal. */
  async function one<T>(o: BatchFlags, run: (onProgress: (done: number, total: number) => void) => Promise<T>): Promise<T> {
    const progress = progressFor(o);
    try {
      return await run((d, t) => progress.update(d, t));
    } finally {
      progress.end();
    }
  }

  /** Several recordings on the worker pool: JSON Lines or a summary table, exit code of the worst outcome. */
  async function many<T extends RecordingAnalysis | CheckResult>(
    files: string[], o: ParsedCommon & BatchFlags & { control?: CheckOptions["control"] }, profile: TestProfile | undefined,
    code: (r: T) => number, summaryRow: (r: T, index: number) => string[][], header: string[], jsonOf: (r: T) => unknown,
  ): Promise<number> {
    const progress = progressFor(o);
    let totalBytes = 0;
    for (const f of files) totalBytes += await stat(f).then((x) => x.size, () => 0);
    const codes: number[] = [];
    const rows: string[][] = [header];
    let count = 0;
    const { runBatch } = await batch();
    await runBatch<T>(
      files, { ...analysisOptions(o), control: o.control }, profile, o.jobs ?? availableParallelism(),
      (out: Outcome<T>, index: number) => {
        count++;
        if (!out.ok) {
          codes.push(out.internal ? EXIT.internal : EXIT.input);
          io.stderr(`psdgate: ${printable(out.error.message)}\n`);
          if (o.json) io.stdout(JSON.stringify({ tool: toolInfo(VERSION), input: { file: out.file }, error: { code: out.error.code, message: out.error.message } }) + "\n");
          rows.push([out.file, "", "", "", "", "error", out.error.code]);
          progress.line(`[${count}/${files.length}] ${printable(out.file)}  error ${out.error.code}`);
          return;
        }
        const c = code(out.result);
        codes.push(c);
        if (o.json) io.stdout(JSON.stringify(jsonOf(out.result)) + "\n");
        for (const row of summaryRow(out.result, index)) rows.push(row);
        progress.line(`[${count}/${files.length}] ${printable(out.file)}  ${"verdict" in out.result ? out.result.verdict : "done"}`);
      },
      (b) => progress.update(b, totalBytes),
    ).finally(() => progress.end());
    if (!o.json) io.stdout(`psdgate ${VERSION}: ${files.length} recordings\n${table(rows.map((r) => r.map(printable)))}\n`);
    return worst(codes);
  }

  addReadingOptions(
    program.command("inspect").argument("<file>", "recording: CSV or WAV").description("what is in a recording: channels, rate, length, statistics, warnings"),
  ).action(async (file: string, o: ParsedCommon) => {
    const { analyzeRecording } = await analysis();
    io.stdout(inspectText(await analyzeRecording(file, { ...analysisOptions(o), spectrum: false }), VERSION));
  });

  addBatchOptions(addBandOptions(addSpectrumOptions(addReadingOptions(program.command("psd").argument("[files...]", "recordings: CSV or WAV, globs, or - for a list on stdin").description("one-sided PSD by Welch's method, chi-square bounds and the Parseval check")))))
    .option("--csv <out>", "also write frequency, PSD and bounds of each channel to this CSV file (one recording)")
    .option("--report <out.html>", "also write a self-contained HTML record: PSD with its confidence band, statistics, histogram and the Parseval check per channel (one recording)")
    .option("--meta <file>", "the test's identity (YAML or JSON: testId, workOrder, item, serialNumber, axis, fixture, sensor, sensorSerial, sensorCalibrated, operator, location, notes), carried into --json and the report")
    .action(async (args: string[], o: ParsedCommon & BatchFlags & { csv?: string; report?: string; meta?: string }, cmd: Command) => {
      const files = await expandFiles(args, o.filesFrom, readStdin);
      const meta = o.meta !== undefined ? await (await testMeta()).loadTestMeta(o.meta) : undefined;
      const inputs = [...files, ...(o.filesFrom !== undefined ? [o.filesFrom] : []), ...(o.meta !== undefined ? [o.meta] : [])];
      if (files.length > 1) {
        if (o.csv !== undefined) throw new InputError("OPTION_CONFLICT", { option: "--csv", expected: "one recording with --csv", received: `${files.length}` });
        if (o.report !== undefined) throw new InputError("OPTION_CONFLICT", { option: "--report", expected: "one recording with --report", received: `${files.length}` });
        throw new Exit(await many<RecordingAnalysis>(
          files, o, undefined, (r) => {
            const short = tooShort(r);
            if (short) io.stderr(`psdgate: ${printable(short.message)}\n`);
            return short ? EXIT.input : EXIT.ok;
          },
          (r) => r.channels.map((c) => [r.input.file, c.name, `${sig(c.parseval.rmsTime, 4)} ${accelLabel(c.units)}`, `${sig(c.parseval.rmsPsd, 4)} ${accelLabel(c.units)}`, fixed(c.parseval.ratio, 4), fixed(c.psd.dof, 1), tooShort(r) ? "too short" : c.doubts.length ? "DOUBT" : "ok"]),
          ["file", "channel", "RMS time", "RMS PSD", "ratio", "DOF", "status"],
          (r) => {
            // A record too short for one segment is an input error: its JSON line says so, as an unreadable one does.
            const short = tooShort(r);
            return short ? { ...psdJson(r, VERSION, meta), error: { code: short.code, message: short.message } } : psdJson(r, VERSION, meta);
          },
        ));
      }
      if (o.csv !== undefined) checkOutputPath(o.csv, inputs, o.force, "--csv");
      if (o.report !== undefined) checkOutputPath(o.report, inputs, o.force, "--report");
      const { analyzeRecording } = await analysis();
      const options = { ...analysisOptions(o), histogram: o.report !== undefined ? true : o.histogram };
      const a = await one(o, (onProgress) => analyzeRecording(files[0]!, { ...options, onProgress }));
      const short = tooShort(a);
      if (short) throw short;
      if (o.csv !== undefined) await writeAtomic(o.csv, psdCsv(a), { inputs, force: o.force, option: "--csv" });
      if (o.report !== undefined) {
        const { psdHtml } = await psdReport();
        await writeAtomic(o.report, psdHtml(a, VERSION, new Date(), { meta, given: givenOptions(cmd), rerun: rerunOptions(options) }), { inputs, force: o.force, option: "--report" });
      }
      io.stdout(o.json ? JSON.stringify(psdJson(a, VERSION, meta)) + "\n" : psdText(a, VERSION));
    });

  program
    .command("profile")
    .argument("<file>", "test profile: JSON, YAML or two-column CSV (Hz, level)")
    .description("breakpoints, slopes, overall RMS, velocity and stroke of a required profile")
    .option("--json", "print the result as JSON")
    .action(async (file: string, o: { json?: boolean }) => {
      const { loadProfile } = await checking();
      const { profileJson, profileText } = await profileReport();
      const p = await loadProfile(file);
      io.stdout(o.json ? JSON.stringify(profileJson(p, VERSION)) + "\n" : profileText(p, VERSION));
    });

  addBatchOptions(addSpectrumOptions(addReadingOptions(program.command("check").argument("[files...]", "recordings: CSV or WAV, globs, or - for a list on stdin").description("judge recordings against a profile: pass (exit 0), fail (1), inconclusive (3)")), "the profile's resolutionHz, else 4096"))
    .requiredOption("-p, --profile <file>", "the required profile (JSON, YAML or CSV)")
    .option("--control <channels>", "judge these channels (names or positions, comma-separated) as one control spectrum; the others are monitoring channels, shown and not judged")
    .option("--control-rule <rule>", "how the control channels make one spectrum: average (mean PSD at each line) or largest (the highest at each line)", choice("--control-rule", ["average", "largest"]), "average")
    .addHelpText("after", `\n${wrap(`Decision rule: ${RULE_SUMMARY}`, "")}\n\nVerdicts:\n${(["pass", "fail", "inconclusive"] as const).map((v) => wrap(`${v} (exit ${v === "pass" ? 0 : v === "fail" ? 1 : 3}): ${VERDICT_MEANING[v]}.`, "  ")).join("\n")}\n`)
    .option("--report <out.html>", "also write a self-contained HTML report for review and signature (one recording)")
    .option("--report-dir <dir>", "write one HTML report per recording into this folder, named after it")
    .option("--meta <file>", "the test's identity (YAML or JSON: testId, workOrder, item, serialNumber, axis, fixture, sensor, sensorSerial, sensorCalibrated, operator, location, notes), carried into --json and the report")
    .option("--csv <out>", "also write the lines judged (frequency, measured, required, deviation, limits, status, shown) to this CSV file (one recording)")
    .action(async (args: string[], o: ParsedCommon & BatchFlags & { profile: string; report?: string; reportDir?: string; control?: string; controlRule: "average" | "largest"; meta?: string; csv?: string }, cmd: Command) => {
      const { loadProfile, checkRecording } = await checking();
      const control = o.control !== undefined ? { channels: o.control.split(",").map((x) => x.trim()).filter(Boolean), rule: o.controlRule } : undefined;
      const { checkHtml } = await html();
      const { checkJson, checkText } = await checkReport();
      const { worstFirst } = await compliance();
      const profile = await loadProfile(o.profile);
      const meta = o.meta !== undefined ? await (await testMeta()).loadTestMeta(o.meta) : undefined;
      const files = await expandFiles(args, o.filesFrom, readStdin);
      const inputs = [...files, o.profile, ...(o.filesFrom !== undefined ? [o.filesFrom] : []), ...(o.meta !== undefined ? [o.meta] : [])];
      if (o.report !== undefined && files.length === 1) checkOutputPath(o.report, inputs, o.force, "--report");
      if (o.csv !== undefined && files.length === 1) checkOutputPath(o.csv, inputs, o.force, "--csv");
      if (o.reportDir !== undefined) {
        await mkdir(o.reportDir, { recursive: true }).catch((e: NodeJS.ErrnoException) => {
          throw new InputError("OUTPUT_UNWRITABLE", { option: "--report-dir", expected: "a folder that exists or can be made", received: `${o.reportDir} (${fsReason(e)})` });
        });
      }
      const now = new Date();
      const wantsReport = o.report !== undefined || o.reportDir !== undefined;
      // One name per recording, derived from its path, never shared (report/reportNames.ts).
      const names = o.reportDir !== undefined ? reportFileNames(files) : [];
      const reportPath = (index: number) => (o.report !== undefined ? o.report : join(o.reportDir!, names[index]!));
      const given = givenOptions(cmd);
      const rerun = rerunOptions({ ...analysisOptions(o), histogram: wantsReport, control });
      const writeReport = (r: CheckResult, index: number) =>
        writeAtomic(reportPath(index), checkHtml(r, VERSION, now, { meta, given, rerun }), { inputs, force: o.force, option: o.report !== undefined ? "--report" : "--report-dir" });
      if (files.length > 1) {
        if (o.report !== undefined) throw new InputError("OPTION_CONFLICT", { option: "--report", expected: "one recording with --report (use --report-dir for several)", received: `${files.length}` });
        if (o.csv !== undefined) throw new InputError("OPTION_CONFLICT", { option: "--csv", expected: "one recording with --csv", received: `${files.length}` });
        // Report writes run beside the batch; the first failure is kept and raised at the end.
        const reports: Promise<void>[] = [];
        const entries: import("../report/batchIndex.js").BatchEntry[] = [];
        let reportError: unknown;
        const code = await many<CheckResult>(
          files, { ...o, histogram: wantsReport, control }, profile, verdictCode,
          (r, index) => {
            if (o.reportDir !== undefined) {
              reports.push(writeReport(r, index).catch((e: unknown) => void (reportError ??= e)));
              entries.push({ file: r.analysis.input.file, sha256: r.analysis.input.sha256, verdict: r.verdict, report: basename(reportPath(index)), channels: r.channels.map((c, i) => `${r.analysis.channels[i]!.name} ${r.roles[i] === "monitor" ? "monitor" : c.verdict}`).join(", ") });
            }
            return r.channels.map((c, i) => {
              const ch = r.analysis.channels[i]!;
              const w = worstFirst(c.excursions)[0];
              return [r.analysis.input.file, ch.name, `${sig(c.rms.measured, 4)} ${accelLabel(ch.units)}`, signedDb(c.rms.deviationDb), fixed(c.dof.achieved, 1), c.verdict,
                w ? `${sig(w.worstHz, 5)} Hz ${signedDb(w.worstDb)} ${w.shown ? "shown" : "not shown"}` : "none"];
            });
          },
          ["file", "channel", "RMS", "vs required", "DOF", "verdict", "worst excursion"], (r) => checkJson(r, VERSION, meta),
        );
        await Promise.all(reports);
        if (reportError !== undefined) throw reportError;
        if (o.reportDir !== undefined) {
          const { batchIndexHtml, batchIndexName } = await import("../report/batchIndex.js");
          await writeAtomic(join(o.reportDir, batchIndexName(names)), batchIndexHtml(entries, files.length - entries.length, profile, VERSION, now), { inputs, force: o.force, option: "--report-dir" });
        }
        throw new Exit(code);
      }
      const r = await one(o, (onProgress) => checkRecording(files[0]!, profile, { ...analysisOptions(o), histogram: wantsReport, control, onProgress }));
      if (o.csv !== undefined) {
        const { checkCsv } = await import("../report/checkCsv.js");
        await writeAtomic(o.csv, checkCsv(r), { inputs, force: o.force, option: "--csv" });
      }
      if (o.report !== undefined || o.reportDir !== undefined) await writeReport(r, 0);
      io.stdout(o.json ? JSON.stringify(checkJson(r, VERSION, meta)) + "\n" : checkText(r, VERSION));
      throw new Exit(verdictCode(r));
    });

  program
    .command("synth")
    .description("a seeded Gaussian random time history whose PSD follows a profile (WAV float32 or CSV)")
    .requiredOption("-p, --profile <file>", "profile to follow")
    .requiredOption("-d, --duration <s>", "length in seconds", numberOption("--duration", (x) => x > 0 && x <= 86400, "a duration in s, 0 < d <= 86400"))
    .requiredOption("--rate <hz>", "sample rate", numberOption("--rate", (x) => x > 0 && Number.isInteger(x), "a whole sample rate in Hz"))
    .requiredOption("-o, --out <file>", "output .wav or .csv")
    .option("--seed <n>", "random seed (same seed, same record)", numberOption("--seed", (x) => Number.isInteger(x) && x >= 0 && x < 2 ** 32, "a whole number 0 <= n < 2^32"), 1)
    .option("--channels <n>", "independent channels", numberOption("--channels", (x) => Number.isInteger(x) && x >= 1 && x <= 64, "1 to 64"), 1)
    .option("--level-db <db>", "shift the whole profile by this many dB (a hot or cold run)", numberOption("--level-db", (x) => Math.abs(x) <= 60, "a level shift within ±60 dB"), 0)
    .option("--force", "replace an existing output file")
    .action(async (o: { profile: string; duration: number; rate: number; out: string; seed: number; channels: number; levelDb: number; force?: boolean }) => {
      const { loadProfile } = await checking();
      const { createTimeHistoryWriter } = await import("../report/timeHistoryWriter.js");
      const { synthesizeProfile } = await import("../synth/synthesizeProfile.js");
      const profile = await loadProfile(o.profile);
      if (/\.wav$/i.test(o.out) && 44 + Math.ceil(o.duration * o.rate) * o.channels * 4 > 0xffffffff) {
        throw new InputError("OPTION_INVALID", { option: "--duration", expected: "a WAV output under 4 GiB (the RIFF size field is 32-bit)", received: `${o.duration} s x ${o.rate} Hz x ${o.channels} channel(s)`, hint: "write .csv, or fewer seconds or channels" });
      }
      const names = Array.from({ length: o.channels }, (_, i) => `ch${i + 1}`);
      const writer = await createTimeHistoryWriter(o.out, { sampleRateHz: o.rate, channelNames: names, units: profile.units, force: o.force, option: "--out", inputs: [o.profile] });
      let r;
      try {
        r = await synthesizeProfile(profile, { durationS: o.duration, sampleRateHz: o.rate, seed: o.seed, channels: o.channels, levelFactor: 10 ** (o.levelDb / 10) }, (b, n) => writer.write(b, n));
        await writer.close();
      } catch (e) {
        await writer.abort();
        throw e;
      }
      const u = accelLabel(profile.units);
      io.stdout(`psdgate ${VERSION}: wrote ${printable(o.out)}: ${r.frames} samples x ${o.channels} channel(s) at ${o.rate} Hz, seed ${o.seed}, ${r.filterTaps}-tap shaping filter\n`);
      io.stdout(`  profile "${printable(profile.title)}" ${sig(profile.rms, 4)} ${u} RMS${o.levelDb !== 0 ? `, shifted ${o.levelDb} dB to ${sig(profile.rms * 10 ** (o.levelDb / 20), 4)} ${u}` : ""}\n`);
      r.stats.forEach((s, i) => io.stdout(`  ${names[i]}  RMS ${sig(s.rms, 4)} ${u}, kurtosis ${s.kurtosis.toFixed(3)}, crest factor ${s.crestFactor.toFixed(2)}\n`));
    });

  registerRide(program, io);
  for (const register of [registerTransfer, registerRespond, registerDerive, registerQueue, registerVerify]) register(program, io);

  return program;
}

const USAGE_EXPECTED: Record<string, string> = {
  "commander.unknownCommand": "one of the commands inspect, psd, profile, check, synth",
  "commander.help": "a command: inspect, psd, profile, check or synth",
  "commander.unknownOption": "an option of this command",
  "commander.missingArgument": "the command's arguments",
  "commander.optionMissingArgument": "a value after the option",
  "commander.missingMandatoryOptionValue": "every required option",
  "commander.excessArguments": "no more arguments",
  "commander.conflictingOption": "options that go together",
};

/** commander's own error as one line with the USAGE code, like every other error. */
function usageError(e: CommanderError): InputError {
  return new InputError("USAGE", {
    expected: USAGE_EXPECTED[e.code] ?? "a valid command line",
    received: e.code === "commander.help" ? "no command (the help above lists them)" : e.message.replace(/^error: /, "").split("\n")[0]!, hint: "run psdgate --help",
  });
}

/** Runs the CLI and returns the exit code; never throws. */
export async function runCli(argv: string[], io: CliIo = processIo): Promise<number> {
  const program = buildProgram(io);
  try {
    await program.parseAsync(argv, { from: "user" });
    return EXIT.ok;
  } catch (e) {
    if (e instanceof Exit) return e.code;
    if (e instanceof InputError) {
      io.stderr(`psdgate: ${printable(e.message)}\n`);
      return EXIT.input;
    }
    if (e instanceof CommanderError) {
      if (e.exitCode === 0) return EXIT.ok;
      io.stderr(`psdgate: ${usageError(e).message}\n`);
      return EXIT.input;
    }
    const err = e as Error;
    io.stderr(`psdgate: internal error: ${printable(String(err?.message ?? e))} [INTERNAL]\nThis is a bug in psdgate ${VERSION}; please report it with the command line and input file.\n`);
    if (io.env?.PSDGATE_DEBUG) io.stderr(`${err?.stack}\n`);
    return EXIT.internal;
  }
}


