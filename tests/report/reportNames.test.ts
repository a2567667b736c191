import { describe, expect, it } from "vitest";
import { reportFileNames } from "../../src/report/reportNames.js";

describe("reportFileNames", () => {
  it("reportFileNames(): distinct stems keep their plain names", () => {
    expect(reportFileNames(["a/run.wav", "b/other.csv"])).toEqual(["run.html", "other.html"]);
  });
  it("reportFileNames(): two run.wav in different folders get names from their paths", () => {
    expect(reportFileNames(["lab/a/run.wav", "lab/b/run.wav", "x.wav"])).toEqual([
      "a__run.html",
      "b__run.html",
      "x.html",
    ]);
  });
  it("reportFileNames(): the same recording twice, names that differ only in case, and a name already taken stay distinct", () => {
    const names = reportFileNames(["a/run.wav", "a/run.wav", "b/Run.wav", "a__run.wav"]);
    expect(new Set(names.map((n) => n.toLowerCase())).size).toBe(4);
    expect(names.every((n) => n.endsWith(".html") && !n.includes("/"))).toBe(true);
  });
});
