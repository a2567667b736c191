import { describe, expect, it } from "vitest";
import { readFileSync } from "node:fs";
import {
  binomialAtLeast,
  chiSquareCdf,
  chiSquareIntervalFactors,
  chiSquareQuantile,
  chiSquareSurvival,
  chiSquareUpperQuantile,
  lnGamma,
  noncentralTCdf,
  noncentralTQuantile,
  normalCdf,
  normalQuantile,
  normalSurvival,
  studentTQuantile,
} from "../../../src/estimate/statistics/distributions.js";
import { python, scipyReference } from "../../helpers.js";

describe("chiSquareQuantile", () => {
  // NIST/SEMATECH e-Handbook of Statistical Methods, sec. 1.3.6.7.4, critical values of chi-square
  // (lower table headed by the probability of exceeding; its "0.975" column is p = 0.025).
  const nist: [number, number, number][] = [
    [10, 0.025, 3.247],
    [10, 0.05, 3.94],
    [10, 0.95, 18.307],
    [10, 0.975, 20.483],
    [20, 0.025, 9.591],
    [20, 0.05, 10.851],
    [30, 0.025, 16.791],
    [30, 0.05, 18.493],
    [100, 0.025, 74.222],
    [100, 0.05, 77.929],
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
    for (const p of [0.01, 0.05, 0.5, 0.95, 0.999])
      expect(chiSquareQuantile(p, 2)).toBeCloseTo(-2 * Math.log(1 - p), 12);
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
    [10, 0.9, 0.546, 2.538],
    [10, 0.95, 0.488, 3.08],
    [60, 0.9, 0.759, 1.389],
    [120, 0.9, 0.819, 1.254],
    [240, 0.95, 0.843, 1.206],
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

describe("the normal distribution", () => {
  it("normalQuantile matches scipy.stats.norm.ppf to 1.2e-9 relative (Acklam's bound), both tails and the centre", () => {
    const ps = [1e-12, 1e-7, 1e-4, 0.01, 0.02425, 0.1, 0.3, 0.5, 0.7, 0.9, 0.975, 0.99, 1 - 1e-4, 1 - 1e-7];
    const ref = JSON.parse(
      python(`
import json
from scipy.stats import norm
print(json.dumps([float(norm.ppf(p)) for p in ${JSON.stringify(ps)}]))`),
    ) as number[];
    ps.forEach((p, i) =>
      expect(Math.abs(normalQuantile(p) - ref[i]!), `p ${p}`).toBeLessThanOrEqual(
        1.2e-9 * Math.max(1, Math.abs(ref[i]!)),
      ),
    );
  });
  it("normalSurvival matches scipy.stats.norm.sf to 1e-13 relative out to 1e-40, and normalCdf + normalSurvival = 1", () => {
    const xs = [-8, -3, -1, 0, 0.5, 1, 2, 3, 5, 8.5, 13];
    const ref = JSON.parse(
      python(`
import json
from scipy.stats import norm
print(json.dumps([float(norm.sf(x)) for x in ${JSON.stringify(xs)}]))`),
    ) as number[];
    xs.forEach((x, i) => {
      expect(Math.abs(normalSurvival(x) / ref[i]! - 1), `x ${x}`).toBeLessThan(1e-13);
      expect(normalCdf(x) + normalSurvival(x)).toBeCloseTo(1, 15);
    });
  });
  it("normalCdf matches scipy.stats.norm.cdf to 1e-13 relative in the far lower tail too (audit 2: it was 1 - P, 0 below -8.3)", () => {
    const xs = [-37.5, -20, -10, -8.5, -8, -5, -3, -1, 0, 1, 3, 8];
    const ref = JSON.parse(
      python(`
import json
from scipy.stats import norm
print(json.dumps([float(norm.cdf(x)) for x in ${JSON.stringify(xs)}]))`),
    ) as number[];
    xs.forEach((x, i) => expect(Math.abs(normalCdf(x) / ref[i]! - 1), `x ${x}`).toBeLessThan(1e-13));
  });
  it("noncentral t CDF and normal CDF match scipy (scipy.stats.nct.cdf, norm.cdf)", () => {
    const ref = JSON.parse(
      python(`
import json
from scipy.stats import nct, norm
print(json.dumps([nct.cdf(2, 5, 1), nct.cdf(-1, 2, 0.5), nct.cdf(8, 3, 4), norm.cdf(-2.5), norm.cdf(1.3)]))`),
    ) as number[];
    const got = [
      noncentralTCdf(2, 5, 1),
      noncentralTCdf(-1, 2, 0.5),
      noncentralTCdf(8, 3, 4),
      normalCdf(-2.5),
      normalCdf(1.3),
    ];
    got.forEach((g, i) => expect(Math.abs(g - ref[i]!)).toBeLessThan(1e-9));
  });
  it("noncentralTQuantile inverts noncentralTCdf; with no noncentrality it is Student's t (scipy.stats.t.ppf)", () => {
    const ref = JSON.parse(
      python(`
import json
from scipy.stats import t
print(json.dumps([float(t.ppf(0.95, 9)), float(t.ppf(0.01, 4))]))`),
    ) as number[];
    expect(noncentralTQuantile(0.95, 9, 0)).toBeCloseTo(ref[0]!, 8);
    expect(noncentralTQuantile(0.01, 4, 0)).toBeCloseTo(ref[1]!, 8);
    expect(noncentralTCdf(noncentralTQuantile(0.9, 6, 1.5), 6, 1.5)).toBeCloseTo(0.9, 10);
  });
});

describe("studentTQuantile (Cornish-Fisher, for the Parseval tolerance)", () => {
  // scipy 1.17.1 stats.t.ppf(1 - 5e-5, nu) for nu = 7, 15, 31, 63, rounded to 4 decimals
  const ref: [number, number][] = [
    [7, 7.8846],
    [15, 5.2391],
    [31, 4.461],
    [63, 4.1546],
  ];
  for (const [nu, t] of ref) {
    it(`t(0.99995; ${nu}) within 2 % of scipy's ${t}`, () => {
      expect(Math.abs(studentTQuantile(1 - 5e-5, nu) / t - 1)).toBeLessThan(0.02);
    });
  }
  it("from 7 DOF up it is below scipy's (strict) by at most 0.45 %, and the false-doubt rate it gives stays within 1.03e-4 of the 1e-4 asked (scipy.stats.t.ppf, t.sf)", () => {
    const nus = [7, 8, 9, 10, 12, 15, 20, 31, 63, 127, 500];
    const ref = JSON.parse(
      python(`
import json
from scipy.stats import t
print(json.dumps([float(t.ppf(1 - 5e-5, n)) for n in ${JSON.stringify(nus)}]))`),
    ) as number[];
    const got = nus.map((nu) => studentTQuantile(1 - 5e-5, nu));
    const rate = JSON.parse(
      python(`
import json
from scipy.stats import t
print(json.dumps([float(2 * t.sf(x, n)) for x, n in zip(${JSON.stringify(got)}, ${JSON.stringify(nus)})]))`),
    ) as number[];
    nus.forEach((nu, i) => {
      expect(got[i]! / ref[i]! - 1, `nu ${nu}`).toBeLessThanOrEqual(1e-9);
      expect(got[i]! / ref[i]! - 1, `nu ${nu}`).toBeGreaterThan(-0.0045);
      expect(rate[i]!, `nu ${nu}`).toBeLessThan(1.03e-4);
    });
  });
});

describe("binomialAtLeast", () => {
  it("matches scipy.stats.binom.sf (scipy 1.17.1) to 1e-12", () => {
    // binom.sf(r - 1, n, p) = P(X >= r)
    expect(binomialAtLeast(3, 40, 0.1)).toBeCloseTo(0.7771918756605969, 12);
    expect(binomialAtLeast(1, 20, 0.2)).toBeCloseTo(0.9884707849539315, 12);
    expect(binomialAtLeast(10, 100, 0.05)).toBeCloseTo(0.02818829416341614, 12);
    expect(binomialAtLeast(0, 5, 0.3)).toBe(1);
    expect(binomialAtLeast(6, 5, 0.3)).toBe(0);
  });
});
