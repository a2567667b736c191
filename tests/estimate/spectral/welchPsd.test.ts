import { describe, expect, it } from "vitest";
import { welchPsd } from "../../../src/estimate/spectral/psdEstimate.js";
import { WelchAccumulator } from "../../../src/estimate/spectral/welchPsd.js";
import { spectralWindow } from "../../../src/estimate/spectral/windows.js";
import { gaussian, maxRelDiff, scipyReference } from "../../helpers.js";

const x = Float64Array.from(scipyReference.signal);
const fs = scipyReference.sampleRateHz;

describe("welchPsd against scipy.signal.welch", () => {
  // scipy 1.17.1 signal.welch(scaling="density"), tests/fixtures/scipy-reference.json (scripts/make_scipy_fixtures.py)
  for (const c of scipyReference.welch) {
    it(`welchPsd(x, {window: ${c.window}, segmentLength: ${c.segmentLength}, overlap: ${c.overlap}, detrend: ${c.detrend}}) matches scipy to 1e-9`, () => {
      const r = welchPsd(x, fs, {
        window: c.window as "hann",
        segmentLength: c.segmentLength,
        overlap: c.overlap,
        detrend: c.detrend as "mean",
      });
      expect(r.psd.length).toBe(c.psd.length);
      expect(maxRelDiff(r.frequencyHz, c.frequencyHz)).toBeLessThan(1e-12);
      expect(maxRelDiff(r.psd, c.psd)).toBeLessThan(1e-9);
    });
  }
});

describe("welchPsd invariants", () => {
  it("hand values: impulse, rectangular window, N=4, no detrend", () => {
    // One segment [1,0,0,0]: |X[k]|^2 = 1 for all k; P = 2/(fs*4) inside, 1/(fs*4) at DC and Nyquist (hand computation).
    const r = welchPsd(Float64Array.from([1, 0, 0, 0]), 8, {
      window: "rectangular",
      segmentLength: 4,
      overlap: 0,
      detrend: "none",
    });
    expect(Array.from(r.psd)).toEqual([1 / 32, 2 / 32, 1 / 32]);
  });
  for (const w of ["hann", "hamming", "blackman-harris", "flattop", "rectangular"] as const) {
    it(`${w}: a sine of amplitude A puts A^2/2 under the PSD (common practice; docs/REFERENCES.md sec. 11)`, () => {
      const n = 1 << 16;
      const s = new Float64Array(n);
      for (let i = 0; i < n; i++) s[i] = 2 * Math.sin((2 * Math.PI * 123.4 * i) / 2048);
      const r = welchPsd(s, 2048, { window: w, segmentLength: 2048 });
      expect(r.rmsPsd ** 2).toBeCloseTo(2, 2);
    });
    it(`${w}: white noise of variance 1 has mean density 2/fs over interior lines (docs/REFERENCES.md sec. 1)`, () => {
      const r = welchPsd(gaussian(1 << 18, 7), 1000, { window: w, segmentLength: 512 });
      let s = 0;
      for (let k = 1; k < 256; k++) s += r.psd[k]!;
      expect(s / 255 / (2 / 1000)).toBeCloseTo(1, 1);
    });
  }
  it("Parseval, exact: sum(P) df equals the average window-weighted mean square (docs/REFERENCES.md sec. 11)", () => {
    for (const d of ["none", "mean", "linear"] as const) {
      const r = welchPsd(x, fs, { window: "hann", segmentLength: 256, overlap: 0.6, detrend: d });
      expect(Math.abs(r.rmsPsd ** 2 / r.windowedMeanSquare - 1)).toBeLessThan(1e-12);
    }
  });
  it("streaming: any block split gives the same PSD as one push", () => {
    const w = spectralWindow("hann", 256);
    const settings = { segmentLength: 256, hop: 100, window: w, detrend: "linear" as const };
    const whole = new WelchAccumulator(settings);
    whole.push(x);
    const pieces = new WelchAccumulator(settings);
    let i = 0;
    for (const len of [1, 7, 255, 256, 257, 1000, 3000]) {
      const m = Math.min(len, x.length - i);
      pieces.push(x.slice(i, i + m));
      i += m;
    }
    expect(Array.from(pieces.finish(fs).psd)).toEqual(Array.from(whole.finish(fs).psd));
  });
  it("hop longer than a segment (overlap 0 with skip) counts floor((n - N)/hop) + 1 segments", () => {
    const acc = new WelchAccumulator({
      segmentLength: 64,
      hop: 100,
      window: spectralWindow("hann", 64),
      detrend: "mean",
    });
    acc.push(gaussian(1000, 3));
    expect(acc.finish(100).segments).toBe(Math.floor((1000 - 64) / 100) + 1);
  });
  it("a segment with NaN is left out and counted, never averaged in", () => {
    const y = gaussian(4096, 5);
    y[100] = NaN;
    const r = welchPsd(y, 1000, { segmentLength: 512, overlap: 0.5 });
    expect(r.skippedSegments).toBe(1);
    expect(r.averages).toBe(14);
    expect(r.psd.every(Number.isFinite)).toBe(true);
  });
  it("confidence bounds contain the estimate and widen with confidence", () => {
    const a = welchPsd(gaussian(20000, 9), 1000, { segmentLength: 256, confidence: 0.9 });
    const b = welchPsd(gaussian(20000, 9), 1000, { segmentLength: 256, confidence: 0.99 });
    for (let k = 0; k < a.psd.length; k++) {
      expect(a.lower[k]!).toBeLessThan(a.psd[k]!);
      expect(a.upper[k]!).toBeGreaterThan(a.psd[k]!);
      expect(b.lower[k]!).toBeLessThan(a.lower[k]!);
    }
  });
});
