import type { Command } from "commander";
import { recordTooShort, type RecordingAnalysis } from "../pass/analyzeRecording.js";
import { EXIT, InputError } from "../errors.js";
import { fixed, sig } from "../report/format.js";
import { printable } from "../report/printable.js";
import { psdCsv, psdJson } from "../report/psdJson.js";
import { psdText } from "../report/psdText.js";
import { checkOutputPaths, writeAtomic } from "../report/writeAtomic.js";
import { accelLabel } from "../units.js";
import { VERSION } from "../version.js";
import { Exit } from "./exit.js";
import { expandFiles } from "./fileList.js";
import { asCliError } from "./optionFlags.js";
import type { CliIo } from "./io.js";
import {
  addBandOptions,
  addReadingOptions,
  addSpectrumOptions,
  analysisOptions,
  givenOptions,
  numberOption,
  rerunOptions,
  type ParsedCommon,
} from "./options.js";
import { addBatchOptions, runnerFor, type BatchFlags, type Runner } from "./runner.js";
import type { TestMeta } from "../read/testMeta.js";

type PsdFlags = ParsedCommon & BatchFlags & { csv?: string; report?: string; meta?: string; peakHold?: number };

/** `psdgate psd FILE…`: the PSD of one or several recordings. */
export function registerPsd(program: Command, io: CliIo): void {
  const runner = runnerFor(io);
  addBatchOptions(
    addBandOptions(
      addSpectrumOptions(
        addReadingOptions(
          program
            .command("psd")
            .argument("[files...]", "recordings: CSV or WAV, globs, or - for a list on stdin")
            .description("one-sided PSD by Welch's method, chi-square bounds and the Parseval check"),
        ),
      ),
    ),
  )
    .option(
      "--csv <out>",
      "also write frequency, PSD and bounds of each channel (and its peak-hold with --peak-hold) to this CSV file (one recording)",
    )
    .option(
      "--report <out.html>",
      "also write a self-contained HTML record: PSD with its confidence band, statistics, histogram and the Parseval check per channel (one recording)",
    )
    .option(
      "--peak-hold <s>",
      "also a peak-hold spectrum: at each line the largest Welch PSD of consecutive stretches of this length (s), beside the average (--json: peakHold)",
      numberOption("--peak-hold", (x) => x > 0 && Number.isFinite(x), "a stretch length in s above 0"),
    )
    .option(
      "--meta <file>",
      "the test's identity (YAML or JSON: testId, workOrder, item, serialNumber, axis, fixture, sensor, sensorSerial, sensorCalibrated, operator, location, notes), carried into --json and the report",
    )
    .action((args: string[], o: PsdFlags, cmd: Command) => runPsd(io, runner, args, o, cmd));
}

/** Runs `psd`: the recordings listed, several on the batch pool, one here with its CSV and report. */
async function runPsd(io: CliIo, runner: Runner, args: string[], o: PsdFlags, cmd: Command): Promise<void> {
  const files = await expandFiles(args, o.filesFrom, io.readStdin ?? (async () => ""));
  const meta = o.meta !== undefined ? await (await import("../read/testMeta.js")).loadTestMeta(o.meta) : undefined;
  const inputs = [
    ...files,
    ...(o.filesFrom !== undefined ? [o.filesFrom] : []),
    ...(o.meta !== undefined ? [o.meta] : []),
  ];
  if (files.length > 1) throw new Exit(await psdMany(io, runner, files, o, meta));
  checkOutputPaths(
    [
      ["--csv", o.csv],
      ["--report", o.report],
    ],
    inputs,
    o.force,
  );
  const { runAnalysis } = await import("../analyses/runAnalysis.js");
  const options = {
    ...analysisOptions(o),
    histogram: o.report !== undefined ? true : o.histogram,
    peakHoldS: o.peakHold,
    forReport: o.report !== undefined || undefined,
  };
  const a = await runner.one(o, (onProgress) => runAnalysis({ kind: "psd", file: files[0]!, options }, onProgress));
  const short = recordTooShort(a);
  if (short) throw short;
  if (o.csv !== undefined) await writeAtomic(o.csv, psdCsv(a), { inputs, force: o.force, option: "--csv" });
  if (o.report !== undefined) {
    const { psdHtml } = await import("../report/psdHtml.js");
    await writeAtomic(
      o.report,
      psdHtml(a, VERSION, new Date(), { meta, given: givenOptions(cmd), rerun: rerunOptions(options) }),
      { inputs, force: o.force, option: "--report" },
    );
  }
  io.stdout(o.json ? JSON.stringify(psdJson(a, VERSION, meta)) + "\n" : psdText(a, VERSION));
}

/** Several recordings on the batch pool (the one-recording outputs refused): the exit code of the worst. */
async function psdMany(
  io: CliIo,
  runner: Runner,
  files: string[],
  o: PsdFlags,
  meta: TestMeta | undefined,
): Promise<number> {
  if (o.csv !== undefined)
    throw new InputError("OPTION_CONFLICT", {
      option: "--csv",
      expected: "one recording with --csv",
      received: `${files.length}`,
    });
  if (o.report !== undefined)
    throw new InputError("OPTION_CONFLICT", {
      option: "--report",
      expected: "one recording with --report",
      received: `${files.length}`,
    });
  if (o.peakHold !== undefined)
    throw new InputError("OPTION_CONFLICT", {
      option: "--peak-hold",
      expected: "one recording with --peak-hold",
      received: `${files.length}`,
    });
  return runner.many<RecordingAnalysis>(
    files,
    o,
    undefined,
    (r) => {
      const short = recordTooShort(r);
      if (short) io.stderr(`psdgate: ${printable(asCliError(short).message)}\n`);
      return short ? EXIT.input : EXIT.ok;
    },
    (r) =>
      r.channels.map((c) => [
        r.input.file,
        c.name,
        `${sig(c.parseval.rmsTime, 4)} ${accelLabel(c.units)}`,
        `${sig(c.parseval.rmsPsd, 4)} ${accelLabel(c.units)}`,
        fixed(c.parseval.ratio, 4),
        fixed(c.psd.dof, 1),
        recordTooShort(r) ? "too short" : c.doubts.length ? "DOUBT" : "ok",
      ]),
    ["file", "channel", "RMS time", "RMS PSD", "ratio", "DOF", "status"],
    (r) => {
      // A record too short for one segment is an input error: its JSON line says so, as an unreadable one does.
      const short = recordTooShort(r);
      return short
        ? { ...psdJson(r, VERSION, meta), error: { code: short.code, message: asCliError(short).message } }
        : psdJson(r, VERSION, meta);
    },
  );
}
