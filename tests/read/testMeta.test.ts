import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import type { InputError } from "../../src/errors.js";
import { loadTestMeta, parseTestMeta } from "../../src/read/testMeta.js";
import { tempDir } from "../helpers.js";

describe("test identity (--meta)", () => {
  it("loadTestMeta reads YAML and JSON with the same keys", async () => {
    const d = tempDir();
    writeFileSync(join(d, "m.yaml"), 'testId: T-1\nsensorCalibrated: "2026-09-14"\nnotes: two\n  lines\n');
    writeFileSync(
      join(d, "m.json"),
      JSON.stringify({ testId: "T-1", sensorCalibrated: "2026-09-14", notes: "two lines" }),
    );
    expect(await loadTestMeta(join(d, "m.yaml"))).toEqual(await loadTestMeta(join(d, "m.json")));
  });

  it("parseTestMeta refuses unknown keys, non-text values and impossible dates, naming the key", () => {
    const err = (doc: unknown) => {
      try {
        parseTestMeta(doc, "m.yaml");
      } catch (e) {
        return e as InputError;
      }
      throw new Error("no error");
    };
    expect(err({ serial: "1" }).message).toMatch(
      /^m\.yaml: serial: expected one of the keys testId, .*received unknown key "serial" \[META_INVALID\]/,
    );
    expect(err({ axis: 3 }).message).toMatch(/axis: expected the test axis \(text\).*received 3/);
    expect(err({ sensorCalibrated: "2026-13-01" }).message).toMatch(
      /sensorCalibrated: expected a calendar date YYYY-MM-DD/,
    );
    expect(err([1]).code).toBe("META_INVALID");
  });

  it("loadTestMeta on a YAML syntax error gives META_SYNTAX with its line", async () => {
    const d = tempDir();
    writeFileSync(join(d, "bad.yaml"), "testId: [unclosed\n");
    await expect(loadTestMeta(join(d, "bad.yaml"))).rejects.toThrow(
      /bad\.yaml:\d+:\d+: expected valid YAML.*\[META_SYNTAX\]/,
    );
  });
});
