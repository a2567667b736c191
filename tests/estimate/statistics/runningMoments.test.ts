import { describe, expect, it } from "vitest";
import { RunningMoments } from "../../../src/estimate/statistics/runningMoments.js";
import { gaussian, scipyReference } from "../../helpers.js";

describe("RunningMoments", () => {
  it("matches numpy/scipy moments of the fixture signal, pushed in uneven blocks", () => {
    // numpy 2.4.6 mean/std, scipy 1.17.1 stats.skew and stats.kurtosis(fisher=False)
    const x = Float64Array.from(scipyReference.signal);
    const m = new RunningMoments();
    let i = 0;
    for (const len of [1, 2, 997, 1000, 1000]) {
      m.push(x.slice(i, i + len));
      i += len;
    }
    const r = m.result();
    const ref = scipyReference.moments;
    expect(r.count).toBe(3000);
    for (const k of ["mean", "std", "skewness", "kurtosis", "min", "max"] as const)
      expect(Math.abs(r[k] - ref[k]!) / Math.abs(ref[k]!)).toBeLessThan(1e-11);
  });
  it("Gaussian noise: kurtosis 3 +- 0.05 with 1e6 samples (Pearson; docs/REFERENCES.md sec. 10)", () => {
    const m = new RunningMoments();
    m.push(gaussian(1_000_000, 11));
    expect(m.result().kurtosis).toBeGreaterThan(2.95);
    expect(m.result().kurtosis).toBeLessThan(3.05);
  });
  it("residual mean square after a least-squares line removes a pure ramp exactly", () => {
    const m = new RunningMoments();
    const x = new Float64Array(1000);
    for (let i = 0; i < 1000; i++) x[i] = 3 + 0.01 * i;
    m.push(x.subarray(0, 400));
    m.push(x.subarray(400));
    expect(m.residualMeanSquare("linear")).toBeLessThan(1e-12);
    expect(m.residualMeanSquare("none")).toBeGreaterThan(9);
  });
  it("a large offset (1e4 g with 1e-3 g noise) loses no accuracy: std and kurtosis match a two-pass computation", () => {
    const noise = gaussian(200000, 21, 1e-3);
    const x = noise.map((v) => 1e4 + v);
    const m = new RunningMoments();
    for (let i = 0; i < x.length; i += 8192) m.push(x.subarray(i, Math.min(x.length, i + 8192)));
    let mean = 0;
    for (const v of x) mean += v;
    mean /= x.length;
    let m2 = 0;
    let m4 = 0;
    for (const v of x) {
      m2 += (v - mean) ** 2;
      m4 += (v - mean) ** 4;
    }
    const r = m.result();
    expect(Math.abs(r.std / Math.sqrt(m2 / x.length) - 1)).toBeLessThan(1e-8);
    expect(Math.abs(r.kurtosis / ((x.length * m4) / (m2 * m2)) - 1)).toBeLessThan(1e-6);
  });
  it("counts non-finite samples apart and samples at the extremes", () => {
    const m = new RunningMoments();
    m.push(Float64Array.from([1, NaN, 5, 5, 5, -2, Infinity, -2]));
    const r = m.result();
    expect(r.nonFinite).toBe(2);
    expect(r.count).toBe(6);
    expect(r.atMax).toBe(3);
    expect(r.atMin).toBe(2);
    expect(r.max).toBe(5);
  });
});
