import { Command, CommanderError } from "commander";
import { analyzeRecording, type RecordingAnalysis } from "../analyzeRecording.js";
import { EXIT, InputError } from "../errors.js";
import { psdCsv, psdJson } from "../report/psdJson.js";
import { inspectText, psdText } from "../report/psdText.js";
import { writeAtomic } from "../report/writeAtomic.js";
import { VERSION } from "../version.js";
import { addReadingOptions, addSpectrumOptions, analysisOptions, type ParsedCommon } from "./options.js";

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
