import { describe, expect, it } from "vitest";
import { VibrationDoseAccumulator, vibrationDose } from "../../src/weight/vibrationDose.js";
import { gaussian } from "../helpers.js";

function sine(rms: number, f: number, fs: number, seconds: number): Float64Array {
  const n = Math.round(seconds * fs);
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) x[i] = rms * Math.SQRT2 * Math.sin((2 * Math.PI * f * i) / fs);
  return x;
}

describe("vibrationDose", () => {
  it("VDV of 60 s of a 4 Hz sine of r.m.s. 1 is (3/8)^(1/4) sqrt(2) 60^(1/4) = 3.0801 m/s^1.75 (docs/REFERENCES.md sec. 8, computed)", () => {
    const d = vibrationDose(sine(1, 4, 1000, 60), 1000);
    expect(d.vdv).toBeCloseTo(3.0801, 4);
    expect(d.vdv).toBeCloseTo((3 / 8) ** 0.25 * Math.SQRT2 * 60 ** 0.25, 6);
    expect(d.rms).toBeCloseTo(1, 9);
    expect(d.crestFactor).toBeCloseTo(Math.SQRT2, 3); // the sampled peak misses the crest by at most 1 - cos(pi f / fs)
    expect(d.mtvv).toBeCloseTo(1, 6); // a whole number of periods in every 1 s window
  });
  it("VDV of seeded Gaussian noise of r.m.s. sigma is 3^(1/4) sigma T^(1/4) within 0.5 % (E[a^4] = 3 sigma^4; docs/REFERENCES.md sec. 8)", () => {
    // 1e6 samples: the fourth moment's standard error is sqrt(96/1e6)/3 = 0.33 %, a quarter of that in VDV.
    const fs = 1000;
    const x = gaussian(1_000_000, 77, 0.8);
    const d = vibrationDose(x, fs);
    const T = x.length / fs;
    expect(d.vdv / (3 ** 0.25 * 0.8 * T ** 0.25) - 1).toBeLessThan(0.005);
    expect(Math.abs(d.rms / 0.8 - 1)).toBeLessThan(0.003);
  });
  it("MTVV: a 2 s burst at r.m.s. 2 in 10 s at r.m.s. 0.5 gives MTVV 2 at the burst, the running r.m.s. being linear over 1 s", () => {
    const fs = 500;
    const x = sine(0.5, 5, fs, 12);
    for (let i = 4 * fs; i < 6 * fs; i++) x[i] = x[i]! * 4;
    const d = vibrationDose(x, fs);
    expect(d.mtvv).toBeCloseTo(2, 6);
    expect(d.mtvvAtS).toBeGreaterThan(5);
    expect(d.mtvvAtS).toBeLessThanOrEqual(6);
    expect(d.mtvv / d.rms).toBeGreaterThan(1.5); // the ratio that calls for the additional methods
  });
  it("blocks of any size give the same answer as one block, and stretch values follow the stretches", () => {
    const fs = 200;
    const x = gaussian(10 * fs + 37, 5);
    const whole = vibrationDose(x, fs);
    const acc = new VibrationDoseAccumulator(fs);
    for (let i = 0; i < x.length; i += 333)
      acc.push(x.subarray(i, Math.min(x.length, i + 333)), Math.min(333, x.length - i));
    const parts = acc.finish(fs);
    expect(parts.vdv).toBeCloseTo(whole.vdv, 12);
    expect(parts.mtvv).toBeCloseTo(whole.mtvv, 12);
    expect(parts.stretchMeanSquares.length).toBe(10);
    expect(parts.stretchRms.length).toBe(10);
    let s = 0;
    for (let i = 0; i < fs; i++) s += x[i]! * x[i]!;
    expect(parts.stretchRms[0]).toBeCloseTo(Math.sqrt(s / fs), 12);
  });
  it("a record shorter than the integration time has no MTVV (NaN), but a_w and VDV", () => {
    const d = vibrationDose(sine(1, 10, 1000, 0.5), 1000);
    expect(d.mtvv).toBeNaN();
    expect(d.rms).toBeCloseTo(1, 6);
  });
});
