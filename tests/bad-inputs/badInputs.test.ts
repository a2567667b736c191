import { mkdirSync, readFileSync, statSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { cli, tempDir } from "../helpers.js";
import { generateCases } from "./generate.js";

interface Case {
  name: string;
  file: string;
  args: string[];
  exit: number;
  code?: string;
  place?: string;
  stdout?: string;
  /** Text the one error line must contain (a hint, say). */
  stderr?: string;
}

const here = "tests/bad-inputs";
const cases: Case[] = JSON.parse(readFileSync(join(here, "cases.json"), "utf8"));
const gen = join(tempDir(), "gen");
mkdirSync(gen);
generateCases(gen);
/** `{tmp}` in a case's args: a fresh folder per case, for outputs. */
const outRoot = tempDir();
/** Only a regular file is read to check it is unchanged (a FIFO or /dev/zero would never end). */
const snapshot = (f: string) => (statSync(f).isFile() ? readFileSync(f) : undefined);

describe(`bad-input corpus (${cases.length} cases, tests/bad-inputs/cases.json)`, () => {
  it("has at least 40 cases", () => expect(cases.length).toBeGreaterThanOrEqual(40));
  cases.forEach((c, n) => {
    it(`${c.name}: exit ${c.exit}${c.code ? ` [${c.code}]` : ""}`, async () => {
      const file = c.file.startsWith("gen/")
        ? join(gen, c.file.slice(4))
        : c.file.startsWith("cases/")
          ? join(here, c.file)
          : c.file;
      const before = snapshot(file);
      const tmp = join(outRoot, String(n));
      mkdirSync(tmp);
      const args = c.args.map((a) =>
        a.replaceAll("{file}", file).replaceAll("{dir}", here).replaceAll("{gen}", gen).replaceAll("{tmp}", tmp),
      );
      const r = await cli(...args);
      expect(r.code, r.stderr).toBe(c.exit);
      if (c.exit === 2) {
        expect(r.stderr.trim().split("\n").length, "one line").toBe(1);
        expect(r.stderr).toContain(`[${c.code}]`);
        expect(r.stderr).toContain(c.place!);
        expect(r.stderr).toMatch(/expected .+/);
        expect(r.stdout).toBe("");
      }
      if (c.stdout) expect(r.stdout).toMatch(new RegExp(c.stdout));
      if (c.stderr) expect(r.stderr).toContain(c.stderr);
      if (before) expect(readFileSync(file).equals(before), "the input is unchanged").toBe(true);
      else expect(statSync(file).isFile(), "a special file stays what it was").toBe(false);
    });
  });
});
