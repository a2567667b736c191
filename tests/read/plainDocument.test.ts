import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { parseProfile } from "../../src/compare/testProfile.js";
import { loadServiceMix } from "../../src/read/mixFile.js";
import { plainDocument, strictDocument } from "../../src/read/plainDocument.js";
import { loadTestMeta } from "../../src/read/testMeta.js";
import { cli, tempDir } from "../helpers.js";

const CODES = { syntax: "META_SYNTAX", invalid: "META_INVALID", tooDeep: "META_INVALID" } as const;

describe("one strict reader for profiles, --meta and mix files", () => {
  it("a key given twice in a JSON mapping is refused as in YAML, at the second key's line and column (JSON.parse keeps the last)", () => {
    // Before: a profile whose "units" came twice was read with the last one, (m/s2)2/Hz: 4.4497 m/s2 RMS, no error.
    const profile = (units: string) =>
      `{"title": "t", "units": "g2/Hz", "points": [{"hz": 20, "level": 0.01}, {"hz": 2000, "level": 0.01}],\n` +
      `  "tolerance": {"bands": [{"fromHz": 20, "toHz": 2000, "upperDb": 3, "lowerDb": 3}]}, ${units}}`;
    expect(() => parseProfile(profile('"units": "(m/s2)2/Hz"'), "p.json")).toThrow(
      /p\.json:2:87: expected valid JSON, received a key given twice in one mapping \[PROFILE_SYNTAX\]/,
    );
    // The same key spelt with an escape is the same key; the same name in another mapping, or as a value, is not.
    expect(() => strictDocument('{"a": 1, "\\u0061": 2}', "m.json", CODES)).toThrow(/key given twice/);
    expect(strictDocument('{"a": {"a": "a"}, "b": [{"a": 1}, {"a": 2}], "c": "a"}', "m.json", CODES)).toEqual({
      a: { a: "a" },
      b: [{ a: 1 }, { a: 2 }],
      c: "a",
    });
    expect(strictDocument('{"s": "x\\"}", "t": "{\\"a\\": 1, \\"a\\": 2}"}', "m.json", CODES)).toEqual({
      s: 'x"}',
      t: '{"a": 1, "a": 2}',
    });
  });
  it("hexadecimal and octal numbers (YAML 1.2 core; 0b1 is text there) are refused in every kind of file, naming line and column", async () => {
    expect(() => strictDocument("a: 0x10\n", "m.yaml", CODES)).toThrow(
      /m\.yaml:1:4: expected a decimal number, received a hexadecimal number "0x10" \[META_INVALID\]/,
    );
    expect(() => strictDocument("a: [1, 0o17]\n", "m.yaml", CODES)).toThrow(/octal number "0o17"/);
    const d = tempDir();
    writeFileSync(join(d, "mix.yaml"), "groups:\n  - name: road\n    hours: 0x10\n    recordings: [a.wav]\n");
    await expect(loadServiceMix(join(d, "mix.yaml"))).rejects.toThrow(
      /mix\.yaml:3:12: expected a decimal number, received a hexadecimal number "0x10" \[MIX_INVALID\]/,
    );
    expect(() =>
      parseProfile(
        "title: t\nunits: g2/Hz\npoints:\n  - { hz: 0x14, level: 0.01 }\n  - { hz: 2000, level: 0.01 }\n",
        "p.yaml",
      ),
    ).toThrow(/hexadecimal number "0x14" \[PROFILE_INVALID\]/);
    expect(plainDocument("hours: 16\n", "m.yaml", "MIX_SYNTAX")).toEqual({ hours: 16 });
  });

  it("a document nested 5000 deep (JSON or YAML flow) is refused before it is parsed, with the file's own code; exit 2 from the CLI", async () => {
    const deepJson = `{"notes": ${"[".repeat(5000)}${"]".repeat(5000)}}`;
    const deepYaml = `groups: ${"[".repeat(5000)}${"]".repeat(5000)}\n`;
    expect(() => strictDocument(deepJson, "m.json", CODES)).toThrow(
      /expected nesting at most 32 deep.*\[META_INVALID\]/,
    );
    const d = tempDir();
    writeFileSync(join(d, "meta.json"), deepJson);
    writeFileSync(join(d, "mix.yaml"), deepYaml);
    await expect(loadTestMeta(join(d, "meta.json"))).rejects.toThrow(/\[META_INVALID\]/);
    await expect(loadServiceMix(join(d, "mix.yaml"))).rejects.toThrow(/\[MIX_INVALID\]/);
    const r = await cli("derive", "--mix", join(d, "mix.yaml"), "--test-duration", "1h", "--out", join(d, "o.yaml"));
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/nesting at most 32 deep.*\[MIX_INVALID\]/);
    const m = await cli("psd", "samples/kb210-run-short.wav", "--meta", join(d, "meta.json"));
    expect(m.code).toBe(2);
    expect(m.stderr).toMatch(/\[META_INVALID\]/);
  });
});
