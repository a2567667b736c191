import { readdirSync, readFileSync, statSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { ALL_ERROR_CODES, errorFromWire, errorToWire, formatInputError, InputError } from "../src/errors.js";

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
      for (const m of text.matchAll(/(?:new InputError|\.fail)\(\s*([^,{)]+?)\s*,/g))
        for (const c of m[1]!.matchAll(/"([A-Z][A-Z0-9_]*)"/g)) found.add(c[1]!);
    }
    expect(found.size).toBeGreaterThan(30);
    const missing = [...found].filter((c) => !(ALL_ERROR_CODES as readonly string[]).includes(c));
    expect(missing).toEqual([]);
  });
  it("formatInputError(): place, expected, received, code and hint in one line", () => {
    expect(formatInputError("USAGE", { expected: "a command", received: "x", hint: "run psdgate --help" })).toBe(
      "expected a command, received x [USAGE] (hint: run psdgate --help)",
    );
  });
});

describe("errors across threads and processes (errorToWire / errorFromWire)", () => {
  // The two ways a wire form travels: a structured clone (postMessage) and JSON (the job queue).
  const carried = (e: unknown) => [
    errorFromWire(structuredClone(errorToWire(e))),
    errorFromWire(JSON.parse(JSON.stringify(errorToWire(e)))),
  ];
  it("an input error comes back as the same InputError: code, details, message", () => {
    const e = new InputError("CSV_NOT_A_NUMBER", {
      file: "a.csv",
      line: 3,
      column: 2,
      field: "ax",
      expected: "a number",
      received: '"x"',
    });
    expect(errorToWire(e)).toEqual({ code: "CSV_NOT_A_NUMBER", message: e.message, details: e.details });
    for (const back of carried(e)) {
      expect(back).toBeInstanceOf(InputError);
      expect([(back as InputError).code, (back as InputError).details, back.message]).toEqual([
        e.code,
        e.details,
        e.message,
      ]);
    }
  });
  it("anything else is INTERNAL with its message (not its stack) and its stack kept apart", () => {
    const e = new TypeError("x is not a function");
    expect(errorToWire(e)).toEqual({ code: "INTERNAL", message: "x is not a function", stack: e.stack });
    for (const back of carried(e)) {
      expect(back).not.toBeInstanceOf(InputError);
      expect(back.message).toBe("x is not a function");
      expect(back.stack).toBe(e.stack);
    }
    expect(errorToWire("plain")).toEqual({ code: "INTERNAL", message: "plain" });
    expect(errorFromWire(errorToWire("plain")).message).toBe("plain");
  });
});
