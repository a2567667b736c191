import { Command, CommanderError } from "commander";
import { analyzeRecording, type RecordingAnalysis } from "../analyzeRecording.js";
import { checkRecording, loadProfile } from "../checkRecording.js";
import { checkJson, checkText } from "../report/checkReport.js";
import { profileJson, profileText } from "../report/profileText.js";
import { checkHtml } from "../report/htmlReport.js";
import { createTimeHistoryWriter } from "../report/timeHistoryWriter.js";
import { synthesizeProfile } from "../synth/synthesizeProfile.js";
import { sig } from "../report/format.js";
import { EXIT, InputError } from "../errors.js";
import { psdCsv, psdJson } from "../report/psdJson.js";
import { inspectText, psdText } from "../report/psdText.js";
import { writeAtomic } from "../report/writeAtomic.js";
import { VERSION } from "../version.js";
import { addReadingOptions, addSpectrumOptions, analysisOptions, numberOption, type ParsedCommon } from "./options.js";

export interface CliIo {
  stdout: (s: string) => void;
  stderr: (s: string) => void;
}

const processIo: CliIo = { stdout: (s) => process.stdout.write(s), stderr: (s) => process.stderr.write(s) };

/** Thrown by an action to end with an exit code after its output is written. */
class Exit extends Error {
  constructor(readonly code: number) {
    super(`exit ${code}`);
  }
}

function requireAverages(a: RecordingAnalysis): void {
  const short = a.channels.find((c) => c.psd.averages === 0);
  if (short) {
    throw new InputError("RECORD_TOO_SHORT", {
      file: a.input.file, expected: `at least one segment of ${a.settings.segmentLength} samples`, received: `${a.input.samples} samples`,
      hint: "use a shorter --segment or a coarser --resolution",
    });
  }
}

export function buildProgram(io: CliIo): Command {
  const program = new Command("psdgate")
    .description("Acceleration PSD by Welch's method with confidence bounds, checked against a test profile")
    .version(VERSION, "-V, --version")
    .showHelpAfterError("(run with --help for usage)")
    .exitOverride()
    .configureOutput({ writeOut: io.stdout, writeErr: io.stderr });

  addReadingOptions(
    program.command("inspect").argument("<file>", "recording: CSV or WAV").description("what is in a recording: channels, rate, length, statistics, warnings"),
  ).action(async (file: string, o: ParsedCommon) => {
    const a = await analyzeRecording(file, analysisOptions(o));
    io.stdout(inspectText(a, VERSION));
  });

  addSpectrumOptions(addReadingOptions(program.command("psd").argument("<file>", "recording: CSV or WAV").description("one-sided PSD by Welch's method, chi-square bounds and the Parseval check")))
    .option("--json", "print the whole result as one JSON document")
    .option("--csv <out>", "also write frequency, PSD and bounds of each channel to this CSV file")
    .option("--force", "replace an existing output file")
    .action(async (file: string, o: ParsedCommon & { json?: boolean; csv?: string; force?: boolean }) => {
      const a = await analyzeRecording(file, analysisOptions(o));
      requireAverages(a);
      if (o.csv !== undefined) await writeAtomic(o.csv, psdCsv(a), { inputs: [file], force: o.force, option: "--csv" });
      io.stdout(o.json ? JSON.stringify(psdJson(a, VERSION)) + "\n" : psdText(a, VERSION));
    });

  program
    .command("profile")
    .argument("<file>", "test profile: JSON, YAML or two-column CSV (Hz, level)")
    .description("breakpoints, slopes, overall RMS, velocity and stroke of a required profile")
    .option("--json", "print the result as JSON")
    .action(async (file: string, o: { json?: boolean }) => {
      const p = await loadProfile(file);
      io.stdout(o.json ? JSON.stringify(profileJson(p, VERSION)) + "\n" : profileText(p, VERSION));
    });

  addSpectrumOptions(addReadingOptions(program.command("check").argument("<file>", "recording: CSV or WAV").description("judge a recording against a profile: pass (exit 0), fail (1), inconclusive (3)")))
    .requiredOption("-p, --profile <file>", "the required profile (JSON, YAML or CSV)")
    .option("--json", "print the whole result as one JSON document")
    .option("--report <out.html>", "also write a self-contained HTML report for review and signature")
    .option("--force", "replace an existing output file")
    .action(async (file: string, o: ParsedCommon & { profile: string; json?: boolean; report?: string; force?: boolean }) => {
      const profile = await loadProfile(o.profile);
      const r = await checkRecording(file, profile, analysisOptions(o));
      if (o.report !== undefined) await writeAtomic(o.report, checkHtml(r, VERSION, new Date()), { inputs: [file, o.profile], force: o.force, option: "--report" });
      io.stdout(o.json ? JSON.stringify(checkJson(r, VERSION)) + "\n" : checkText(r, VERSION));
      throw new Exit(r.verdict === "pass" ? EXIT.ok : r.verdict === "fail" ? EXIT.fail : EXIT.inconclusive);
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
      if (o.out === o.profile) throw new InputError("OUTPUT_IS_INPUT", { option: "--out", expected: "an output path different from the profile", received: o.out });
      const profile = await loadProfile(o.profile);
      const names = Array.from({ length: o.channels }, (_, i) => `ch${i + 1}`);
      const writer = await createTimeHistoryWriter(o.out, { sampleRateHz: o.rate, channelNames: names, units: profile.units, force: o.force, option: "--out" });
      let r;
      try {
        r = await synthesizeProfile(profile, { durationS: o.duration, sampleRateHz: o.rate, seed: o.seed, channels: o.channels, levelFactor: 10 ** (o.levelDb / 10) }, (b, n) => writer.write(b, n));
        await writer.close();
      } catch (e) {
        await writer.abort();
        throw e;
      }
      const u = profile.units === "g" ? "g" : "m/s²";
      io.stdout(`psdgate ${VERSION}: wrote ${o.out}: ${r.frames} samples x ${o.channels} channel(s) at ${o.rate} Hz, seed ${o.seed}, ${r.filterTaps}-tap shaping filter\n`);
      io.stdout(`  profile "${profile.title}" ${sig(profile.rms, 4)} ${u} RMS${o.levelDb !== 0 ? `, shifted ${o.levelDb} dB to ${sig(profile.rms * 10 ** (o.levelDb / 20), 4)} ${u}` : ""}\n`);
      r.stats.forEach((s, i) => io.stdout(`  ${names[i]}  RMS ${sig(s.rms, 4)} ${u}, kurtosis ${s.kurtosis.toFixed(3)}, crest factor ${s.crestFactor.toFixed(2)}\n`));
    });

  return program;
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
      io.stderr(`psdgate: ${e.message}\n`);
      return EXIT.input;
    }
    if (e instanceof CommanderError) {
      return e.exitCode === 0 ? EXIT.ok : EXIT.input;
    }
    const err = e as Error;
    io.stderr(`psdgate: internal error: ${err?.message ?? String(e)}\nThis is a bug in psdgate ${VERSION}; please report it with the command line and input file.\n`);
    if (process.env.PSDGATE_DEBUG) io.stderr(`${err?.stack}\n`);
    return EXIT.internal;
  }
}

export { Exit };
