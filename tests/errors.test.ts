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
  it("every code-like string literal in src/ is one of ERROR_CODES", () => {
    // Codes of other libraries that src/ compares with (yaml's warning code), not psdgate's own.
    const foreign = new Set(["TAG_RESOLVE_FAILED"]);
    const found = new Set<string>();
    for (const f of sources("src")) {
      for (const m of readFileSync(f, "utf8").matchAll(/"([A-Z][A-Z0-9]*_[A-Z0-9_]+|USAGE|INTERNAL)"/g)) if (!m[1]!.startsWith("ERR_") && !foreign.has(m[1]!)) found.add(m[1]!);
    }
    const missing = [...found].filter((c) => !(ALL_ERROR_CODES as readonly string[]).includes(c));
    expect(missing).toEqual([]);
  });
  it("formatInputError(): place, expected, received, code and hint in one line", () => {
    expect(formatInputError("USAGE", { expected: "a command", received: "x", hint: "run psdgate --help" })).toBe("expected a command, received x [USAGE] (hint: run psdgate --help)");
  });
});
