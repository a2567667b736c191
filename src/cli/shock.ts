import type { Command } from "commander";
import { InputError } from "../errors.js";
import type { CliIo } from "./io.js";
import {
  addReadingOptions,
  addSpectrumOptions,
  analysisOptions,
  givenOptions,
  numberOption,
  rerunOptions,
  type ParsedCommon,
} from "./options.js";
import { createProgress, progressEnabled } from "./progress.js";

interface ShockFlags extends ParsedCommon {
  fn: string;
  q: number;
  threshold?: number;
  thresholdFactor?: number;
  hold?: number;
  pre?: number;
  post?: number;
  top: number;
  primaryResidual?: boolean;
  json?: boolean;
  csv?: string;
  report?: string;
  meta?: string;
  force?: boolean;
  quiet?: boolean;
}

/** `psdgate shock FILE --fn A:B --q Q`: the events of a recording, largest first, and their shock response spectra. */
export function registerShock(program: Command, io: CliIo): void {
  addSpectrumOptions(
    addReadingOptions(
      program
        .command("shock")
        .argument("<file>", "recording: CSV or WAV")
        .description(
          "events (peaks above a threshold, merged within a hold time), largest first, and shock response spectra (maximax, positive, negative, PVSS) per event and for the whole record",
        ),
    ),
  )
    .requiredOption(
      "--fn <grid>",
      "natural frequencies: A:B (6 per octave), A:B:N (N per octave) or a list A,B,C, in Hz (at most fs/4; fs/10 or lower for a peak within 4.9 % of the continuous response, 8 % on a recorded, band-limited input)",
    )
    .option(
      "--q <Q>",
      "quality factor Q = 1 / (2 zeta) (default 10, common practice for shock)",
      numberOption("--q", (x) => x > 0.5 && x <= 1000, "a Q above 0.5 and at most 1000"),
      10,
    )
    .option(
      "--threshold <a>",
      "event threshold on |x - mean|, in the result unit (default: --threshold-factor x the background r.m.s.)",
      numberOption("--threshold", (x) => x > 0, "a level above 0"),
    )
    .option(
      "--threshold-factor <k>",
      "threshold as k x the background r.m.s. (median of 1 s stretches, of 0.1 s ones under 3 s; default 6)",
      numberOption("--threshold-factor", (x) => x > 0 && x <= 1000, "a factor above 0 and at most 1000"),
    )
    .option(
      "--hold <s>",
      "exceedances closer than this are one event (default 0.05 s)",
      numberOption("--hold", (x) => x > 0 && x <= 60, "a time in s, 0 < t <= 60"),
    )
    .option(
      "--pre <s>",
      "an event's SRS window starts this long before its first exceedance (default: the hold time)",
      numberOption("--pre", (x) => x >= 0 && x <= 600, "a time in s from 0 to 600"),
    )
    .option(
      "--post <s>",
      "... and ends this long after its last (default: the larger of the hold time and one period of the lowest fn)",
      numberOption("--post", (x) => x >= 0 && x <= 600, "a time in s from 0 to 600"),
    )
    .option(
      "--primary-residual",
      "also each event's primary spectrum (up to its last exceedance) and residual spectrum (after it), in --json",
    )
    .option(
      "--top <n>",
      "events listed in the text (default 10; --json and --csv hold all)",
      numberOption("--top", (x) => Number.isInteger(x) && x >= 1, "a whole number of at least 1"),
      10,
    )
    .option("--json", "print the result as JSON")
    .option(
      "--csv <out>",
      "also write every spectrum (the record's and each event's) to this CSV file, one row per natural frequency",
    )
    .option(
      "--report <out.html>",
      "also write a self-contained HTML record: event timeline, SRS plots, the event table, identity and sign-off (psdgate verify re-runs it)",
    )
    .option(
      "--meta <file>",
      "the test's identity (YAML or JSON: testId, workOrder, item, serialNumber, axis, fixture, sensor, sensorSerial, sensorCalibrated, operator, location, notes), carried into the report",
    )
    .option("--force", "replace an existing output file")
    .option("-q, --quiet", "no progress bar")
    .addHelpText(
      "after",
      "\nThe recording is read twice: first for each channel's mean and background level, then for the events and spectra.\nAn SRS is one engineering summary of a shock, not a structural verdict.\n",
    )
    .action((file: string, o: ShockFlags, cmd: Command) => runShock(io, file, o, cmd));
}

/** Runs `shock` on one recording: options checked, outputs checked, the events and spectra found, then written. */
async function runShock(io: CliIo, file: string, o: ShockFlags, cmd: Command): Promise<void> {
  if (o.threshold !== undefined && o.thresholdFactor !== undefined)
    throw new InputError("OPTION_CONFLICT", {
      option: "--threshold",
      expected: "--threshold or --threshold-factor, not both",
      received: "both",
    });
  const { parseFnGrid } = await import("../analyses/responseSpectra.js");
  const { shockRecording } = await import("../analyses/shockRecording.js");
  const { shockCsv, shockJson, shockText } = await import("../report/shockReport.js");
  const { checkOutputPaths, writeAtomic } = await import("../report/writeAtomic.js");
  const { VERSION } = await import("../version.js");
  const fnHz = parseFnGrid(o.fn, "--fn");
  const meta = o.meta !== undefined ? await (await import("../read/testMeta.js")).loadTestMeta(o.meta) : undefined;
  const inputs = [file, ...(o.meta !== undefined ? [o.meta] : [])];
  checkOutputPaths(
    [
      ["--csv", o.csv],
      ["--report", o.report],
    ],
    inputs,
    o.force,
  );
  const { histogram: _h, ...base } = analysisOptions(o);
  const progress = createProgress(progressEnabled(io.stderrIsTTY === true, o.quiet === true, io.env ?? {}), io.stderr);
  const options = {
    ...base,
    fnHz,
    q: o.q,
    threshold: o.threshold,
    thresholdFactor: o.thresholdFactor,
    holdS: o.hold,
    preS: o.pre,
    postS: o.post,
    primaryResidual: o.primaryResidual,
  };
  let r: Awaited<ReturnType<typeof shockRecording>>;
  try {
    r = await shockRecording(file, { ...options, onProgress: (d, t) => progress.update(d, t) });
  } finally {
    progress.end();
  }
  if (o.csv !== undefined) await writeAtomic(o.csv, shockCsv(r), { inputs, force: o.force, option: "--csv" });
  if (o.report !== undefined) {
    const { shockHtml } = await import("../report/shockHtml.js");
    const rerun = rerunOptions({ ...options, fnHz: Array.from(fnHz) } as never);
    await writeAtomic(o.report, shockHtml(r, VERSION, new Date(), { meta, given: givenOptions(cmd), rerun }), {
      inputs,
      force: o.force,
      option: "--report",
    });
  }
  io.stdout(o.json ? JSON.stringify(shockJson(r, VERSION)) + "\n" : shockText(r, VERSION, o.top));
}
