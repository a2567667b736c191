import { describe, expect, it } from "vitest";
import { lineSpectrum, powerLawSpectrum } from "../../../src/estimate/response/inputSpectrum.js";
import {
  absoluteTransmissibilitySquared,
  milesRelativeDisplacementRms,
  milesRms,
  sdofResponse,
} from "../../../src/estimate/response/sdofResponse.js";
import { STANDARD_GRAVITY_M_PER_S2 } from "../../../src/units.js";

const flat = (g0: number, f1: number, f2: number) => powerLawSpectrum([{ f1, f2, g1: g0, exponent: 0 }]);

describe("milesRms", () => {
  it("f_n 100 Hz, Q 10, 0.04 g^2/Hz gives 7.927 g (docs/REFERENCES.md sec. 4, computed from Miles 1954)", () => {
    expect(milesRms(100, 10, 0.04)).toBeCloseTo(7.927, 3);
  });
  it("other pairs: 200/20/0.04 -> 15.853 g, 500/10/0.01 -> 8.862 g (docs/REFERENCES.md sec. 4)", () => {
    expect(milesRms(200, 20, 0.04)).toBeCloseTo(15.853, 3);
    expect(milesRms(500, 10, 0.01)).toBeCloseTo(8.862, 3);
  });
  it("relative displacement 0.1969 mm for the same case (NASA GSFC FEMCI form, x 9.80665; docs/REFERENCES.md sec. 4)", () => {
    expect(milesRelativeDisplacementRms(100, 10, 0.04) * STANDARD_GRAVITY_M_PER_S2 * 1000).toBeCloseTo(0.1969, 4);
  });
});

describe("sdofResponse: exact integral of |T|^2 G", () => {
  it("|T(r = 1)|^2 = 1 + Q^2 and |T(r = sqrt 2)| = 1 for any Q (the standard SDOF result)", () => {
    expect(absoluteTransmissibilitySquared(100, 100, 10)).toBeCloseTo(101, 10);
    expect(absoluteTransmissibilitySquared(100 * Math.SQRT2, 100, 3)).toBeCloseTo(1, 12);
  });
  it("white input over a wide band (1 Hz .. 100 f_n): exact / Miles -> sqrt(1 + 1/Q^2) within 0.2 % (docs/REFERENCES.md sec. 4)", () => {
    for (const [fn, q, g0] of [
      [100, 10, 0.04],
      [200, 20, 0.04],
      [500, 10, 0.01],
      [50, 5, 0.1],
    ] as const) {
      const r = sdofResponse(flat(g0, 1, 100 * fn), fn, q);
      const ratio = Math.sqrt(r.acceleration.m0) / milesRms(fn, q, g0);
      expect(Math.abs(ratio / Math.sqrt(1 + 1 / q ** 2) - 1)).toBeLessThan(0.002);
    }
  });
  it("white input, f_n 100, Q 10, 0.04 g^2/Hz: 7.966 g exact (closed form (pi/2) f_n G0 (Q + 1/Q), docs/REFERENCES.md sec. 4) within 0.2 %", () => {
    const r = sdofResponse(flat(0.04, 1, 10000), 100, 10);
    expect(Math.abs(Math.sqrt(r.acceleration.m0) / 7.966 - 1)).toBeLessThan(0.002);
  });
  it("the integrator on 0..1e6 Hz matches the infinite-band closed form to 1e-4 (the residual is the tail beyond 1e6 Hz)", () => {
    const r = sdofResponse(flat(0.04, 1e-9, 1e6), 100, 10);
    const exact = (Math.PI / 2) * 100 * 0.04 * (10 + 0.1);
    // Tail of |T|^2 ~ 1/(Q r)^2 beyond 1e6 Hz: G0 f_n^2 / (Q^2 f) = 0.04 * 1e4 / (100 * 1e6) = 4e-6.
    expect(Math.abs(r.acceleration.m0 / exact - 1)).toBeLessThan(1e-4);
    // Relative displacement, exact for white noise: Q G0 / (32 pi^3 f_n^3) (docs/REFERENCES.md sec. 4)
    expect(Math.abs(r.relativeDisplacement.m0 / ((10 * 0.04) / (32 * Math.PI ** 3 * 100 ** 3)) - 1)).toBeLessThan(1e-6);
  });
  it("band-limited 0.04 g^2/Hz on 20..2000 Hz, f_n 100, Q 10: 7.914 g (numerical quadrature, docs/REFERENCES.md sec. 4) within 0.5 %, slightly below Miles", () => {
    const r = sdofResponse(flat(0.04, 20, 2000), 100, 10);
    expect(Math.abs(Math.sqrt(r.acceleration.m0) / 7.914 - 1)).toBeLessThan(0.005);
    expect(Math.sqrt(r.acceleration.m0)).toBeLessThan(milesRms(100, 10, 0.04));
  });
  it("the same band as a measured PSD of 1 Hz lines: 7.914 g within 0.5 %", () => {
    const f = Float64Array.from({ length: 2049 }, (_, k) => k);
    const p = f.map((x) => (x >= 20 && x <= 2000 ? 0.04 : 0));
    const r = sdofResponse(lineSpectrum(f, p), 100, 10);
    expect(Math.abs(Math.sqrt(r.acceleration.m0) / 7.914 - 1)).toBeLessThan(0.005);
  });
  it("against an independent dense trapezoid (1e6 points) on a sloped profile: 1e-6", () => {
    // Invented profile D of docs/REFERENCES.md sec. 5: 10 Hz 0.001, 40 Hz 0.02, 300 Hz 0.02, 1500 Hz 0.002.
    const pts = [
      [10, 0.001],
      [40, 0.02],
      [300, 0.02],
      [1500, 0.002],
    ] as const;
    const segs = pts.slice(1).map(([f2, g2], i) => {
      const [f1, g1] = pts[i]!;
      return { f1, f2, g1, exponent: Math.log(g2 / g1) / Math.log(f2 / f1) };
    });
    const s = powerLawSpectrum(segs);
    const r = sdofResponse(s, 250, 25);
    let t = 0;
    const m = 1_000_000;
    const h = (1500 - 10) / m;
    for (let i = 0; i <= m; i++) {
      const f = 10 + i * h;
      t += (i === 0 || i === m ? 0.5 : 1) * absoluteTransmissibilitySquared(f, 250, 25) * s.level(f);
    }
    expect(Math.abs(r.acceleration.m0 / (t * h) - 1)).toBeLessThan(1e-6);
  });
});
