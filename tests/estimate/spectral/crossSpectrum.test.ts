import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { CrossSpectrumAccumulator, crossSpectralDensity } from "../../../src/estimate/spectral/crossSpectrum.js";
import { welchPsd } from "../../../src/estimate/spectral/psdEstimate.js";
import { spectralWindow } from "../../../src/estimate/spectral/windows.js";
import { gaussian, maxRelDiff } from "../../helpers.js";

interface CsdCase {
  window: string;
  segmentLength: number;
  overlap: number;
  detrend: string;
  frequencyHz: number[];
  pxyRe: number[];
  pxyIm: number[];
  pxx: number[];
  pyy: number[];
  coherence: number[];
}
// scipy 1.17.1 signal.csd / welch / coherence; written by scripts/make_scipy_csd_fixtures.py
const ref: { source: string; sampleRateHz: number; x: number[]; y: number[]; cases: CsdCase[] } = JSON.parse(
  readFileSync(new URL("../../fixtures/scipy-csd.json", import.meta.url), "utf8"),
);
const x = Float64Array.from(ref.x);
const y = Float64Array.from(ref.y);
const fs = ref.sampleRateHz;

/** Largest |a - b| relative to the largest |b| of a complex pair of arrays. */
function maxComplexDiff(aRe: ArrayLike<number>, aIm: ArrayLike<number>, bRe: number[], bIm: number[]): number {
  let scale = 0;
  let m = 0;
  for (let k = 0; k < bRe.length; k++) scale = Math.max(scale, Math.hypot(bRe[k]!, bIm[k]!));
  for (let k = 0; k < bRe.length; k++) m = Math.max(m, Math.hypot(aRe[k]! - bRe[k]!, aIm[k]! - bIm[k]!));
  return m / scale;
}

describe("crossSpectralDensity against scipy.signal.csd, welch and coherence", () => {
  it("the fixture names its scipy version", () => expect(ref.source).toMatch(/^scipy 1\.17\.1/));
  for (const c of ref.cases) {
    it(`crossSpectralDensity(x, y, {window: ${c.window}, segmentLength: ${c.segmentLength}, overlap: ${c.overlap}, detrend: ${c.detrend}}) matches scipy 1.17.1 to 1e-9`, () => {
      const r = crossSpectralDensity(x, y, fs, {
        window: c.window as "hann",
        segmentLength: c.segmentLength,
        overlap: c.overlap,
        detrend: c.detrend as "mean",
      });
      expect(r.auto[0]!.length).toBe(c.pxx.length);
      // scipy 1.17.1 signal.csd (conj(X) Y, one-sided density)
      expect(maxComplexDiff(r.crossRe[1]!, r.crossIm[1]!, c.pxyRe, c.pxyIm)).toBeLessThan(1e-9);
      // scipy 1.17.1 signal.welch
      expect(maxRelDiff(r.auto[0]!, c.pxx)).toBeLessThan(1e-9);
      expect(maxRelDiff(r.auto[1]!, c.pyy)).toBeLessThan(1e-9);
      // scipy 1.17.1 signal.coherence: |Pxy|^2 / (Pxx Pyy), line by line. A line whose input spectrum is
      // at rounding level (DC after mean removal with the rectangular window: 1e-33) is 0/0 in both.
      let worst = 0;
      const top = Math.max(...c.pxx);
      for (let k = 0; k < c.coherence.length; k++) {
        if (c.pxx[k]! < 1e-20 * top) continue;
        const g = (r.crossRe[1]![k]! ** 2 + r.crossIm[1]![k]! ** 2) / (r.auto[0]![k]! * r.auto[1]![k]!);
        worst = Math.max(worst, Math.abs(g - c.coherence[k]!));
      }
      expect(worst).toBeLessThan(1e-9);
    });
  }
});

describe("CrossSpectrumAccumulator", () => {
  it("auto spectra equal the fused Welch kernel's (welchPsd) to 1e-12, every detrend mode", () => {
    for (const d of ["none", "mean", "linear"] as const) {
      const r = crossSpectralDensity(x, y, fs, { segmentLength: 512, overlap: 0.6, detrend: d });
      expect(
        maxRelDiff(r.auto[0]!, welchPsd(x, fs, { segmentLength: 512, overlap: 0.6, detrend: d }).psd),
      ).toBeLessThan(1e-12);
      expect(
        maxRelDiff(r.auto[1]!, welchPsd(y, fs, { segmentLength: 512, overlap: 0.6, detrend: d }).psd),
      ).toBeLessThan(1e-12);
    }
  });
  it("csd(x, x) is welch(x): real, equal to the auto spectrum", () => {
    const r = crossSpectralDensity(x, x, fs, { segmentLength: 256 });
    expect(maxRelDiff(r.crossRe[1]!, r.auto[0]!)).toBeLessThan(1e-14);
    for (const v of r.crossIm[1]!) expect(Math.abs(v)).toBeLessThan(1e-12 * Math.max(...r.auto[0]!));
  });
  it("streaming: any block split gives the same sums as one push", () => {
    const w = spectralWindow("hann", 256);
    const settings = { segmentLength: 256, hop: 100, window: w, detrend: "linear" as const };
    const one = new CrossSpectrumAccumulator(settings, 3, 1);
    const z = gaussian(x.length, 3);
    one.push([x, y, z]);
    const split = new CrossSpectrumAccumulator(settings, 3, 1);
    for (let i = 0; i < x.length; i += 333) {
      const e = Math.min(x.length, i + 333);
      split.push([x.slice(i, e), y.slice(i, e), z.slice(i, e)]);
    }
    const a = one.finish(fs);
    const b = split.finish(fs);
    expect(b.segments).toBe(a.segments);
    expect(maxRelDiff(b.auto[2]!, a.auto[2]!)).toBeLessThan(1e-13);
    expect(maxRelDiff(b.crossRe[0]!, a.crossRe[0]!)).toBeLessThan(1e-13);
    expect(maxRelDiff(b.crossIm[2]!, a.crossIm[2]!)).toBeLessThan(1e-13);
    expect(a.crossRe[1]).toBeUndefined();
  });
  it("a NaN in one channel leaves that segment out of every channel's sums", () => {
    const w = spectralWindow("hann", 256);
    const settings = { segmentLength: 256, hop: 256, window: w, detrend: "mean" as const };
    const yy = y.slice();
    yy[300] = NaN; // in the second segment (256..511)
    const acc = new CrossSpectrumAccumulator(settings, 2);
    acc.push([x, yy]);
    const r = acc.finish(fs);
    expect(r.skippedSegments).toBe(1);
    expect(r.segments).toBe(Math.floor(x.length / 256) - 1);
    // Same as the record without that segment.
    const cut = (s: Float64Array) => Float64Array.from([...s.subarray(0, 256), ...s.subarray(512)]);
    const ref2 = crossSpectralDensity(cut(x), cut(y), fs, { segmentLength: 256, overlap: 0 });
    expect(maxRelDiff(r.auto[0]!, ref2.auto[0]!)).toBeLessThan(1e-13);
    expect(maxRelDiff(r.crossRe[1]!, ref2.crossRe[1]!)).toBeLessThan(1e-13);
    for (const v of r.auto[1]!) expect(Number.isFinite(v)).toBe(true);
  });
});
