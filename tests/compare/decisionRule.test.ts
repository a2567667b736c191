import { describe, expect, it } from "vitest";
import {
  DECISION_RULE,
  dofForPower,
  powerAt,
  ruleLevels,
  upperFactor,
  lowerFactor,
} from "../../src/compare/decisionRule.js";
import { lineTestLevels } from "../../src/compare/lineTests.js";
import { chiSquareUpperQuantile } from "../../src/estimate/statistics/distributions.js";

describe("ruleLevels", () => {
  const pct = (x: number) => `${Number((100 * x).toPrecision(3))} %`;
  const R = DECISION_RULE;
  it(`splits the ${pct(R.falseFailRate)} family-wise rate: lines ${pct(R.lines)} (single lines ${pct(R.lines * (1 - R.stretchShare))} over 2 m tests, stretches ${pct(R.lines * R.stretchShare)}), RMS ${pct(R.rms)} over two directions; outer limits take their ${pct(R.outer)} from the lines`, () => {
    const l = ruleLevels(789, false);
    const t = lineTestLevels(789, 0, false, 1, 0, 1);
    expect(t.widths).toEqual([4, 16, 64]);
    expect(t.upLevel * 2 * 789).toBeCloseTo(R.lines * (1 - R.stretchShare), 15);
    expect(t.loLevel * 2 * 789).toBeCloseTo(R.lines * (1 - R.stretchShare), 15);
    // With an allowance no stretches are tested: the single lines get the whole share.
    expect(lineTestLevels(789, 3, false, 1, 0, 1).upLevel * 2 * 789).toBeCloseTo(R.lines, 15);
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
  const p = {
    lines: 789,
    allowance: 0,
    inflation: 1.944,
    rmsDofRatio: 789 / 1.944,
    outerLimits: false,
    upperSharedBy: 1,
  };
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
  it("largest of k: a shortfall on every channel is shown only when all k are shown below (P1^k for independent channels, the least any correlation gives: Gaussian correlation inequality, Royen 2014), and the RMS reads its mean high", () => {
    // Before: the lower power of one channel, 0.4217 at 208.5 DOF for k = 1 and k = 3 alike, so the DOF a pass needs
    // (470 for the Monte Carlo profile) was one channel's; records at it failed 89 of 100 times, not 95.
    const one = powerAt(300, p);
    const three = powerAt(300, { ...p, upperSharedBy: 3 });
    // A single look (need 1 of n): 1 - (1 - q)^looks per channel chance q; with k channels q^k.
    const looks = Math.floor(Math.ceil(0.05 * 789) / 3);
    const q1 = 1 - (1 - one.linesBelow) ** (1 / looks);
    expect(three.linesBelow).toBeCloseTo(1 - (1 - q1 ** 3) ** looks, 10);
    expect(powerAt(4, { ...p, upperSharedBy: 3 }).rmsBelow).toBeLessThan(powerAt(4, p).rmsBelow);
    expect(dofForPower({ ...p, upperSharedBy: 3 })).toBeGreaterThan(dofForPower(p));
  });
  it("fewer lines need more DOF (fewer looks at a departure), an allowance more again", () => {
    expect(dofForPower({ ...p, lines: 100, rmsDofRatio: 100 / 1.944 })).toBeGreaterThan(dofForPower(p));
    expect(dofForPower({ ...p, allowance: 20 })).toBeGreaterThan(dofForPower(p));
  });
});
