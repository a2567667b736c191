import { describe, expect, it } from "vitest";
import { narrowBandDamage } from "../../../src/estimate/response/fatigueDamage.js";
import { gaussian } from "../../helpers.js";
import { exactSdof, FN, FS, Q, rainflowSum, timeDomain } from "./sdofExact.js";

describe("TimeResponseAccumulator: damage and peaks from the record itself", () => {
  it("with inserted shocks: the damage and the largest response match the exact simulation, and the damage is far above the PSD's narrow-band figure", () => {
    const n = 1 << 17;
    const base = gaussian(n, 77);
    // Six half-sines of 10 sigma, 20 ms, spread through the record (a pothole-like load on a Gaussian ride).
    for (const [t, p] of [
      [10, 10],
      [30.5, -10],
      [51, 10],
      [70, 10],
      [95.3, -10],
      [120, 10],
    ] as const) {
      const i0 = Math.round(t * FS);
      for (let i = 0; i < 20; i++) base[i0 + i]! += p * Math.sin((Math.PI * (i + 0.5)) / 20);
    }
    const b = 8;
    const td = timeDomain(base, b);
    const ex = exactSdof(base, FN, Q);
    const exact = rainflowSum(ex.relDisp, b);
    expect(Math.abs(td.rainflowSum[0]! / exact - 1)).toBeLessThan(0.03);
    let exMax = 0;
    for (let i = 0; i < n; i++) exMax = Math.max(exMax, Math.abs(ex.accel[i]!));
    const tdMax = Math.max(td.maxAccel[0]!, -td.minAccel[0]!);
    expect(Math.abs(tdMax / exMax - 1)).toBeLessThan(0.02);
    // The PSD route sees only the record's variance: the narrow-band damage at the record's own sigma_z.
    let ss = 0;
    for (let i = 0; i < n; i++) ss += ex.relDisp[i]! ** 2;
    const nb = narrowBandDamage(Math.sqrt(ss / n), FN, n / FS, { basquinB: b, snConstant: 1, stressPerUnit: 1 });
    // Measured (seed 77): damage time/exact 0.990, largest response 0.999, time/narrow-band 2588.
    expect(td.rainflowSum[0]! / nb).toBeGreaterThan(3);
  });

  it("gravity on the axis starts no transient and changes neither the damage nor the largest |response - mean|", () => {
    const base = gaussian(1 << 15, 9);
    const b = 6;
    const plain = timeDomain(base, b);
    const lifted = timeDomain(
      base.map((v) => v + 9.80665),
      b,
    );
    expect(lifted.rainflowSum[0]! / plain.rainflowSum[0]!).toBeCloseTo(1, 6);
    // Means: the record's own (about 0 and 9.80665); the peaks about them agree.
    let m = 0;
    for (const v of base) m += v;
    m /= base.length;
    const p1 = Math.max(plain.maxAccel[0]! - m, m - plain.minAccel[0]!);
    const p2 = Math.max(lifted.maxAccel[0]! - (m + 9.80665), m + 9.80665 - lifted.minAccel[0]!);
    expect(p2 / p1).toBeCloseTo(1, 6);
  });
});
