import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import { chiSquareCdf, chiSquareIntervalFactors, chiSquareQuantile, chiSquareSurvival, chiSquareUpperQuantile, lnGamma } from "../../../src/estimate/statistics/chiSquare.js";
import { scipyReference } from "../../helpers.js";

describe("chiSquareQuantile", () => {
  // NIST/SEMATECH e-Handbook of Statistical Methods, sec. 1.3.6.7.4, critical values of chi-square
  // (lower table headed by the probability of exceeding; its "0.975" column is p = 0.025).
  const nist: [number, number, number][] = [
    [10, 0.025, 3.247], [10, 0.05, 3.94], [10, 0.95, 18.307], [10, 0.975, 20.483],
    [20, 0.025, 9.591], [20, 0.05, 10.851], [30, 0.025, 16.791], [30, 0.05, 18.493], [100, 0.025, 74.222], [100, 0.05, 77.929],
  ];
  for (const [dof, p, q] of nist) {
    it(`chi2(${p}; ${dof}) = ${q} (NIST/SEMATECH table, 3 decimals)`, () => {
      expect(chiSquareQuantile(p, dof)).toBeCloseTo(q, 2);
    });
  }
  it("matches scipy.stats.chi2.ppf to 1e-10 relative, integer and fractional dof", () => {
    // scipy 1.17.1, tests/fixtures/scipy-reference.json
    for (const r of scipyReference.chi2) {
      const q = chiSquareQuantile(r.p, r.dof);
      expect(Math.abs(q - r.quantile) / r.quantile, `dof ${r.dof} p ${r.p}`).toBeLessThan(1e-10);
    }
  });
  it("nu = 2: closed form -2 ln(1 - p) (exponential distribution)", () => {
    for (const p of [0.01, 0.05, 0.5, 0.95, 0.999]) expect(chiSquareQuantile(p, 2)).toBeCloseTo(-2 * Math.log(1 - p), 12);
  });
  it("rejects p outside (0, 1) and dof <= 0", () => {
    expect(() => chiSquareQuantile(0, 10)).toThrow(RangeError);
    expect(() => chiSquareQuantile(0.5, 0)).toThrow(RangeError);
  });
  it("lnGamma(n) = ln((n-1)!)", () => {
    expect(lnGamma(1)).toBeCloseTo(0, 13);
    expect(lnGamma(5)).toBeCloseTo(Math.log(24), 13);
    expect(lnGamma(0.5)).toBeCloseTo(0.5 * Math.log(Math.PI), 13);
  });
});

describe("chiSquareIntervalFactors", () => {
  // docs/REFERENCES.md sec. 2, interval factors computed from the confirmed quantile table.
  const rows: [number, number, number, number][] = [
    [10, 0.9, 0.546, 2.538], [10, 0.95, 0.488, 3.08], [60, 0.9, 0.759, 1.389], [120, 0.9, 0.819, 1.254], [240, 0.95, 0.843, 1.206],
  ];
  for (const [dof, c, lo, hi] of rows) {
    it(`nu ${dof}, ${c * 100} %: x${lo} .. x${hi}`, () => {
      const f = chiSquareIntervalFactors(dof, c);
      expect(f.lower).toBeCloseTo(lo, 3);
      expect(f.upper).toBeCloseTo(hi, 2);
    });
  }
});

describe("chi-square far tails (the range the decision rule asks for)", () => {
  // scipy 1.17.1 chi2.ppf / chi2.isf, tests/fixtures/scipy-chi2-tails.json (scripts/make_scipy_fixtures.py)
  const tails: { dof: number; q: number; lower: number; upper: number }[] = JSON.parse(
    readFileSync(new URL("../../fixtures/scipy-chi2-tails.json", import.meta.url), "utf8"),
  ).tails;
  it("chiSquareQuantile(q, dof) and chiSquareUpperQuantile(q, dof) match scipy to 1e-11 relative for q from 1e-9, dof 0.3 to 1e5", () => {
    let worst = 0;
    for (const t of tails) {
      const lo = chiSquareQuantile(t.q, t.dof);
      const hi = chiSquareUpperQuantile(t.q, t.dof);
      worst = Math.max(worst, Math.abs(lo / t.lower - 1), Math.abs(hi / t.upper - 1));
      expect(Math.abs(lo / t.lower - 1), `lower dof ${t.dof} q ${t.q}`).toBeLessThan(1e-11);
      expect(Math.abs(hi / t.upper - 1), `upper dof ${t.dof} q ${t.q}`).toBeLessThan(1e-11);
    }
    expect(worst).toBeLessThan(1e-11);
  });
  it("chiSquareSurvival and chiSquareCdf invert the quantiles in their own tails", () => {
    for (const t of tails) {
      expect(Math.abs(chiSquareSurvival(t.upper, t.dof) / t.q - 1)).toBeLessThan(1e-9);
      expect(Math.abs(chiSquareCdf(t.lower, t.dof) / t.q - 1)).toBeLessThan(1e-9);
    }
  });
});
