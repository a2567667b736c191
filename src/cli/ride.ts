import type { Command } from "commander";
import { POSTURES, type Axis, type HealthZone, type Posture } from "../compare/wholeBodyExposure.js";
import { InputError, quoted } from "../errors.js";
import { VERSION } from "../version.js";
import type { CliIo } from "./io.js";
import {
  addReadingOptions,
  addSpectrumOptions,
  analysisOptions,
  givenOptions,
  numberOption,
  parseDuration,
  rerunOptions,
  type ParsedCommon,
} from "./options.js";
import { createProgress, progressEnabled } from "./progress.js";

/** `x=seat_x,y=2,z=seat_z` → channel of each axis. */
export function parseAxes(text: string): Partial<Record<Axis, string>> {
  const out: Partial<Record<Axis, string>> = {};
  for (const part of text.split(",")) {
    const m = /^\s*([xyz])\s*=\s*(.+?)\s*$/i.exec(part);
    const axis = m?.[1]?.toLowerCase() as Axis | undefined;
    if (!m || axis === undefined || out[axis] !== undefined) {
      throw new InputError("OPTION_INVALID", {
        option: "--axes",
        expected: "axis=channel pairs, each axis once: x=CH,y=CH,z=CH (a name or 1-based position)",
        received: quoted(part),
      });
    }
    out[axis] = m[2]!;
  }
  return out;
}

function exposureOption(text: string): number {
  const s = parseDuration(text);
  if (s === undefined || !(s > 0 && s <= 86400)) {
    throw new InputError("OPTION_INVALID", {
      option: "--exposure",
      expected: "a daily exposure such as 8h, 6.5h, 2h30min, 90min or 07:30 (at most 24 h)",
      received: quoted(text),
    });
  }
  return s;
}

export { parseDuration };

/** `a8=0.43-0.86,vdv=8.5-17` → the caution zone's bounds at 8 h (both pairs, lower below upper). */
export function parseHealthZone(text: string): HealthZone {
  const got: Record<string, [number, number]> = {};
  for (const part of text.split(",")) {
    const m = /^\s*(a8|vdv)\s*=\s*([0-9.]+)\s*[-–:]\s*([0-9.]+)\s*$/i.exec(part);
    const lo = Number(m?.[2]);
    const hi = Number(m?.[3]);
    if (!m || !(lo > 0 && hi > lo) || got[m[1]!.toLowerCase()]) {
      throw new InputError("OPTION_INVALID", {
        option: "--health-zone",
        expected:
          "a8=LOWER-UPPER,vdv=LOWER-UPPER (m/s² and m/s^1.75 at 8 h, lower below upper), e.g. a8=0.43-0.86,vdv=8.5-17",
        received: quoted(part),
      });
    }
    got[m[1]!.toLowerCase()] = [lo, hi];
  }
  if (!got.a8 || !got.vdv)
    throw new InputError("OPTION_INVALID", {
      option: "--health-zone",
      expected: "both bounds: a8=LOWER-UPPER,vdv=LOWER-UPPER",
      received: quoted(text),
    });
  return { a8LowerMs2: got.a8[0], a8UpperMs2: got.a8[1], vdvLowerMs175: got.vdv[0], vdvUpperMs175: got.vdv[1] };
}

interface RideFlags extends ParsedCommon {
  axes: Partial<Record<Axis, string>>;
  posture: Posture;
  exposure?: number;
  floor?: string;
  runningRms?: number;
  peakHold?: number;
  json?: boolean;
  quiet?: boolean;
  report?: string;
  csv?: string;
  force?: boolean;
  meta?: string;
  healthZone?: HealthZone;
}

/** Registers `psdgate ride` onto the program. */
export function registerRide(program: Command, io: CliIo): void {
  const cmd = addSpectrumOptions(
    addReadingOptions(
      program
        .command("ride")
        .argument("<file>", "ride recording: CSV or WAV")
        .description(
          "whole-body vibration of a ride: ISO 2631-1 weighted r.m.s., VDV, MTVV, daily exposure A(8) and VDV, comfort, seat transmissibility",
        ),
    ),
  );
  // Channels come from --axes and --floor, and results are SI: these two shared options stay out of ride's help (and
  // are refused).
  for (const opt of cmd.options) if (opt.long === "--channel" || opt.long === "--result-units") opt.hideHelp();
  cmd
    .requiredOption("--axes <pairs>", "channel of each axis, e.g. x=seat_x,y=seat_y,z=seat_z (z vertical)", parseAxes)
    .option(
      "--posture <p>",
      POSTURES.join(", "),
      (t: string) => {
        const p = t.toLowerCase() as Posture;
        if (!POSTURES.includes(p))
          throw new InputError("OPTION_INVALID", {
            option: "--posture",
            expected: `one of ${POSTURES.join(", ")}`,
            received: quoted(t),
          });
        return p;
      },
      "seated" as Posture,
    )
    .option(
      "--exposure <duration>",
      "daily exposure the recording stands for: 8h, 6.5h, 2h30min, 90min, 07:30; needed for A(8), the daily VDV and the Directive's values (a_w, VDV, MTVV come without it)",
      exposureOption,
    )
    .option(
      "--floor <channel>",
      "vertical floor channel beneath the seat: adds the seat's effective amplitude transmissibility (SEAT)",
    )
    .option(
      "--running-rms <s>",
      "integration time of the running r.m.s. and of the stationarity stretches (default 1 s); the analysed window must hold at least this and 5 s (the weighting filters' settling)",
      numberOption("--running-rms", (x) => x > 0 && x <= 60, "an integration time in s, 0 < t <= 60"),
    )
    .option(
      "--peak-hold <s>",
      "also a peak-hold spectrum of each axis (unweighted): at each line the largest Welch PSD of consecutive stretches of this length (s), beside the average",
      numberOption("--peak-hold", (x) => x > 0 && Number.isFinite(x), "a stretch length in s above 0"),
    )
    .option(
      "--health-zone <bounds>",
      "the ISO 2631-1 Annex B caution zone at 8 h as the lab has confirmed it: a8=LOWER-UPPER,vdv=LOWER-UPPER (default psdgate's a8=0.43-0.86,vdv=8.5-17, to be confirmed)",
      parseHealthZone,
    )
    .option(
      "--meta <file>",
      "the test's identity (YAML or JSON: testId, workOrder, item, serialNumber, axis, fixture, sensor, sensorSerial, sensorCalibrated, operator, location, notes), carried into --json and the report",
    )
    .option("--json", "print the result as JSON (SI units)")
    .option(
      "--report <out.html>",
      "also write a self-contained HTML report: level over time, spectrograms, spectra, exposure against the limit values",
    )
    .option(
      "--csv <out>",
      "also write the per-axis figures, each axis's unweighted and weighted PSD (and --peak-hold's) and its weighted running r.m.s. per stretch to this CSV (one value a row: axis,channel,quantity,frequency_hz,time_s,value,unit)",
    )
    .option("--force", "replace an existing report or CSV file")
    .option("-q, --quiet", "no progress bar")
    .addHelpText(
      "after",
      "\nWithout --exposure: a_w, crest factor, VDV, MTVV, total value and comfort of the recording; A(8), the daily VDV and their judgement need it.\nRates from 100 Hz up; every result states the weighting filter's error at its rate (a_w, VDV, MTVV, crest, A(8) carry it).\nRide's Welch defaults differ from psd's: 0.125 Hz lines (--resolution) and 75 % overlap (--overlap).\nResults are in SI units (m/s², m/s^1.75); --units and --scale say what the file holds.\nAn engineering estimate from one recording, not an occupational-health assessment: local regulations and competent persons decide.\n",
    )
    .action((file: string, o: RideFlags, cmd: Command) => runRide(io, file, o, cmd));
}

/**
 * Runs `ride` on one recording: shared options refused, outputs checked, the whole-body figures found, then written.
 */
async function runRide(io: CliIo, file: string, o: RideFlags, cmd: Command): Promise<void> {
  if (o.channel !== undefined)
    throw new InputError("OPTION_CONFLICT", {
      option: "--channel",
      expected: "channels given by --axes (and --floor) for ride",
      received: o.channel.join(","),
    });
  if (o.resultUnits !== undefined && o.resultUnits !== "m/s2")
    throw new InputError("OPTION_CONFLICT", {
      option: "--result-units",
      expected: "m/s2 (ride results are SI)",
      received: o.resultUnits,
    });
  const { rideRecording } = await import("../analyses/rideRecording.js");
  const { rideCsv, rideJson, rideText } = await import("../report/rideReport.js");
  const meta = o.meta !== undefined ? await (await import("../read/testMeta.js")).loadTestMeta(o.meta) : undefined;
  const inputs = [file, ...(o.meta !== undefined ? [o.meta] : [])];
  const { checkOutputPaths, writeAtomic } = await import("../report/writeAtomic.js");
  if (o.report !== undefined && o.report === o.csv)
    throw new InputError("OPTION_CONFLICT", {
      option: "--csv",
      expected: "a file other than --report's",
      received: quoted(o.csv),
    });
  checkOutputPaths(
    [
      ["--report", o.report],
      ["--csv", o.csv],
    ],
    inputs,
    o.force,
  );
  const progress = createProgress(progressEnabled(io.stderrIsTTY === true, o.quiet === true, io.env ?? {}), io.stderr);
  const { channels: _c, resultUnits: _r, ...base } = analysisOptions(o);
  const options = {
    ...base,
    axes: o.axes,
    posture: o.posture,
    exposureS: o.exposure,
    floor: o.floor,
    runningRmsS: o.runningRms,
    peakHoldS: o.peakHold,
    healthZone: o.healthZone,
  };
  let r: Awaited<ReturnType<typeof rideRecording>>;
  try {
    r = await rideRecording(file, {
      ...options,
      spectrogram: o.report !== undefined,
      onProgress: (d, t) => progress.update(d, t),
    });
  } finally {
    progress.end();
  }
  if (o.report !== undefined) {
    const { rideHtml } = await import("../report/rideHtml.js");
    await writeAtomic(
      o.report,
      rideHtml(r, VERSION, new Date(), { meta, given: givenOptions(cmd), rerun: rerunOptions(options) }),
      { inputs, force: o.force, option: "--report" },
    );
  }
  if (o.csv !== undefined) await writeAtomic(o.csv, rideCsv(r), { inputs, force: o.force, option: "--csv" });
  io.stdout(
    o.json ? JSON.stringify({ ...rideJson(r, VERSION), ...(meta ? { meta } : {}) }) + "\n" : rideText(r, VERSION),
  );
}
