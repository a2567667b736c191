import type { Command } from "commander";
import { InputError } from "../errors.js";
import type { CliIo } from "./io.js";
import type { RespondRerun } from "../analyses/responseSpectra.js";
import {
  addReadingOptions,
  addSpectrumOptions,
  analysisOptions,
  givenOptions,
  numberOption,
  type ParsedCommon,
} from "./options.js";

interface RespondFlags extends ParsedCommon {
  fn: string;
  q: number;
  duration?: number;
  basquin?: number;
  snConstant?: number;
  stressPerMetre?: number;
  against?: string;
  againstDuration?: number;
  againstChannel?: string;
  strokeMm?: number;
  as?: "recording" | "profile" | "psd";
  json?: boolean;
  report?: string;
  csv?: string;
  meta?: string;
  force?: boolean;
  quiet?: boolean;
}

const KINDS = ["recording", "profile", "psd"] as const;

/** `psdgate respond SOURCE --fn A:B --q Q`: SDOF response, extreme-response and fatigue-damage spectra of an input. */
export function registerRespond(program: Command, io: CliIo): void {
  addRespondModelOptions(
    addSpectrumOptions(
      addReadingOptions(
        program
          .command("respond")
          .argument(
            "<source>",
            "input: a recording (CSV or WAV), a profile (JSON or YAML) or a PSD table written by psd --csv",
          )
          .description(
            "what a single-degree-of-freedom structure feels at each natural frequency: response RMS (exact and Miles), largest peak, fatigue damage, and the input's stroke",
          ),
      ),
    ),
  )
    .option(
      "--against <source>",
      "a second input to compare with (e.g. the lab profile against a field recording): where it under- or over-tests",
    )
    .option(
      "--against-duration <s>",
      "exposure of the --against input (default its own)",
      numberOption("--against-duration", (x) => x > 0, "a duration in s above 0"),
    )
    .option("--against-channel <name|n>", "channel of the --against input (default the first)")
    .option(
      "--stroke-mm <mm>",
      "the exciter's rated peak-to-peak stroke, to check the displacement estimate against",
      numberOption("--stroke-mm", (x) => x > 0, "a stroke in mm above 0"),
    )
    .option(
      "--as <kind>",
      "read SOURCE as recording, profile or psd (default: by extension and first line)",
      (v: string) => {
        if (!(KINDS as readonly string[]).includes(v))
          throw new InputError("OPTION_INVALID", {
            option: "--as",
            expected: `one of ${KINDS.join(", ")}`,
            received: JSON.stringify(v),
          });
        return v;
      },
    )
    .option("--json", "print the result as JSON")
    .option(
      "--report <out.html>",
      "also write a self-contained HTML record: response spectra, kinematics and stroke, identity and sign-off (psdgate verify re-runs it)",
    )
    .option(
      "--csv <out>",
      "also write per natural frequency the response RMS (exact, Miles), relative displacement, largest peak and damage (and --against's, with the ratios) to this CSV",
    )
    .option(
      "--meta <file>",
      "the test's identity (YAML or JSON: testId, workOrder, item, serialNumber, axis, fixture, sensor, sensorSerial, sensorCalibrated, operator, location, notes), carried into --json and the report",
    )
    .option("--force", "replace an existing report file")
    .option("-q, --quiet", "no progress bar (respond shows none; accepted so every analysis command takes it)")
    .action((source: string, o: RespondFlags, cmd: Command) => runRespond(io, source, o, cmd));
}

/** respond's input band and its SDOF model: the natural frequencies, Q, exposure and S-N curve. */
function addRespondModelOptions(cmd: Command): Command {
  return cmd
    .option(
      "--fmin <hz>",
      "lowest frequency of the input used (default: the first line above 0 Hz, or the profile's start)",
      numberOption("--fmin", (x) => x > 0, "a frequency in Hz above 0"),
    )
    .option(
      "--fmax <hz>",
      "highest frequency of the input used (default: the last line, or the profile's end)",
      numberOption("--fmax", (x) => x > 0, "a frequency in Hz above 0"),
    )
    .requiredOption(
      "--fn <grid>",
      "natural frequencies: A:B (6 per octave), A:B:N (N per octave) or a list A,B,C, in Hz",
    )
    .requiredOption(
      "--q <Q>",
      "quality factor Q = 1 / (2 zeta), e.g. 10",
      numberOption("--q", (x) => x > 0.5 && x <= 1000, "a Q above 0.5 and at most 1000"),
    )
    .option(
      "--duration <s>",
      "exposure for the largest peak and the damage (default: the recording's length or the profile's durationS)",
      numberOption("--duration", (x) => x > 0, "a duration in s above 0"),
    )
    .option(
      "--basquin <b>",
      "Basquin exponent b of the S-N curve N S^b = C (default 8, common practice: choose the material's)",
      numberOption("--basquin", (x) => x >= 1 && x <= 30, "an exponent from 1 to 30"),
    )
    .option(
      "--sn-constant <C>",
      "the constant C of N S^b = C (default 1: a relative damage)",
      numberOption("--sn-constant", (x) => x > 0, "a number above 0"),
    )
    .option(
      "--stress-per-metre <K>",
      "stress per metre of relative displacement (default 1: a relative damage)",
      numberOption("--stress-per-metre", (x) => x > 0, "a number above 0"),
    );
}

/** Runs `respond`: the grid checked, outputs checked, the response spectra (and --against's) computed, then written. */
async function runRespond(io: CliIo, source: string, o: RespondFlags, cmd: Command): Promise<void> {
  const { parseFnGrid, runResponse } = await import("../analyses/responseSpectra.js");
  const { responseJson, responseText } = await import("../report/responseReport.js");
  const { VERSION } = await import("../version.js");
  if (o.channel !== undefined && o.channel.length > 1)
    throw new InputError("OPTION_INVALID", {
      option: "--channel",
      expected: "one channel",
      received: o.channel.join(", "),
    });
  parseFnGrid(o.fn); // the grid is checked before any file is read
  const base = analysisOptions(o);
  const meta = o.meta !== undefined ? await (await import("../read/testMeta.js")).loadTestMeta(o.meta) : undefined;
  const inputs = [source, ...(o.against !== undefined ? [o.against] : []), ...(o.meta !== undefined ? [o.meta] : [])];
  const { checkOutputPaths, writeAtomic } = await import("../report/writeAtomic.js");
  checkOutputPaths(
    [
      ["--report", o.report],
      ["--csv", o.csv],
    ],
    inputs,
    o.force,
  );
  const rerun = respondRerun(o, base);
  const { r, against } = await runResponse(source, rerun);
  if (o.csv !== undefined) {
    const { responseCsv } = await import("../report/responseReport.js");
    await writeAtomic(o.csv, responseCsv(r, against), { inputs, force: o.force, option: "--csv" });
  }
  if (o.report !== undefined) {
    const { responseHtml } = await import("../report/responseHtml.js");
    const { rerunOptions } = await import("./options.js");
    await writeAtomic(
      o.report,
      responseHtml(
        r,
        VERSION,
        new Date(),
        { meta, given: givenOptions(cmd), rerun: rerunOptions(rerun as never) },
        against,
      ),
      { inputs, force: o.force, option: "--report" },
    );
  }
  io.stdout(
    o.json
      ? JSON.stringify({ ...responseJson(r, VERSION, against), ...(meta ? { meta } : {}) }) + "\n"
      : responseText(r, VERSION, against),
  );
}

/** The settings respond runs with (and its report records for verify): SOURCE's, and --against's taken whole. */
function respondRerun(o: RespondFlags, base: ReturnType<typeof analysisOptions>): RespondRerun {
  return {
    fn: o.fn,
    q: o.q,
    durationS: o.duration,
    sn: { basquinB: o.basquin, snConstant: o.snConstant, stressPerUnit: o.stressPerMetre },
    strokeMm: o.strokeMm,
    source: { ...base, as: o.as },
    // --from/--to cut SOURCE; the --against input is taken whole (its own length is its exposure).
    against:
      o.against !== undefined
        ? {
            file: o.against,
            options: {
              ...base,
              fromS: undefined,
              toS: undefined,
              fromClock: undefined,
              toClock: undefined,
              channels: o.againstChannel === undefined ? undefined : [o.againstChannel],
            },
            durationS: o.againstDuration,
          }
        : undefined,
  };
}
