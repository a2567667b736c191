import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import * as psdgate from "../src/index.js";

describe("index.ts: the library, one name per line", () => {
  const source = readFileSync("src/index.ts", "utf8");
  it("every export block lists one name per line (a block of one name may stand on one line, as the formatter puts it)", () => {
    const crowded = source
      .split("\n")
      .filter((l) => /^export (type )?\{[^}]*,[^}]*\}/.test(l) || /^\s+(type )?\w+,\s*(type )?\w/.test(l));
    expect(crowded).toEqual([]);
  });
  it("offers README's library example and the main jobs, and no internals", () => {
    for (const name of [
      "analyzeRecording",
      "checkRecording",
      "loadProfile",
      "welchPsd",
      "rideRecording",
      "analyzeTransfer",
      "responseSpectra",
      "deriveProfile",
      "shockRecording",
      "verifyReport",
      "synthesizeProfile",
      "InputError",
    ]) {
      expect(typeof (psdgate as Record<string, unknown>)[name], name).toBe("function");
    }
    for (const name of [
      "errorToWire",
      "errorFromWire",
      "runAnalysis",
      "WelchAccumulator",
      "SegmentPower",
      "RealFft",
      "resolveAnalysis",
    ]) {
      expect(name in psdgate, name).toBe(false);
    }
  });
});
