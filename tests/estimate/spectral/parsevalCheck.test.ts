import { describe, expect, it } from "vitest";
import { parsevalCheck, parsevalTolerance } from "../../../src/estimate/spectral/parsevalCheck.js";
import { welchPsd } from "../../../src/estimate/spectral/psdEstimate.js";
import { gaussian } from "../../helpers.js";
import { shapedRecord } from "../../shapedRecords.js";

/** Seeded white noise plus a sine sway holding `share` of the mean square (made here, not by psdgate's synth). */
const swaying = (fs: number, length: number, fHz: number, share: number, seed: number) => {
  const x = gaussian(length, seed);
  const amp = Math.sqrt((2 * share) / (1 - share));
  for (let i = 0; i < length; i++) x[i] = x[i]! + amp * Math.sin((2 * Math.PI * fHz * i) / fs + 0.7);
  return x;
};

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
  it("a 1.5 Hz sway holding 15 % of the mean square (25.6 kHz, 4096-point segments, 6.25 Hz lines) is not doubted; the plain mean square alone sits about 1 % off", () => {
    const fs = 25_600;
    const x = swaying(fs, 30 * fs, 1.5, 0.15, 31);
    const p = welchPsd(x, fs);
    expect(p.lineSpacingHz).toBe(6.25);
    const c = parsevalCheck(residualRms(x), p, "hann");
    expect(c.toleranceFrom).toBe("record");
    expect(c.ok).toBe(true);
    // The bias: the window sees the ramp the sway leaves in each segment less than the plain mean square does.
    expect(c.ratio - 1).toBeLessThan(-0.005);
    expect(Math.abs(c.ratio - 1)).toBeGreaterThan(3 * c.tolerance);
    expect(c.tolerance).toBeLessThan(0.003);
    // The second reference, the slow part weighed alike on both sides, agrees.
    expect(c.slowPart.ok).toBe(true);
    expect(Math.abs(c.slowPart.ratio - 1)).toBeLessThan(c.slowPart.tolerance);
  });
  it("why either reference: a pure sine on a bin (every segment alike) and a resonance near line 5 agree with the plain mean square, not with the slow-part reference, which takes a little of them", () => {
    const fs = 1024;
    const sine = Float64Array.from({ length: 1 << 18 }, (_, i) => Math.sin((2 * Math.PI * 16 * i) / fs + 0.3));
    const ps = welchPsd(sine, fs, { segmentLength: 1024 });
    const cs = parsevalCheck(residualRms(sine), ps, "hann");
    expect(cs.ok).toBe(true);
    expect(Math.abs(cs.ratio - 1)).toBeLessThanOrEqual(cs.tolerance);
    expect(cs.slowPart.ok).toBe(false);
    // A random resonance at 5 Hz (line 5 of 1 Hz lines), Q 20.
    const r = (f: number) => 1e-3 / ((1 - (f / 5) ** 2) ** 2 + (f / 5 / 20) ** 2);
    const x = shapedRecord(r, fs, 1 << 21, 21);
    const c = parsevalCheck(residualRms(x), welchPsd(x, fs, { segmentLength: 1024 }), "hann");
    expect(c.ok).toBe(true);
    expect(Math.abs(c.ratio - 1)).toBeLessThanOrEqual(c.tolerance);
    expect(Math.abs(c.slowPart.ratio - 1)).toBeGreaterThan(c.slowPart.tolerance);
  });
  describe("still catches what it is for, on a plain record and on a swaying one", () => {
    const fs = 1024;
    const records = {
      white: gaussian(1 << 17, 12),
      swaying: swaying(fs, 1 << 17, 0.4, 0.3, 13),
    };
    for (const [name, x] of Object.entries(records)) {
      const p = welchPsd(x, fs, { segmentLength: 512 });
      const area = (q: Float64Array) => q.reduce((a, v) => a + v, 0) * p.lineSpacingHz;
      /** The check on a PSD whose lines are scaled by g (as a wrong scaling or count would). */
      const scaled = (g: number) => {
        const psd = p.psd.map((v) => v * g);
        return parsevalCheck(residualRms(x), { ...p, psd, rmsPsd: Math.sqrt(area(psd)) }, "hann");
      };
      it(`${name}: the right PSD passes`, () => expect(scaled(1).ok).toBe(true));
      it(`${name}: one-sided factor 2 left out, or applied to DC and Nyquist alike (x 0.5, x 2)`, () => {
        expect(scaled(0.5).ok).toBe(false);
        expect(scaled(2).ok).toBe(false);
      });
      it(`${name}: lost or doubled segments (sum over k segments divided by 2k, or over 2k divided by k)`, () => {
        expect(scaled(0.5).ok).toBe(false);
        expect(scaled(2).ok).toBe(false);
        // A tenth of the segments' sums lost with the count kept.
        expect(scaled(0.9).ok).toBe(false);
      });
      it(`${name}: a window error (hann windowed, normalised by sum w^2 of the hamming, 0.375 / 0.3974)`, () => {
        // Harris 1978, Proc. IEEE 66(1) table 1: sum w^2 / N of hann 0.375, of hamming 0.3974 (0.54^2 + 0.46^2 / 2).
        expect(scaled(0.375 / 0.3974).ok).toBe(false);
      });
      it(`${name}: a 1 % scaling error in mean square`, () => {
        expect(scaled(1.01).ok).toBe(false);
        expect(scaled(0.99).ok).toBe(false);
      });
    }
  });
});
