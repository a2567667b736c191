import { describe, expect, it } from "vitest";
import { StretchMeanSquares } from "../../../src/estimate/statistics/stretchMeanSquares.js";
import {
  inversionDistribution,
  reverseArrangementCount,
  reverseArrangementsTest,
  runsDistribution,
  runTest,
  stationarityFinding,
} from "../../../src/estimate/statistics/stationarityTests.js";
import { gaussian, seeded } from "../../helpers.js";

describe("reverse arrangements test", () => {
  it("acceptance regions reproduce Bendat & Piersol Table A.6 at alpha = 0.05 (docs/REFERENCES.md sec. 13)", () => {
    const table: [number, number, number][] = [
      [10, 11, 33],
      [20, 64, 125],
      [30, 162, 272],
      [50, 495, 729],
      [100, 2145, 2804],
    ];
    for (const [n, lo, hi] of table) {
      const t = reverseArrangementsTest(
        Float64Array.from({ length: n }, (_, i) => i),
        0.05,
      );
      expect([t.acceptAbove, t.acceptAtMost], `n = ${n}`).toEqual([lo, hi]);
      expect(t.method).toBe("exact");
    }
  });
  it("inversionDistribution sums to 1 with mean n(n-1)/4 and variance n(2n+5)(n-1)/72 (Bendat & Piersol 2010, sec. 4.5.2)", () => {
    for (const n of [5, 20, 60]) {
      const p = inversionDistribution(n);
      let s = 0,
        m = 0,
        v = 0;
      p.forEach((q, k) => {
        s += q;
        m += k * q;
      });
      p.forEach((q, k) => (v += (k - m) ** 2 * q));
      expect(s).toBeCloseTo(1, 12);
      expect(m).toBeCloseTo((n * (n - 1)) / 4, 9);
      expect(v).toBeCloseTo((n * (2 * n + 5) * (n - 1)) / 72, 6);
    }
    // n = 4: 1, 3, 5, 6, 5, 3, 1 permutations of 24 (Mahonian numbers, OEIS A008302).
    expect(Array.from(inversionDistribution(4), (q) => Math.round(q * 24))).toEqual([1, 3, 5, 6, 5, 3, 1]);
  });
  it("reverseArrangementCount equals the direct pair count", () => {
    const u = seeded(3);
    for (const n of [0, 1, 2, 7, 64, 101]) {
      const x = Array.from({ length: n }, () => Math.floor(u() * 10)); // ties too
      let a = 0;
      for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) if (x[i]! > x[j]!) a++;
      expect(reverseArrangementCount(x)).toBe(a);
    }
  });
  it("a level that does not move: values equal to 1e-9 are ties, each half a reverse arrangement (mid-ranks, common practice)", () => {
    const u = seeded(5);
    // A calibrator's sine: 1 s stretches whose mean squares differ only in their last bits.
    const still = Float64Array.from({ length: 80 }, () => 0.5 * (1 + 4e-16 * (u() - 0.5)));
    const t = reverseArrangementsTest(still);
    expect(t.statistic).toBe((80 * 79) / 4);
    expect(t.stationary).toBe(true);
    // Ties among differing values: the direct count with ties as halves.
    const x = Array.from({ length: 64 }, () => Math.floor(u() * 6));
    let a = 0;
    for (let i = 0; i < 64; i++) for (let j = i + 1; j < 64; j++) a += x[i]! > x[j]! ? 1 : x[i] === x[j] ? 0.5 : 0;
    expect(reverseArrangementsTest(x).statistic).toBe(a);
    // Values that differ keep the plain count, and a trend is still found.
    const trend = Float64Array.from({ length: 40 }, (_, i) => 1 + 0.01 * i + 0.001 * u());
    expect(reverseArrangementsTest(trend).statistic).toBe(reverseArrangementCount(trend));
    expect(reverseArrangementsTest(trend).stationary).toBe(false);
  });
  it("a large n uses the normal approximation with the same mean and spread", () => {
    const t = reverseArrangementsTest(
      Float64Array.from({ length: 400 }, (_, i) => Math.sin(i)),
      0.05,
    );
    expect(t.method).toBe("normal");
    expect(t.expected).toBe((400 * 399) / 4);
  });
});

describe("run test", () => {
  it("n = 20 (10 above, 10 below the median): 95 % region 6 < r <= 15 (Bendat & Piersol Table A.5, docs/REFERENCES.md sec. 13, from memory)", () => {
    const t = runTest(Float64Array.from({ length: 20 }, (_, i) => i));
    expect([t.acceptAbove, t.acceptAtMost]).toEqual([6, 15]);
    expect(t.statistic).toBe(2);
    expect(t.stationary).toBe(false);
  });
  it("runsDistribution sums to 1 and has mean 2 n1 n2 / n + 1 (Wald & Wolfowitz 1940)", () => {
    const p = runsDistribution(12, 9);
    let s = 0,
      m = 0;
    p.forEach((q, k) => {
      s += q;
      m += (k + 2) * q;
    });
    expect(s).toBeCloseTo(1, 12);
    expect(m).toBeCloseTo((2 * 12 * 9) / 21 + 1, 10);
  });
});

/** N stationary stretches of white Gaussian noise made here (not by psdgate's synth), or with a +3 dB step halfway. */
function stretchValues(seed: number, stretches: number, perStretch: number, stepDb = 0): Float64Array {
  const x = gaussian(stretches * perStretch, seed);
  const g = 10 ** (stepDb / 20);
  for (let i = (stretches * perStretch) / 2; i < x.length; i++) x[i]! *= g;
  const acc = new StretchMeanSquares(perStretch);
  acc.push(x.subarray(0, 1000), 1000); // two blocks
  acc.push(x.subarray(1000), x.length - 1000);
  return acc.result();
}

describe("stationarity on stretch mean squares, seeded Monte Carlo on records made by the test", () => {
  it("false-alarm rate on stationary noise (20 stretches) is near the exact nominal 4.68 % (3000 records, within 3 sigma)", () => {
    const runs = 3000;
    let alarms = 0;
    let nominal = 0;
    for (let r = 0; r < runs; r++) {
      const t = reverseArrangementsTest(stretchValues(1000 + r, 20, 64));
      nominal = t.falseAlarmRate;
      if (!t.stationary) alarms++;
    }
    expect(nominal).toBeCloseTo(2 * 0.023384, 5); // 2 P(A <= 64), exact (docs/REFERENCES.md sec. 13)
    const sd = Math.sqrt((nominal * (1 - nominal)) / runs);
    expect(Math.abs(alarms / runs - nominal)).toBeLessThan(3 * sd);
  });
  it("false-alarm rate with the normal approximation (300 stretches) is near 5 % (1000 records, within 3 sigma)", () => {
    const runs = 1000;
    let alarms = 0;
    for (let r = 0; r < runs; r++) if (!reverseArrangementsTest(stretchValues(5000 + r, 300, 16)).stationary) alarms++;
    expect(Math.abs(alarms / runs - 0.05)).toBeLessThan(3 * Math.sqrt((0.05 * 0.95) / runs));
  });
  it("a +3 dB step halfway through is detected in at least 99 % of records (20 stretches of 256 samples, 300 records)", () => {
    let found = 0;
    for (let r = 0; r < 300; r++) if (!reverseArrangementsTest(stretchValues(9000 + r, 20, 256, 3)).stationary) found++;
    expect(found / 300).toBeGreaterThanOrEqual(0.99);
  });
  it("stationarityFinding pools past 100 values, decides by reverse arrangements and names the stretches that depart most", () => {
    const v = stretchValues(42, 250, 64, 3);
    const f = stationarityFinding(v, 1, 0);
    expect(f.tested).toBe(true);
    expect(f.pooled).toBe(3);
    expect(f.reverseArrangements!.n).toBe(83);
    expect(f.stationary).toBe(false);
    expect(f.departing.length).toBe(3);
    expect(Math.abs(f.departing[0]!.levelDb)).toBeGreaterThan(1);
    expect(stationarityFinding(v.subarray(0, 9), 1).tested).toBe(false);
  });
  it("a stretch with no signal (a stuck sensor: mean square 0) departs by -Infinity dB, said as no signal, not -2989.6 dB", async () => {
    const { findingText } = await import("../../../src/report/findingTexts.js");
    const v = Float64Array.from({ length: 20 }, (_, i) => (i === 5 || i === 6 ? 0 : 1 + 0.01 * (i % 3)));
    const f = stationarityFinding(v, 1, 0);
    expect(f.departing[0]!.levelDb).toBe(-Infinity);
    expect(f.departing[1]!.levelDb).toBe(-Infinity);
    const text = findingText({
      code: "NOT_STATIONARY",
      values: {
        statistic: 61,
        acceptAbove: 64,
        acceptAtMost: 125,
        values: 20,
        testPercent: 5,
        stretches: 20,
        stretchS: 1,
        departingFromS: 5,
        departingToS: 6,
        departingDb: -Infinity,
      },
    });
    expect(text).toContain("most departing 5-6 s with no signal at all (mean square 0)");
  });
  it("StretchMeanSquares takes the mean square about each stretch's mean (a 9.81 offset changes nothing)", () => {
    const x = gaussian(1000, 8);
    const a = new StretchMeanSquares(100);
    const b = new StretchMeanSquares(100);
    a.push(x, 1000);
    b.push(
      x.map((v) => v + 9.80665),
      1000,
    );
    const ra = a.result();
    const rb = b.result();
    expect(ra.length).toBe(10);
    ra.forEach((v, i) => expect(rb[i]).toBeCloseTo(v, 10));
  });
  it("StretchMeanSquares leaves non-finite samples out of their stretch, even a leading one; an all-NaN stretch is NaN", () => {
    const a = new StretchMeanSquares(4);
    a.push(Float64Array.from([NaN, 1, 3, 2, NaN, NaN, NaN, NaN, 5, 5, 5, Infinity]), 12);
    const r = a.result();
    expect(r[0]).toBeCloseTo(2 / 3, 12); // 1, 3, 2 about their mean 2
    expect(r[1]).toBeNaN();
    expect(r[2]).toBe(0);
  });
});
