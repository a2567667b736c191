import type { Command } from "commander";
import { InputError } from "../errors.js";
import type { DeriveOptions } from "../analyses/deriveProfile.js";
import { expandFiles } from "./fileList.js";
import type { CliIo } from "./io.js";
import {
  addReadingOptions,
  addSpectrumOptions,
  analysisOptions,
  durationOption,
  givenOptions,
  numberOption,
  type ParsedCommon,
} from "./options.js";

interface DeriveFlags extends ParsedCommon {
  mix?: string;
  filesFrom?: string;
  life?: number;
  testDuration: number;
  out: string;
  force?: boolean;
  report?: string;
  json?: boolean;
  title?: string;
  q?: number;
  basquin?: number;
  breakpoints?: number;
  margin?: number;
  perOctave?: number;
  coverage?: number;
  toleranceConfidence?: number;
  extremeLimit?: number;
  fieldDamage?: "psd" | "time";
  bandDb?: number;
  rmsPercent?: number;
  minDof?: number;
  strokeMm?: number;
  meta?: string;
  quiet?: boolean;
}

const num = (option: string, expected: string, rule: (x: number) => boolean = () => true) =>
  numberOption(option, rule, expected);

/**
 * `psdgate derive FILE… --life L --test-duration T --out PROFILE`: a fatigue-equivalent lab profile from field
 * recordings.
 */
export function registerDerive(program: Command, io: CliIo): void {
  addDeriveLimitOptions(
    addDeriveFitOptions(
      addDeriveInputOptions(
        addSpectrumOptions(
          addReadingOptions(
            program
              .command("derive")
              .argument("[files...]", "field recordings (CSV or WAV), globs, or - for a list on stdin; or give --mix")
              .description(
                "a lab test profile from field recordings: field PSDs and their limits, the service life's fatigue-damage and extreme-response spectra, and a profile whose damage over the test covers the field's",
              ),
          ),
          "the one giving 1 Hz lines",
        ),
      ),
    ),
  )
    .option(
      "--meta <file>",
      "the test's identity (YAML or JSON: testId, workOrder, item, serialNumber, axis, fixture, sensor, sensorSerial, sensorCalibrated, operator, location, notes), carried into --json and the report",
    )
    .option("-q, --quiet", "no progress output (derive shows none; accepted so every analysis command takes it)")
    .action((args: string[], o: DeriveFlags, cmd: Command) => runDerive(io, args, o, cmd));
}

/**
 * derive's inputs and outputs: the recordings (or a mix), the life, the test's duration, the profile and record
 * written.
 */
function addDeriveInputOptions(cmd: Command): Command {
  return cmd
    .option(
      "--mix <file>",
      "groups of recordings, each standing for so many hours of the life (YAML or JSON: title, groups of name, hours, recordings)",
    )
    .option("--files-from <list>", "read recording paths, one per line, from this file (- for stdin)")
    .option(
      "--life <duration>",
      "service life the recordings stand for, shared by their durations: seconds or a number with s, min or h (e.g. 2000h); not with --mix",
      durationOption("--life"),
    )
    .requiredOption(
      "--test-duration <duration>",
      "duration of the lab test (the profile's durationS): seconds or a number with s, min or h",
      durationOption("--test-duration"),
    )
    .requiredOption("-o, --out <profile>", "the profile to write: .yaml, .yml or .json (psdgate's profile format)")
    .option("--force", "replace an existing output file")
    .option("--report <out.html>", "also write a self-contained HTML record of the derivation")
    .option("--json", "print the result as JSON")
    .option("--title <text>", "the profile's title (default: from the groups, the life and the test duration)");
}

/** The SDOF systems and the fit: Q, Basquin exponent, breakpoints, margin and the natural-frequency grid. */
function addDeriveFitOptions(cmd: Command): Command {
  return cmd
    .option(
      "--q <Q>",
      "quality factor of the SDOF systems (default 10, common practice)",
      num("--q", "a Q above 0.5 and at most 1000", (x) => x > 0.5 && x <= 1000),
    )
    .option(
      "--basquin <b>",
      "Basquin exponent b of the S-N curve (default 8, common practice: choose the material's)",
      num("--basquin", "an exponent from 1 to 30", (x) => x >= 1 && x <= 30),
    )
    .option(
      "--breakpoints <n>",
      "at most this many breakpoints in the profile (default 8)",
      num("--breakpoints", "a whole number from 2 to 40", (x) => Number.isInteger(x) && x >= 2 && x <= 40),
    )
    .option(
      "--margin <factor>",
      "the test's damage must reach the field's times this factor at every natural frequency (default 1; a level factor of margin^(2/b))",
      num("--margin", "a factor of at least 1", (x) => x >= 1),
    )
    .option(
      "--fmin <hz>",
      "lower end of the profile and the natural-frequency grid (default: 5 Hz or 4 lines, whichever is higher)",
      num("--fmin", "a frequency in Hz above 0", (x) => x > 0),
    )
    .option(
      "--fmax <hz>",
      "upper end (default: 0.4 x the lowest sample rate, at most 2000 Hz)",
      num("--fmax", "a frequency in Hz above 0", (x) => x > 0),
    )
    .option(
      "--per-octave <n>",
      "natural frequencies per octave of the grid (default 6)",
      num("--per-octave", "1 to 24", (x) => Number.isInteger(x) && x >= 1 && x <= 24),
    );
}

/** The field's statistical limit, the field damage's source, and the tolerances the written profile carries. */
function addDeriveLimitOptions(cmd: Command): Command {
  return cmd
    .option(
      "--coverage <p>",
      "coverage of the statistical upper limit across recordings (default 0.95)",
      num("--coverage", "a coverage between 0.5 and 1", (x) => x > 0.5 && x < 1),
    )
    .option(
      "--tolerance-confidence <c>",
      "confidence of that limit (default 0.50: P95/50)",
      num("--tolerance-confidence", "a confidence between 0 and 1", (x) => x > 0 && x < 1),
    )
    .option(
      "--field-damage <from>",
      "the field's FDS and ERS from the PSD (psd, the default) or from the recordings in time (time: rainflow damage and the largest response, shocks kept)",
      (v: string) => {
        if (v !== "psd" && v !== "time")
          throw new InputError("OPTION_INVALID", {
            option: "--field-damage",
            expected: "psd or time",
            received: JSON.stringify(v),
          });
        return v;
      },
    )
    .option(
      "--extreme-limit <factor>",
      "warn where the test's expected largest response exceeds the field's by more than this factor (default 1.5)",
      num("--extreme-limit", "a factor of at least 1", (x) => x >= 1),
    )
    .option(
      "--band-db <dB>",
      "the profile's tolerance band, ± dB (default 3)",
      num("--band-db", "a band in dB above 0 and at most 20", (x) => x > 0 && x <= 20),
    )
    .option(
      "--rms-percent <pct>",
      "the profile's RMS tolerance, ± % (default 10)",
      num("--rms-percent", "a percentage above 0 and below 99", (x) => x > 0 && x < 99),
    )
    .option(
      "--min-dof <n>",
      "the profile's minimum DOF (default 120)",
      num("--min-dof", "a number above 0", (x) => x > 0),
    )
    .option(
      "--stroke-mm <mm>",
      "the exciter's rated peak-to-peak stroke: the profile's displacement estimate is checked against it",
      num("--stroke-mm", "a stroke in mm above 0", (x) => x > 0),
    );
}

/** What derive reads: the recordings and the life they stand for (from a mix file or the command line). */
type DeriveInputs = Pick<DeriveOptions, "recordings" | "groups" | "lifeRule" | "mix" | "title">;

/**
 * Runs `derive`: options and outputs checked, the profile derived, then the profile, its record and the result written.
 */
async function runDerive(io: CliIo, args: string[], o: DeriveFlags, cmd: Command): Promise<void> {
  const { deriveProfile, strokeOf } = await import("../analyses/deriveProfile.js");
  const { deriveJson, deriveText, profileDocumentText } = await import("../report/deriveReport.js");
  const { checkOutputPaths, writeAtomic } = await import("../report/writeAtomic.js");
  const { VERSION } = await import("../version.js");
  const { parseProfile } = await import("../compare/testProfile.js");
  if (o.channel !== undefined && o.channel.length > 1)
    throw new InputError("OPTION_INVALID", {
      option: "--channel",
      expected: "one channel",
      received: o.channel.join(", "),
    });
  if (!/\.(ya?ml|json)$/i.test(o.out))
    throw new InputError("OUTPUT_FORMAT", {
      option: "--out",
      expected: "a profile file name ending in .yaml, .yml or .json",
      received: o.out,
    });
  const read: string[] = [];
  const inputs = await deriveInputs(io, args, o, read);
  read.push(...inputs.recordings.map((r) => r.file));
  const meta = o.meta !== undefined ? await (await import("../read/testMeta.js")).loadTestMeta(o.meta) : undefined;
  if (o.meta !== undefined) read.push(o.meta);
  checkOutputPaths(
    [
      ["--out", o.out],
      ["--report", o.report],
    ],
    read,
    o.force,
  );
  const created = new Date();
  const settings = deriveSettings(o, inputs);
  const r = await deriveProfile({ ...settings, version: VERSION, created });
  const text = profileDocumentText(r.document, o.out);
  // The profile as `check` will read it from the file written (its SHA-256 is the file's).
  r.profile = parseProfile(text, o.out);
  Object.assign(r, strokeOf(r.profile, o.strokeMm));
  await writeAtomic(o.out, text, { inputs: read, force: o.force, option: "--out" });
  if (o.report !== undefined) {
    const { deriveHtml } = await import("../report/deriveHtml.js");
    await writeAtomic(
      o.report,
      deriveHtml(r, VERSION, created, {
        meta,
        given: givenOptions(cmd),
        outFile: o.out,
        rerun: JSON.parse(JSON.stringify(settings)) as Record<string, unknown>,
      }),
      { inputs: [...read, o.out], force: o.force, option: "--report" },
    );
  }
  io.stdout(
    o.json
      ? JSON.stringify({ ...deriveJson(r, VERSION), ...(meta ? { meta } : {}) }) + "\n"
      : deriveText(r, VERSION, o.out),
  );
}

/**
 * The recordings and life from --mix (not with files or --life) or from the files and --life; settings files read go on
 * `read`.
 */
async function deriveInputs(io: CliIo, args: string[], o: DeriveFlags, read: string[]): Promise<DeriveInputs> {
  const { mixInputs, plainInputs } = await import("../analyses/deriveProfile.js");
  if (o.mix !== undefined) {
    if (args.length > 0 || o.filesFrom !== undefined)
      throw new InputError("OPTION_CONFLICT", {
        option: "--mix",
        expected: "the recordings in the mix file, or on the command line, not both",
        received: `${args.length} file argument(s)${o.filesFrom !== undefined ? " and --files-from" : ""}`,
      });
    if (o.life !== undefined)
      throw new InputError("OPTION_CONFLICT", {
        option: "--life",
        expected: "no --life with --mix (the life is the sum of the mix file's hours)",
        received: "--life",
      });
    const { loadServiceMix } = await import("../read/mixFile.js");
    const mix = await loadServiceMix(o.mix);
    const inputs = { ...mixInputs(mix), title: o.title ?? mix.title };
    read.push(o.mix);
    return inputs;
  }
  const files = await expandFiles(args, o.filesFrom, io.readStdin ?? (async () => ""));
  if (o.life === undefined)
    throw new InputError("OPTION_MISSING", {
      option: "--life",
      expected: "the service life the recordings stand for (or a --mix file with each group's hours)",
      received: "nothing",
    });
  const inputs = { ...plainInputs(files, o.life), title: o.title };
  if (o.filesFrom !== undefined) read.push(o.filesFrom);
  return inputs;
}

/** deriveProfile's settings from the flags (its report records them for verify). */
function deriveSettings(o: DeriveFlags, inputs: DeriveInputs) {
  return {
    ...inputs,
    testDurationS: o.testDuration,
    analysis: analysisOptions(o),
    channels: o.channel,
    q: o.q,
    basquinB: o.basquin,
    maxBreakpoints: o.breakpoints,
    margin: o.margin,
    fminHz: o.fmin,
    fmaxHz: o.fmax,
    perOctave: o.perOctave,
    coverage: o.coverage,
    toleranceConfidence: o.toleranceConfidence,
    extremeLimit: o.extremeLimit,
    fieldDamage: o.fieldDamage,
    bandDb: o.bandDb,
    rmsPercent: o.rmsPercent,
    minDof: o.minDof,
    strokeMm: o.strokeMm,
    outFile: o.out,
  };
}
