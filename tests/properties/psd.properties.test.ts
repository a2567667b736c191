import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { lowerFactor, upperFactor } from "../../src/compare/decisionRule.js";
import { parseProfile, profileLevel } from "../../src/compare/testProfile.js";
import { chiSquareIntervalFactors } from "../../src/estimate/statistics/distributions.js";
import { welchPsd } from "../../src/estimate/spectral/psdEstimate.js";
import { WINDOW_NAMES } from "../../src/estimate/spectral/windows.js";
import { gaussian } from "../helpers.js";

const settings = fc.record({
  window: fc.constantFrom(...WINDOW_NAMES),
  segmentLength: fc.constantFrom(8, 16, 64, 256),
  overlap: fc.constantFrom(0, 0.25, 0.5, 0.6, 0.75),
  detrend: fc.constantFrom("none" as const, "mean" as const, "linear" as const),
});
const signal = fc
  .tuple(
    fc.integer({ min: 1, max: 1e6 }),
    fc.integer({ min: 300, max: 3000 }),
    fc.double({ min: -5, max: 5, noNaN: true }),
  )
  .map(([seed, n, offset]) => gaussian(n, seed).map((v, i) => v + offset + 0.001 * i));

describe("Welch PSD properties (fast-check, seeded)", () => {
  const params = { seed: 20261201, numRuns: 150 };
  it("sum(P) df equals the average window-weighted mean square of the detrended segments (Parseval)", () => {
    fc.assert(
      fc.property(signal, settings, (x, s) => {
        const r = welchPsd(x, 1000, s);
        return Math.abs(r.rmsPsd ** 2 / r.windowedMeanSquare - 1) < 1e-10;
      }),
      params,
    );
  });
  it("rectangular window, no detrending, no overlap: sum(P) df is exactly the mean square of the segments' samples", () => {
    fc.assert(
      fc.property(signal, fc.constantFrom(8, 32, 128), (x, n) => {
        const r = welchPsd(x, 500, { window: "rectangular", detrend: "none", overlap: 0, segmentLength: n });
        const used = r.averages * n;
        let ms = 0;
        for (let i = 0; i < used; i++) ms += x[i]! * x[i]!;
        return Math.abs(r.rmsPsd ** 2 / (ms / used) - 1) < 1e-10;
      }),
      params,
    );
  });
  it("scaling the input by k scales the PSD by k^2", () => {
    fc.assert(
      fc.property(signal, settings, fc.double({ min: 1e-3, max: 1e3, noNaN: true }), (x, s, k) => {
        const a = welchPsd(x, 1000, s);
        const b = welchPsd(
          x.map((v) => k * v),
          1000,
          s,
        );
        const scale = Math.max(...a.psd);
        return a.psd.every((p, i) => Math.abs(b.psd[i]! - k * k * p) <= 1e-9 * k * k * scale);
      }),
      params,
    );
  });
  it("the PSD is non-negative and its confidence interval contains it", () => {
    fc.assert(
      fc.property(signal, settings, fc.double({ min: 0.5, max: 0.999, noNaN: true }), (x, s, confidence) => {
        const r = welchPsd(x, 1000, { ...s, confidence });
        return r.psd.every((p, i) => p >= 0 && r.lower[i]! <= p && p <= r.upper[i]!);
      }),
      params,
    );
  });
});

describe("profile properties (fast-check, seeded)", () => {
  const points = fc
    .array(fc.tuple(fc.double({ min: 1.05, max: 3, noNaN: true }), fc.double({ min: 1e-4, max: 1, noNaN: true })), {
      minLength: 2,
      maxLength: 8,
    })
    .map((steps) => {
      let hz = 5;
      return steps.map(([r, level]) => ({ hz: (hz *= r), level }));
    });
  it("log-log interpolation passes through every breakpoint and is monotone within each segment", () => {
    fc.assert(
      fc.property(points, (pts) => {
        const p = parseProfile(
          JSON.stringify({
            title: "p",
            units: "g2/Hz",
            points: pts,
            tolerance: { bands: [{ fromHz: pts[0]!.hz, toHz: pts[pts.length - 1]!.hz, upperDb: 3, lowerDb: 3 }] },
          }),
          "p.json",
        );
        for (const b of pts) if (Math.abs(profileLevel(p, b.hz) / b.level - 1) > 1e-9) return false;
        for (const s of p.segments) {
          let prev = profileLevel(p, s.f1);
          for (let i = 1; i <= 20; i++) {
            const v = profileLevel(p, s.f1 * (s.f2 / s.f1) ** (i / 20));
            if (s.g2 >= s.g1 ? v < prev * (1 - 1e-12) : v > prev * (1 + 1e-12)) return false;
            prev = v;
          }
        }
        return true;
      }),
      { seed: 7, numRuns: 200 },
    );
  });
});

describe("synthesis properties (fast-check, seeded)", () => {
  it("synth then psd keeps every line inside its family-wise chi-square interval around the profile, whatever the seed", async () => {
    const { synthesizeProfile } = await import("../../src/synth/synthesizeProfile.js");
    const p = parseProfile(
      JSON.stringify({
        title: "p",
        units: "g2/Hz",
        points: [
          { hz: 20, level: 0.002 },
          { hz: 80, level: 0.02 },
          { hz: 500, level: 0.02 },
          { hz: 1000, level: 0.005 },
        ],
        tolerance: { bands: [{ fromHz: 20, toHz: 1000, upperDb: 3, lowerDb: 3 }] },
      }),
      "p.json",
    );
    await fc.assert(
      fc.asyncProperty(fc.integer({ min: 0, max: 2 ** 31 }), async (seed) => {
        const x = new Float64Array(40 * 2560);
        let i = 0;
        await synthesizeProfile(p, { durationS: 40, sampleRateHz: 2560, seed }, (b, n) => {
          x.set(b[0]!.subarray(0, n), i);
          i += n;
        });
        const r = welchPsd(x, 2560, { resolutionHz: 2.5 });
        // Bonferroni over the lines at 1e-3 (chi-square with the achieved DOF; Bendat & Piersol 2010, ch. 8).
        const lines = r.frequencyHz.filter((f) => Number.isFinite(profileLevel(p, f))).length;
        const hi = upperFactor(r.dof, 1e-3 / (2 * lines));
        const lo = lowerFactor(r.dof, 1e-3 / (2 * lines));
        for (let k = 0; k < r.psd.length; k++) {
          const req = profileLevel(p, r.frequencyHz[k]!);
          if (Number.isFinite(req) && !(r.psd[k]! / req < hi && r.psd[k]! / req > lo)) return false;
        }
        return true;
      }),
      { seed: 11, numRuns: 6 },
    );
  });
});

describe("statistical honesty (Monte Carlo, seeded)", () => {
  it("over 400 white-noise records the 90 % interval covers the true density on 90 % of lines, within 1.5 %", () => {
    // White noise of variance 1 at fs has one-sided density 2/fs (docs/REFERENCES.md sec. 1); Bendat & Piersol 2010, ch. 8.
    const fs = 1000;
    const truth = 2 / fs;
    let inside = 0;
    let total = 0;
    for (let rec = 0; rec < 400; rec++) {
      const r = welchPsd(gaussian(128 * 11, 1000 + rec), fs, { segmentLength: 256, overlap: 0.5, confidence: 0.9 });
      for (let k = 1; k < 128; k++) {
        total++;
        if (r.lower[k]! <= truth && truth <= r.upper[k]!) inside++;
      }
    }
    expect(Math.abs(inside / total - 0.9)).toBeLessThan(0.015);
  });
  it("the spread of the estimate matches sqrt(2 / dof) within 5 % (docs/REFERENCES.md sec. 3)", () => {
    const r = welchPsd(gaussian(1 << 18, 77), 1000, { segmentLength: 512, overlap: 0.5 });
    let s = 0;
    let s2 = 0;
    let n = 0;
    for (let k = 5; k < 250; k++) {
      const v = r.psd[k]! / (2 / 1000);
      s += v;
      s2 += v * v;
      n++;
    }
    const sd = Math.sqrt(s2 / n - (s / n) ** 2);
    expect(Math.abs(sd / r.randomError - 1)).toBeLessThan(0.08);
    expect(chiSquareIntervalFactors(r.dof, 0.9).lower).toBeLessThan(1);
  });
});
