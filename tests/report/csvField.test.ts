import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import { csvField } from "../../src/report/csvField.js";

describe("csvField", () => {
  it("csvField(): fields with a comma, quote, CR or LF are quoted with doubled quotes (RFC 4180 sec. 2)", () => {
    expect(csvField("ax, left")).toBe('"ax, left"');
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    expect(csvField("two\nlines")).toBe('"two\nlines"');
    expect(csvField("plain")).toBe("plain");
  });
  it("csvField(): a field starting with =, +, -, @, tab or CR gets a leading apostrophe (OWASP CSV injection)", () => {
    for (const s of ["=SUM(A1:A9)", "+1", "-x", "@cmd", "\tx"]) expect(csvField(s)).toMatch(/^"?'/);
    expect(csvField('=HYPERLINK("x","y")')).toBe('"\'=HYPERLINK(""x"",""y"")"');
  });
  it("csvField(): papaparse reads every field back as written (apostrophe aside), one field each", () => {
    const names = ["ax, left", 'q"uote', "line\nbreak", "=1+1", "ok"];
    const row = Papa.parse<string[]>(names.map(csvField).join(","), {}).data[0]!;
    expect(row.length).toBe(names.length);
    expect(row.map((f) => f.replace(/^'/, ""))).toEqual(names);
  });
});
