import { describe, expect, it } from "vitest";
import { binomialAtLeast, DECISION_RULE, dofForPower, powerAt, ruleLevels, upperFactor, lowerFactor } from "../../src/compare/decisionRule.js";
import { chiSquareUpperQuantile } from "../../src/estimate/statistics/chiSquare.js";

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

describe("ruleLevels", () => {
  it("splits the 5 % family-wise rate: lines 4 % over 2 m tests, RMS 1 % over two directions; outer limits take their 0.5 % from the lines", () => {
    const l = ruleLevels(789, false);
    expect(l.upper.lineTest * 2 * 789).toBeCloseTo(DECISION_RULE.lines, 15);
    expect(l.upper.rmsTest * 2).toBeCloseTo(DECISION_RULE.rms, 15);
    const o = ruleLevels(789, true);
    expect((o.upper.lineTest + o.upper.outerTest!) * 2 * 789).toBeCloseTo(DECISION_RULE.lines, 15);
    expect(DECISION_RULE.lines + DECISION_RULE.rms).toBeCloseTo(DECISION_RULE.falseFailRate, 15);
  });
  it("a record of n judged spectra splits the 5 % over them: every level divided by n (Bonferroni over the family)", () => {
    const one = ruleLevels(100, false);
    const three = ruleLevels(100, false, 3);
    expect(three.upper.lineTest).toBeCloseTo(one.upper.lineTest / 3, 18);
    expect(three.lower.lineTest).toBeCloseTo(one.lower.lineTest / 3, 18);
    expect(three.upper.rmsTest).toBeCloseTo(one.upper.rmsTest / 3, 18);
  });
  it("factors are the chi-square quantiles over nu (Bendat & Piersol 2010, ch. 8)", () => {
    expect(upperFactor(120, 2.5e-5)).toBeCloseTo(chiSquareUpperQuantile(2.5e-5, 120) / 120, 14);
    expect(lowerFactor(120, 0.05)).toBeCloseTo(95.7046 / 120, 5); // docs/REFERENCES.md sec. 2: chi2(0.05; 120) = 95.7046
  });
});

describe("powerAt and dofForPower", () => {
  const p = { lines: 789, allowance: 0, inflation: 1.944, rmsDofRatio: 789 / 1.944, outerLimits: false, upperSharedBy: 1 };
  it("power grows with DOF, and dofForPower is where the least of the four reaches 95 %", () => {
    let last = 0;
    for (const nu of [20, 60, 120, 200, 400]) {
      const w = powerAt(nu, p).least;
      expect(w).toBeGreaterThanOrEqual(last);
      last = w;
    }
    const need = dofForPower(p);
    expect(powerAt(need, p).least).toBeGreaterThanOrEqual(DECISION_RULE.power);
    expect(powerAt(need * 0.98, p).least).toBeLessThan(DECISION_RULE.power);
  });
  it("fewer lines need more DOF (fewer looks at a departure), an allowance more again", () => {
    expect(dofForPower({ ...p, lines: 100, rmsDofRatio: 100 / 1.944 })).toBeGreaterThan(dofForPower(p));
    expect(dofForPower({ ...p, allowance: 20 })).toBeGreaterThan(dofForPower(p));
  });
});
