import { readdirSync, readFileSync, statSync } from "node:fs";
import { join } from "node:path";
import type { Command } from "commander";
import { describe, expect, it } from "vitest";
import { InputError } from "../../src/errors.js";
import { normalizeWelchOptions } from "../../src/estimate/spectral/welchOptions.js";
import { asCliError, inFlags, OPTION_FLAGS } from "../../src/cli/optionFlags.js";
import { buildProgram, runCli } from "../../src/cli/main.js";

/** Library sources: everything under src/ but the CLI and the queue edge. */
function librarySources(dir = "src"): string[] {
  return readdirSync(dir).flatMap((f) => {
    const p = join(dir, f);
    if (statSync(p).isDirectory())
      return p === join("src", "cli") || p === join("src", "queue") ? [] : librarySources(p);
    return p.endsWith(".ts") ? [p] : [];
  });
}

/** Every long flag of a command and of its subcommands. */
function flagsOf(cmd: Command): string[] {
  return [...cmd.options.flatMap((o) => (o.long ? [o.long] : [])), ...cmd.commands.flatMap(flagsOf)];
}

describe("the library names its own keys; the CLI holds the one table from keys to flags", () => {
  it("a library caller is told the key it passed, a CLI user the flag they typed", async () => {
    let e: unknown;
    try {
      normalizeWelchOptions({ segmentLength: 3 }, 1000);
    } catch (x) {
      e = x;
    }
    expect(e).toBeInstanceOf(InputError);
    expect((e as InputError).message).toMatch(/^option segmentLength: expected a power of two/);
    expect(asCliError(e as InputError).message).toMatch(/^option --segment: expected a power of two/);
    let err = "";
    const code = await runCli(["psd", "samples/kb210-run.wav", "--segment", "3"], {
      stdout: () => undefined,
      stderr: (s) => (err += s),
    });
    expect(code).toBe(2);
    expect(err).toMatch(/option --segment: expected a power of two/);
  });
  it("texts name keys in backticks, shown as flags (with the values as the CLI spells them)", () => {
    expect(inFlags("give `csv.sampleRateHz: HZ` with `csv.timeColumn: false`")).toBe(
      "give --rate HZ with --no-time-column",
    );
    expect(inFlags('give `csv.delimiter: ";"` `csv.decimal: ","`')).toBe("give --delimiter ';' --decimal comma");
    expect(inFlags("`fminHz` below `fmaxHz`; `notAKey` stays")).toBe("--fmin below --fmax; `notAKey` stays");
  });
  it("every option a library error names is a key of the table, never a flag, and no library error text spells a flag", () => {
    const flagsInLibrary: string[] = [];
    const unknownKeys: string[] = [];
    for (const f of librarySources()) {
      // report/writeAtomic.ts passes on the option its caller (the CLI) names for the output.
      if (f.endsWith("writeAtomic.ts")) continue;
      readFileSync(f, "utf8")
        .split("\n")
        .forEach((line, i) => {
          if (/^\s*(\/\/|\*|\/\*\*)/.test(line)) return;
          for (const m of line.matchAll(/option: "([^"]+)"/g))
            if (!(m[1]! in OPTION_FLAGS)) unknownKeys.push(`${f}:${i + 1} ${m[1]}`);
          if (/InputError\(|hint:|expected:|received:/.test(line) && /["`'][^"`']*--[a-z][a-z-]+/.test(line))
            flagsInLibrary.push(`${f}:${i + 1}`);
          for (const m of line.matchAll(/\\?`([a-z][A-Za-z.]*)(?:: [^`\\]+)?\\?`/g)) {
            if (/InputError\(|hint:|expected:|received:|missing\.push/.test(line) && !(m[1]! in OPTION_FLAGS))
              unknownKeys.push(`${f}:${i + 1} \`${m[1]}\``);
          }
        });
    }
    expect(unknownKeys).toEqual([]);
    expect(flagsInLibrary).toEqual([]);
  });
  it("every flag the table maps a key to is an option of some command (buildProgram's)", () => {
    const flags = new Set(flagsOf(buildProgram({ stdout: () => undefined, stderr: () => undefined })));
    const missing = Object.entries(OPTION_FLAGS)
      .filter(([, flag]) => !flags.has(flag))
      .map(([key, flag]) => `${key} -> ${flag}`);
    expect(missing).toEqual([]);
  });
});
