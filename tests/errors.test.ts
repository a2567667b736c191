import { readdirSync, readFileSync, statSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { ALL_ERROR_CODES, formatInputError } from "../src/errors.js";

function sources(dir: string): string[] {
  return readdirSync(dir).flatMap((f) => {
    const p = join(dir, f);
    return statSync(p).isDirectory() ? sources(p) : p.endsWith(".ts") ? [p] : [];
  });
}

describe("error codes", () => {
  it("README's Errors section lists exactly the codes of ERROR_CODES (src/errors.ts)", () => {
    const readme = readFileSync("README.md", "utf8");
    const section = readme.slice(readme.indexOf("## Errors"), readme.indexOf("\n## ", readme.indexOf("## Errors") + 3));
    const listed = new Set([...section.matchAll(/`([A-Z][A-Z0-9]*(?:_[A-Z0-9]+)*)`/g)].map((m) => m[1]!));
    listed.delete("ERROR_CODES");
    expect([...listed].sort()).toEqual([...ALL_ERROR_CODES].sort());
  });
  it("every code given to an InputError in src/ (new InputError(…), a reader's fail(…)) is one of ERROR_CODES", () => {
    const found = new Set<string>();
    for (const f of sources("src")) {
      const text = readFileSync(f, "utf8");
      // The first argument: a literal, or a conditional between literals.
      for (const m of text.matchAll(/(?:new InputError|\.fail)\(\s*([^,{)]+?)\s*,/g)) for (const c of m[1]!.matchAll(/"([A-Z][A-Z0-9_]*)"/g)) found.add(c[1]!);
    }
    expect(found.size).toBeGreaterThan(30);
    const missing = [...found].filter((c) => !(ALL_ERROR_CODES as readonly string[]).includes(c));
    expect(missing).toEqual([]);
  });
  it("formatInputError(): place, expected, received, code and hint in one line", () => {
    expect(formatInputError("USAGE", { expected: "a command", received: "x", hint: "run psdgate --help" })).toBe("expected a command, received x [USAGE] (hint: run psdgate --help)");
  });
});
