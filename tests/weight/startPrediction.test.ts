import { describe, expect, it } from "vitest";
import { burgCoefficients, predictBefore } from "../../src/weight/startPrediction.js";
import { vibrationDose } from "../../src/weight/vibrationDose.js";
import { designWeightingFilter, weightingCascade } from "../../src/weight/weightingFilter.js";
import { gaussian } from "../helpers.js";

describe("burgCoefficients", () => {
  it("recovers a known AR(2) process: x[n] - 1.6 x[n-1] + 0.9 x[n-2] = e[n], 2e5 samples, to 0.01", () => {
    // Known answer by construction (the test makes the process); the estimate's standard error is about
    // sqrt((1 - a2^2) / N) = 1e-3 (Box & Jenkins, large-sample AR variance, from memory).
    const n = 200_000;
    const e = gaussian(n, 31);
    const x = new Float64Array(n);
    for (let i = 0; i < n; i++) x[i] = e[i]! + (i > 0 ? 1.6 * x[i - 1]! : 0) - (i > 1 ? 0.9 * x[i - 2]! : 0);
    const a = burgCoefficients(x, 2);
    expect(a[0]).toBeCloseTo(-1.6, 2);
    expect(a[1]).toBeCloseTo(0.9, 2);
    // A higher order adds coefficients near zero.
    const a4 = burgCoefficients(x, 4);
    expect(Math.abs(a4[2]!)).toBeLessThan(0.01);
    expect(Math.abs(a4[3]!)).toBeLessThan(0.01);
  });
  it("every reflection coefficient is at most 1 in magnitude: a pure sine's model is stable (|a_2| <= 1)", () => {
    const x = Float64Array.from({ length: 1000 }, (_, i) => Math.sin(0.3 * i + 1));
    const a = burgCoefficients(x, 2);
    expect(Math.abs(a[1]!)).toBeLessThanOrEqual(1);
    // sin(w n) = 2 cos(w) sin(w (n-1)) - sin(w (n-2)) exactly; Burg's estimate of a sinusoid's frequency carries a small
    // phase-dependent bias (Kay, Modern Spectral Estimation, 1988, from memory): 3e-4 here.
    expect(Math.abs(a[0]! + 2 * Math.cos(0.3))).toBeLessThan(1e-3);
  });
});

describe("predictBefore", () => {
  it("continues a sine backwards at any phase to 1e-3 of its amplitude over 5 s (1 Hz and 31.5 Hz at 200 Hz, order 40)", () => {
    const fs = 200;
    const k = 5 * fs;
    for (const [f, phase] of [
      [1, 0.7],
      [31.5, 2.1],
    ] as const) {
      const x = Float64Array.from({ length: k }, (_, i) => Math.cos((2 * Math.PI * f * i) / fs + phase));
      const out = new Float64Array(k - 1);
      expect(predictBefore(x, 40, k - 1, out)).toBe(true);
      let worst = 0;
      for (let j = 0; j < k - 1; j++) {
        const t = j - (k - 1); // out[j] is x[j - (k - 1)]
        worst = Math.max(worst, Math.abs(out[j]! - Math.cos((2 * Math.PI * f * t) / fs + phase)));
      }
      expect(worst).toBeLessThan(1e-3); // measured 1.0e-4
    }
  });
  it("noise fades to zero (the level the caller removed) and stays bounded; a start too short for a model is refused", () => {
    const x = gaussian(1000, 5);
    const out = new Float64Array(999);
    expect(predictBefore(x, 40, 999, out)).toBe(true);
    let early = 0;
    for (let j = 0; j < 200; j++) early = Math.max(early, Math.abs(out[j]!));
    expect(early).toBeLessThan(0.1);
    expect(predictBefore(Float64Array.from([1, 2, 3, 4, 5]), 40, 4, new Float64Array(4))).toBe(false);
  });
});

describe("the weighting filter's start on a ride-like record", () => {
  // The reference is the same filter run over 40 s of the same record's history: what the first sample's state would be
  // had the recording started earlier. A 1.3 Hz body bounce of amplitude 1 m/s^2 at an arbitrary phase, white noise of
  // 0.3 m/s^2, gravity on z, 1000 Hz. The odd reflection about the start's mean (the earlier start) read MTVV up to +7 %
  // and the crest factor up to +59 % on such records in the audit's seeded runs (numpy/scipy, 30 records).
  for (const seed of [1, 2, 3, 4]) {
    it(`seed ${seed}: MTVV and crest factor of 60 s within 0.5 % of the record with history, a_w and VDV within 0.2 %`, () => {
      const fs = 1000;
      const lead = 40 * fs;
      const n = 60 * fs;
      const noise = gaussian(lead + n, 100 + seed, 0.3);
      const phase = seed * 1.7;
      const x = Float64Array.from(
        { length: lead + n },
        (_, i) => 9.80665 + Math.cos((2 * Math.PI * 1.3 * i) / fs + phase) + noise[i]!,
      );
      const d = designWeightingFilter("Wk", fs);
      const ref = new Float64Array(lead + n);
      weightingCascade(d).process(x, ref, lead + n);
      const y = new Float64Array(n);
      weightingCascade(d).process(x.subarray(lead), y, n);
      const got = vibrationDose(y, fs);
      const want = vibrationDose(ref.subarray(lead), fs);
      expect(Math.abs(got.mtvv / want.mtvv - 1)).toBeLessThan(0.005);
      expect(Math.abs(got.crestFactor / want.crestFactor - 1)).toBeLessThan(0.005);
      expect(Math.abs(got.rms / want.rms - 1)).toBeLessThan(0.002);
      expect(Math.abs(got.vdv / want.vdv - 1)).toBeLessThan(0.002);
    });
  }
});
