import { describe, expect, it } from "vitest";
import { lower999, upper999 } from "./binomialBounds.js";

describe("binomial count bounds of the Monte Carlo checks", () => {
  it("upper999 / lower999 match scipy.stats.binom (ppf(0.999); largest c with cdf(c - 1) <= 0.001), n up to 5000", () => {
    // scipy 1.17.1, scipy.stats.binom, computed for this test.
    const cases: [number, number, number, number][] = [
      [200, 0.05, 21, 2],
      [40, 0.05, 7, 0],
      [800, 0.04, 50, 16],
      [5000, 0.3, 1601, 1400],
      [96, 1e-6, 0, 0],
      [400, 0.95, 392, 365],
    ];
    for (const [n, p, up, lo] of cases) {
      expect(upper999(n, p), `${n} ${p}`).toBe(up);
      expect(lower999(n, p), `${n} ${p}`).toBe(lo);
    }
  });
});
