import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { brokenLineLevel, fitDamageProfile, upperEnvelope } from "../../src/synth/profileFit.js";

describe("upperEnvelope (broken line on or above every point, least summed excess)", () => {
  it("points on one straight line: two breakpoints, no excess", () => {
    const x = Float64Array.from({ length: 9 }, (_, i) => i);
    const y = x.map((v) => 2 - 0.3 * v);
    const e = upperEnvelope(x, y, 5);
    expect(e.index).toEqual([0, 8]);
    expect(e.value[0]).toBeCloseTo(2, 12);
    expect(e.value[1]).toBeCloseTo(2 - 2.4, 12);
  });
  it("a tent: three breakpoints through the apex with 3 allowed; with 2, a line above the apex", () => {
    const x = Float64Array.from({ length: 9 }, (_, i) => i);
    const y = x.map((v) => -Math.abs(v - 4));
    const three = upperEnvelope(x, y, 3);
    expect(three.index).toEqual([0, 4, 8]);
    expect(three.value.map((v, i) => v - y[three.index[i]!]!)).toEqual([0, 0, 0]);
    const two = upperEnvelope(x, y, 2);
    expect(two.index).toEqual([0, 8]);
    // Hand-worked: levels step in 0.5 dB (0.1151 in ln) above each end; the line must clear the apex at x = 4 (y = 0): both ends at ln(10)/10 * k >= 4.
    for (let k = 0; k < 9; k++) {
      const v = two.value[0]! + ((two.value[1]! - two.value[0]!) * k) / 8;
      expect(v).toBeGreaterThanOrEqual(y[k]! - 1e-12);
    }
  });
  it("property: any points, any N: the line is on or above every point and uses at most N breakpoints, ends included", () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -5, max: 5, noNaN: true }), { minLength: 2, maxLength: 14 }),
        fc.integer({ min: 2, max: 6 }),
        (ys, n) => {
          const x = Float64Array.from(ys, (_, i) => i * 0.7);
          const y = Float64Array.from(ys);
          const e = upperEnvelope(x, y, n);
          expect(e.index.length).toBeLessThanOrEqual(n);
          expect(e.index[0]).toBe(0);
          expect(e.index[e.index.length - 1]).toBe(ys.length - 1);
          const pts = e.index.map((k, j) => ({ hz: Math.exp(x[k]!), level: Math.exp(e.value[j]!) }));
          for (let k = 0; k < ys.length; k++)
            expect(Math.log(brokenLineLevel(pts, Math.exp(x[k]!)))).toBeGreaterThanOrEqual(y[k]! - 1e-9);
        },
      ),
      { numRuns: 150, seed: 17 },
    );
  });
});

describe("fitDamageProfile", () => {
  it("a local damage model (D = G^(b/2) at each f_n): the fit meets the target exactly where it binds and covers everywhere", () => {
    const fnHz = Float64Array.from({ length: 13 }, (_, i) => 10 * 2 ** (i / 3));
    const b = 8;
    const want = fnHz.map((f) => 0.01 * (f / 10) ** -1);
    const damageOf = (pts: { hz: number; level: number }[]) => fnHz.map((f) => brokenLineLevel(pts, f) ** (b / 2));
    const target = want.map((g) => g ** (b / 2));
    const fit = fitDamageProfile({
      fnHz,
      targetDamage: target,
      startLevels: [want],
      basquinB: b,
      maxBreakpoints: 4,
      damageOf,
    });
    expect(fit.minRatio).toBeGreaterThanOrEqual(1);
    // A power law is one straight segment: only the 4-digit rounding (levels rounded up, at most 1e-3 in level, so (1.001)^(b/2) = 1.004 in damage) is left over.
    expect(fit.maxRatio).toBeLessThan(1.001 ** (b / 2) + 1e-6);
    expect(fit.points.length).toBe(2);
  });
  it("rounding: inner frequencies to 4 digits, ends exact, levels rounded up", () => {
    const fnHz = Float64Array.from([5, 5.612310241546865, 6.299605249474366, 7.0710678118654755]);
    const b = 8;
    const start = Float64Array.from([1, 3, 1, 1]);
    const damageOf = (pts: { hz: number; level: number }[]) => fnHz.map((f) => brokenLineLevel(pts, f) ** (b / 2));
    const fit = fitDamageProfile({
      fnHz,
      targetDamage: start.map((g) => g ** 4),
      startLevels: [start],
      basquinB: b,
      maxBreakpoints: 4,
      damageOf,
    });
    expect(fit.points[0]!.hz).toBe(5);
    expect(fit.points[fit.points.length - 1]!.hz).toBe(7.0710678118654755);
    for (const p of fit.points.slice(1, -1))
      expect(String(p.hz).replace(/[.-]/g, "").replace(/^0+/, "").length).toBeLessThanOrEqual(4);
    expect(fit.minRatio).toBeGreaterThanOrEqual(1);
  });
});
