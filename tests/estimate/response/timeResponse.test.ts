import { describe, expect, it } from "vitest";
import { narrowBandDamage } from "../../../src/estimate/response/fatigueDamage.js";
import { gaussian, python } from "../../helpers.js";
import { exactSdof, FN, FS, Q, rainflowSum, timeDomain } from "./sdofExact.js";
import { sdofFiltered } from "./sdofSimulation.js";
import { SINC2_EQUALISER, TimeResponseAccumulator } from "../../../src/estimate/response/timeResponse.js";

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
    // Measured (seed 77): damage time/exact 1.0001, largest response 1.0001, time/narrow-band 2615 (before the input was
    // equalised, SINC2_EQUALISER: 0.990, 0.999, 2588).
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

describe("TimeResponseAccumulator on a record sampled at 200 Hz (natural frequencies up to fs/4)", () => {
  // A ramp-invariant filter is exact for an input straight between samples; a recorded (anti-aliased) input is
  // band-limited, and the straight-line reading loses sinc^2(f/fs) of its amplitude at f (the triangle's spectrum:
  // 3.3 % at fs/10, 19 % at fs/4), so the response there, and the damage as its b-th power, came out low. The
  // reference is the exact transfer function applied on an FFT of the same record (sdofSimulation.ts, the test's own,
  // fft.js as the transform): the band-limited truth.
  const rate = 200;
  const n = 1 << 16; // 328 s
  const base = gaussian(n, 4242);
  for (const fn of [20, 40, 50]) {
    it(`fn ${fn} Hz (fs/${rate / fn}), Q 10: rainflow damage (b 8) within 2 % of the exact simulation`, () => {
      const b = 8;
      const acc = new TimeResponseAccumulator(Float64Array.from([fn]), 10, rate, b);
      for (let i = 0; i < n; i += 5000) acc.push(base.subarray(i, Math.min(n, i + 5000)), Math.min(5000, n - i));
      const td = acc.finish();
      const ex = sdofFiltered(base, rate, fn, 10, 2 * n);
      const exact = rainflowSum(ex.relDisp, b);
      // Measured (seed 4242): 1.002 (fs/10), 1.008 (fs/5), 1.007 (fs/4); before the input was equalised 0.769, 0.357, 0.204.
      expect(Math.abs(td.rainflowSum[0]! / exact - 1)).toBeLessThan(0.02);
    });
  }
});

describe("SINC2_EQUALISER", () => {
  it("is numpy.linalg.lstsq's fit of E(x) sinc^2(x) = 1 on (0, 0.25] with unit gain at DC, and leaves E sinc^2 within 0.2 % of 1 below fs/5", () => {
    // numpy.linalg.lstsq, run here.
    const ref = JSON.parse(
      python(`
import numpy as np, json
x = np.linspace(0.25/400, 0.25, 400); s2 = np.sinc(x)**2
A = np.column_stack([(2*np.cos(2*np.pi*k*x) - 2)*s2 for k in (1, 2, 3)])
h = np.linalg.lstsq(A, 1 - s2, rcond=None)[0]
print(json.dumps([h[2], h[1], h[0], 1 - 2*h.sum()]))
`),
    ) as number[];
    for (let k = 0; k < 4; k++) expect(SINC2_EQUALISER[k]! / ref[k]!).toBeCloseTo(1, 9);
    const [h3, h2, h1, h0] = SINC2_EQUALISER;
    expect(h0 + 2 * (h1 + h2 + h3)).toBeCloseTo(1, 14);
    for (let x = 0.001; x <= 0.2; x += 0.001) {
      const e =
        h0 + 2 * (h1 * Math.cos(2 * Math.PI * x) + h2 * Math.cos(4 * Math.PI * x) + h3 * Math.cos(6 * Math.PI * x));
      const s = Math.sin(Math.PI * x) / (Math.PI * x);
      expect(Math.abs(e * s * s - 1)).toBeLessThan(0.002);
    }
  });
});
