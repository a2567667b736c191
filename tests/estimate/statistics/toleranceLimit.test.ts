import { describe, expect, it } from "vitest";
import { logToleranceLimit, oneSidedToleranceFactor } from "../../../src/estimate/statistics/toleranceLimit.js";
import { python } from "../../helpers.js";

const CASES: [number, number, number][] = [
  [3, 0.95, 0.5],
  [3, 0.95, 0.95],
  [4, 0.9, 0.9],
  [10, 0.9, 0.95],
  [10, 0.95, 0.95],
  [5, 0.99, 0.9],
  [30, 0.95, 0.5],
  [100, 0.99, 0.99],
];

describe("one-sided normal tolerance factor k", () => {
  it("matches scipy.stats.nct.ppf(gamma, n-1, z_p sqrt(n)) / sqrt(n) to 1e-7 relative", () => {
    // scipy.stats.nct (the noncentral t) and norm.ppf: the definition of k (Natrella 1963; NIST/SEMATECH e-Handbook 7.2.6.3; from memory).
    const ref = JSON.parse(
      python(`
import json, numpy as np
from scipy.stats import nct, norm
cases = ${JSON.stringify(CASES)}
print(json.dumps([float(nct.ppf(g, n - 1, norm.ppf(p) * np.sqrt(n)) / np.sqrt(n)) for n, p, g in cases]))`),
    ) as number[];
    CASES.forEach(([n, p, g], i) =>
      expect(Math.abs(oneSidedToleranceFactor(n, p, g) / ref[i]! - 1), `n=${n} p=${p} g=${g}`).toBeLessThan(1e-7),
    );
  });
  it("holds 1e-7 with few spectra and a high confidence, where the noncentral t's step is narrow (n = 3, 4; 99.9-99.9999 %)", () => {
    // scipy.stats.nct.ppf, as above. With 3 spectra at 99.99 % the step of Phi(t s - delta) is 1/400 of the S range
    // wide; the plain 400-piece quadrature gave k off by 4e-4 (p 0.999) and by 20-40 % at 99.9999 %.
    const cases: [number, number, number][] = [
      [3, 0.95, 0.9999],
      [3, 0.99, 0.9999],
      [3, 0.999, 0.9999],
      [3, 0.95, 0.999999],
      [3, 0.999999, 0.999999],
      [4, 0.999, 0.9999],
      [4, 0.999999, 0.999999],
    ];
    const ref = JSON.parse(
      python(`
import json, numpy as np
from scipy.stats import nct, norm
print(json.dumps([float(nct.ppf(g, n - 1, norm.ppf(p) * np.sqrt(n)) / np.sqrt(n)) for n, p, g in ${JSON.stringify(cases)}]))`),
    ) as number[];
    cases.forEach(([n, p, g], i) =>
      expect(Math.abs(oneSidedToleranceFactor(n, p, g) / ref[i]! - 1), `n=${n} p=${p} g=${g}`).toBeLessThan(1e-7),
    );
  });
  it("gives the tabulated one-sided factors for n = 10: 2.355 (p 0.90, 95 %) and 2.911 (p 0.95, 95 %)", () => {
    // Natrella 1963, Table A-7 (one-sided normal tolerance factors); values from memory, reproduced by scipy above.
    expect(oneSidedToleranceFactor(10, 0.9, 0.95)).toBeCloseTo(2.355, 3);
    expect(oneSidedToleranceFactor(10, 0.95, 0.95)).toBeCloseTo(2.911, 3);
  });
  it("covers at least p of the population in a fraction gamma of samples (seeded Monte Carlo, 4000 draws of n = 5)", () => {
    // The defining property: P(mean + k s >= z_p) = gamma for normal samples (rate gamma; binomial sd sqrt(g (1-g) / 4000) = 0.0034 at 0.95).
    let a = 12345;
    const u = () => (a = (Math.imul(a, 1103515245) + 12345) >>> 0) / 4294967296;
    const gauss = () => Math.sqrt(-2 * Math.log(1 - u())) * Math.cos(2 * Math.PI * u());
    const n = 5;
    const k = oneSidedToleranceFactor(n, 0.9, 0.95);
    const zp = 1.2815515655446004;
    let covered = 0;
    const draws = 4000;
    for (let d = 0; d < draws; d++) {
      const x = Array.from({ length: n }, gauss);
      const m = x.reduce((s, v) => s + v, 0) / n;
      const s = Math.sqrt(x.reduce((q, v) => q + (v - m) ** 2, 0) / (n - 1));
      if (m + k * s >= zp) covered++;
    }
    expect(Math.abs(covered / draws - 0.95)).toBeLessThan(4 * Math.sqrt((0.95 * 0.05) / draws));
  });
  it("logToleranceLimit: fewer than 3 spectra give no limit; 3 give 10^(mean + k s) of log10 per line", () => {
    expect(logToleranceLimit([Float64Array.of(1), Float64Array.of(2)], 0.95, 0.5)).toBeUndefined();
    const r = logToleranceLimit([Float64Array.of(1, 1), Float64Array.of(10, 1), Float64Array.of(100, 1)], 0.95, 0.5)!;
    expect(r.meanLog10[0]).toBeCloseTo(1, 12);
    expect(r.sdLog10[0]).toBeCloseTo(1, 12);
    expect(r.limit[0]).toBeCloseTo(10 ** (1 + r.k), 6);
    expect(r.limit[1]).toBeCloseTo(1, 12);
  });
});
