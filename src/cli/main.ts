import { Command, CommanderError } from "commander";
import { EXIT, InputError } from "../errors.js";
import { printable } from "../report/printable.js";
import { VERSION } from "../version.js";
import { registerCheck } from "./check.js";
import { registerDerive } from "./derive.js";
import { Exit } from "./exit.js";
import type { CliIo } from "./io.js";
import { registerInspect } from "./inspect.js";
import { asCliError } from "./optionFlags.js";
import { joinDurationUnits } from "./options.js";
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

export type { CliIo };

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
  for (const register of [
    registerInspect,
    registerPsd,
    registerProfile,
    registerCheck,
    registerSynth,
    registerRide,
    registerTransfer,
    registerRespond,
    registerShock,
    registerDerive,
    registerQueue,
    registerVerify,
  ])
    register(program, io);
  return program;
}

/** Every command's name, in the order the help lists them. */
function commandNames(program: Command): string {
  const names = program.commands.map((c) => c.name());
  return `${names.slice(0, -1).join(", ")} or ${names[names.length - 1]}`;
}

const USAGE_EXPECTED: Record<string, string> = {
  "commander.unknownOption": "an option of this command",
  "commander.missingArgument": "the command's arguments",
  "commander.optionMissingArgument": "a value after the option",
  "commander.missingMandatoryOptionValue": "every required option",
  "commander.excessArguments": "no more arguments",
  "commander.conflictingOption": "options that go together",
};

/** commander's own error as one line with the USAGE code, like every other error ("did you mean" kept on it). */
function usageError(e: CommanderError, program: Command, command?: string): InputError {
  const expected =
    e.code === "commander.unknownCommand"
      ? `one of the commands ${commandNames(program)}`
      : e.code === "commander.help"
        ? `a command: ${commandNames(program)}`
        : (USAGE_EXPECTED[e.code] ?? "a valid command line");
  return new InputError("USAGE", {
    expected,
    received:
      e.code === "commander.help"
        ? "no command (the help above lists them)"
        : e.message
            .replace(/^error: /, "")
            .split("\n")
            .map((l) => l.trim())
            .filter(Boolean)
            .join(" "),
    hint: command !== undefined ? `run psdgate ${command} --help` : "run psdgate --help",
  });
}

/** Options that an earlier psdgate spelt otherwise: the new name, and why. */
const RENAMED: Record<string, [string, string]> = {
  "transfer --out": [
    "--output-channel CH",
    "--out names an output file in every command; without --output-channel every channel but --in is an output",
  ],
};

/**
 * An unknown option is named before anything else is checked (commander checks required options first, so
 * `ride --axis x=1` said "--axes not specified"): the options are parsed once on a throwaway program, which
 * stores nothing that the real parse sees.
 */
function unknownOptionFirst(argv: string[], io: CliIo): void {
  const probe = buildProgram(io);
  const sub = probe.commands.find((c) => c.name() === argv[0] || c.aliases().includes(argv[0] ?? ""));
  if (!sub || sub.commands.length > 0) return;
  const { unknown } = sub.parseOptions(argv.slice(1));
  const flag = unknown.find((u) => u.startsWith("-") && u !== "-" && u !== "--");
  const renamed = RENAMED[`${sub.name()} ${flag?.replace(/=.*$/, "")}`];
  if (renamed)
    throw new InputError("USAGE", {
      option: flag,
      expected: `${renamed[0]} (${renamed[1]})`,
      received: `unknown option '${flag}'`,
      hint: `run psdgate ${sub.name()} --help`,
    });
  if (flag !== undefined && !/^--?(h|help)$/.test(flag))
    (sub as unknown as { unknownOption(flag: string): never }).unknownOption(flag.replace(/=.*$/, ""));
}

/** Runs the CLI and returns the exit code; never throws. */
export async function runCli(argv: string[], io: CliIo = processIo): Promise<number> {
  const program = buildProgram(io);
  try {
    // `--life 5 days`: the unit goes back on its number (never a file named `days`).
    argv = joinDurationUnits(argv, ["--life", "--test-duration", "--exposure"]);
    unknownOptionFirst(argv, io);
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
      // The command whose help answers it: `ride`, or `queue work` for a subcommand.
      const sub = program.commands.find((c) => c.name() === argv[0]);
      const subsub = sub?.commands.find((c) => c.name() === argv[1]);
      const where = sub ? `${sub.name()}${subsub ? ` ${subsub.name()}` : ""}` : undefined;
      io.stderr(
        `psdgate: ${usageError(e, program, e.code === "commander.unknownOption" || e.code === "commander.missingMandatoryOptionValue" || e.code === "commander.optionMissingArgument" ? where : undefined).message}\n`,
      );
      return EXIT.input;
    }
    const err = e as Error;
    io.stderr(
      `psdgate: internal error: ${printable(String(err?.message ?? e))} [INTERNAL]\nThis is a bug in psdgate ${VERSION}; please report it with the command line and input file.\n`,
    );
    if (io.env?.PSDGATE_DEBUG) io.stderr(`${err?.stack}\n`);
    return EXIT.internal;
  }
}
