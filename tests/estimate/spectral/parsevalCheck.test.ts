import { describe, expect, it } from "vitest";
import { parsevalCheck, parsevalTolerance } from "../../../src/estimate/spectral/parsevalCheck.js";
import { welchPsd } from "../../../src/estimate/spectral/psdEstimate.js";
import { shapedRecord } from "../../shapedRecords.js";

const residualRms = (x: Float64Array) => {
  let m = 0;
  for (const v of x) m += v;
  m /= x.length;
  let s = 0;
  for (const v of x) s += (v - m) ** 2;
  return Math.sqrt(s / x.length);
};

describe("parsevalCheck", () => {
  it("white noise, many averages: the PSD's RMS agrees with the same segments' plain RMS within the record's own tolerance", () => {
    const x = shapedRecord(() => 2 / 1024, 1024, 1 << 16, 3);
    const p = welchPsd(x, 1024, { segmentLength: 512 });
    const c = parsevalCheck(residualRms(x), p, "hann");
    expect(c.toleranceFrom).toBe("record");
    expect(c.ok).toBe(true);
    // docs/REFERENCES.md sec. 11: Hann, 2^16 samples, sd of the ratio about 0.14 %; the tolerance is a few of those.
    expect(c.tolerance).toBeLessThan(0.01);
    expect(Math.abs(c.belowFirstLineShare)).toBeLessThan(0.01);
  });
  it("narrow-band records (30 Hz resonance, Q 20, 16 averages): no false doubt in 200, where the fixed 2 % tolerance doubted many", () => {
    const fs = 1024;
    const sdof = (f: number) => (1 / ((1 - (f / 30) ** 2) ** 2 + (f / 30 / 20) ** 2)) * 1e-3;
    let doubts = 0;
    let fixed = 0;
    for (let r = 0; r < 200; r++) {
      const x = shapedRecord(sdof, fs, 1 << 14, 500 + r).subarray(0, 17 * 512);
      const p = welchPsd(x, fs, { segmentLength: 1024 });
      expect(p.averages).toBe(16);
      const c = parsevalCheck(residualRms(x), p, "hann");
      if (!c.ok) doubts++;
      if (Math.abs(p.rmsPsd / residualRms(x) - 1) > parsevalTolerance("hann", 16)) fixed++;
    }
    // Nominal false-doubt rate 1e-4 per channel (PARSEVAL_FALSE_DOUBT_RATE); the old fixed tolerance against the whole record's RMS doubted several per cent.
    expect(doubts).toBeLessThanOrEqual(1);
    expect(fixed).toBeGreaterThan(10);
  });
  it("a slow drift far below the first line is a share below the first line (a note), not a mismatch", () => {
    const fs = 1024;
    const x = shapedRecord((f) => (f > 5 && f < 400 ? 1e-3 : 0), fs, 1 << 16, 9);
    for (let i = 0; i < x.length; i++) x[i] = x[i]! + 2 * Math.sin((2 * Math.PI * 0.02 * i) / fs);
    const p = welchPsd(x, fs, { segmentLength: 1024 });
    const c = parsevalCheck(residualRms(x), p, "hann");
    expect(c.ok).toBe(true);
    expect(c.belowFirstLineShare).toBeGreaterThan(0.5);
  });
  it("a PSD that disagrees with its segments is caught: ratio off by 10 % gives ok false", () => {
    const x = shapedRecord(() => 2 / 1024, 1024, 1 << 16, 4);
    const p = welchPsd(x, 1024, { segmentLength: 512 });
    const c = parsevalCheck(residualRms(x), { ...p, rmsPsd: p.rmsPsd * 1.1 }, "hann");
    expect(c.ok).toBe(false);
  });
});
