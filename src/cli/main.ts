import { Command, CommanderError } from "commander";
import { EXIT, InputError } from "../errors.js";
import { printable } from "../report/printable.js";
import { VERSION } from "../version.js";
import { registerCheck } from "./check.js";
import { registerDerive } from "./derive.js";
import { Exit } from "./exit.js";
import { registerInspect } from "./inspect.js";
import { asCliError } from "./optionFlags.js";
import { registerProfile } from "./profile.js";
import { registerPsd } from "./psd.js";
import { registerQueue } from "./queue.js";
import { registerRespond } from "./respond.js";
import { registerRide } from "./ride.js";
import { registerShock } from "./shock.js";
import { registerSynth } from "./synth.js";
import { registerTransfer } from "./transfer.js";
import { registerVerify } from "./verify.js";

// One file per command, each registering itself. Modules that only some commands need (zod and yaml for
// profiles, d3 for the report, the batch pool) load on first use inside the actions, so a plain `psd`
// starts fast.


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

export function buildProgram(io: CliIo): Command {
  const program = new Command("psdgate")
    .description("Acceleration PSD by Welch's method with confidence bounds, checked against a test profile")
    .version(VERSION, "-V, --version")
    .exitOverride()
    // commander's own errors (unknown command or option, missing value) become one USAGE line in runCli.
    .configureOutput({ writeOut: io.stdout, writeErr: io.stderr, outputError: () => undefined });
  for (const register of [registerInspect, registerPsd, registerProfile, registerCheck, registerSynth, registerRide, registerTransfer, registerRespond, registerShock, registerDerive, registerQueue, registerVerify]) register(program, io);
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
      io.stderr(`psdgate: ${printable(asCliError(e).message)}\n`);
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


