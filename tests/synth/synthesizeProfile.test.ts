import { describe, expect, it } from "vitest";
import { lowerFactor, upperFactor } from "../../src/compare/decisionRule.js";
import { parseProfile, profileLevel } from "../../src/compare/testProfile.js";
import { welchPsd } from "../../src/estimate/spectral/psdEstimate.js";
import { synthesizeProfile } from "../../src/synth/synthesizeProfile.js";
import { GaussianNoise } from "../../src/synth/gaussianNoise.js";

const profile = parseProfile(
  JSON.stringify({
    title: "t",
    units: "g2/Hz",
    points: [
      { hz: 20, level: 0.005 },
      { hz: 100, level: 0.05 },
      { hz: 1000, level: 0.05 },
      { hz: 2000, level: 0.0125 },
    ],
    tolerance: { bands: [{ fromHz: 20, toHz: 2000, upperDb: 3, lowerDb: 3 }] },
  }),
  "p.json",
);

async function record(seed: number, durationS: number, fs = 5120): Promise<Float64Array> {
  const out = new Float64Array(Math.round(durationS * fs));
  let i = 0;
  await synthesizeProfile(profile, { durationS, sampleRateHz: fs, seed }, (b, n) => {
    out.set(b[0]!.subarray(0, n), i);
    i += n;
  });
  return out;
}

describe("GaussianNoise", () => {
  it("seeded N(0,1): mean 0 +- 0.005, variance 1 +- 0.01 over 1e6 samples; same seed, same numbers", () => {
    const a = new Float64Array(1_000_000);
    new GaussianNoise(5).fill(a);
    let s = 0;
    let s2 = 0;
    for (const v of a) {
      s += v;
      s2 += v * v;
    }
    expect(Math.abs(s / a.length)).toBeLessThan(0.005);
    expect(Math.abs(s2 / a.length - 1)).toBeLessThan(0.01);
    const b = new Float64Array(10);
    new GaussianNoise(5).fill(b);
    expect(Array.from(b)).toEqual(Array.from(a.subarray(0, 10)));
    const c = new Float64Array(10);
    new GaussianNoise(5, 1).fill(c);
    expect(Array.from(c)).not.toEqual(Array.from(b));
  });
});

describe("synthesizeProfile", () => {
  it("is deterministic for a seed and differs between seeds", async () => {
    const a = await record(3, 1);
    expect(Array.from(await record(3, 1))).toEqual(Array.from(a));
    expect((await record(4, 1))[100]).not.toBe(a[100]);
  });
  it("gives the profile's RMS (8.4862 g, docs/REFERENCES.md sec. 5) within 2 % and a Gaussian kurtosis 3 +- 0.1", async () => {
    const x = await record(11, 30);
    let s2 = 0;
    let s4 = 0;
    for (const v of x) {
      s2 += v * v;
      s4 += v ** 4;
    }
    const ms = s2 / x.length;
    expect(Math.sqrt(ms) / 8.4862).toBeCloseTo(1, 1);
    expect(Math.abs(Math.sqrt(ms) / 8.4862 - 1)).toBeLessThan(0.02);
    expect(Math.abs(s4 / x.length / (ms * ms) - 3)).toBeLessThan(0.1);
  });
  it("its Welch PSD follows the profile: mean ratio within 4 sigma of 1, every line inside its family-wise chi-square interval, long record", async () => {
    const x = await record(12, 60);
    const r = welchPsd(x, 5120, { resolutionHz: 2.5 });
    const dev: number[] = [];
    for (let k = 0; k < r.psd.length; k++) {
      const req = profileLevel(profile, r.frequencyHz[k]!);
      if (Number.isFinite(req)) dev.push(10 * Math.log10(r.psd[k]! / req));
    }
    // The statistics allow (Bendat & Piersol 2010, ch. 8; Bonferroni over the lines): each line's ratio to the
    // profile is chi2(nu)/nu, so the mean of m lines has sd sqrt(2 * 1.944 / (nu m)) (Hann line correlation,
    // spectralKernel), and all m lie inside the interval at 1e-3 / (2 m) per side but once in a thousand records.
    const m = dev.length;
    const ratio = dev.map((d) => 10 ** (d / 10));
    const mean = ratio.reduce((a, b) => a + b, 0) / m;
    expect(Math.abs(mean - 1)).toBeLessThan(4 * Math.sqrt((2 * 1.944) / (r.dof * m)));
    const hi = upperFactor(r.dof, 1e-3 / (2 * m));
    const lo = lowerFactor(r.dof, 1e-3 / (2 * m));
    for (const q of ratio) {
      expect(q).toBeLessThan(hi);
      expect(q).toBeGreaterThan(lo);
    }
  });
  it("refuses a sample rate at or below twice the top frequency", async () => {
    await expect(
      synthesizeProfile(profile, { durationS: 1, sampleRateHz: 4000, seed: 1 }, () => undefined),
    ).rejects.toThrow(/option sampleRateHz/);
  });
});
