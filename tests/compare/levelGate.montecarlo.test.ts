import { describe, expect, it } from "vitest";
import { LEVEL_GATE, levelGate, levelSwing } from "../../src/compare/levelGate.js";
import { StretchMeanSquares } from "../../src/estimate/statistics/stretchMeanSquares.js";
import { shapedRecord } from "../shapedRecords.js";
import { lower999, SCALE, upper999 } from "./mcRecords.js";

/**
 * The level gate (compare/levelGate.ts) by seeded Monte Carlo on records made here (tests/shapedRecords.ts,
 * not psdgate's synth), beside its analytic rate: on stationary Gaussian records it doubts at most 1 % of
 * runs (Bonferroni over the blocks, normal approximation). n = 200 records a case in CI: the 99.9 % point of
 * Binomial(200, 0.01) is 7, so a true rate of 5 % (10 expected) is caught more often than not.
 * PSDGATE_MC_SCALE=10 runs 2000; DEVELOPERS.md quotes that run.
 */
const FS = 256;
const n = 200 * SCALE;

function stretchMs(x: Float64Array, seconds = 1): Float64Array {
  const s = new StretchMeanSquares(Math.round(seconds * FS));
  s.push(x, x.length);
  return s.result();
}

const broad = (f: number) => (f >= 10 && f <= 100 ? 0.01 : 0);
const narrow = (f: number) => (f >= 20 && f <= 24 ? 0.01 : 0);

describe("level gate: false doubts on stationary records, at most 1 %", () => {
  for (const [name, level, length] of [
    ["broadband, 16 s", broad, 1 << 12],
    ["broadband, 128 s", broad, 1 << 15],
    ["narrowband (4 Hz wide), 64 s", narrow, 1 << 14],
    ["narrowband, 128 s", narrow, 1 << 15],
  ] as const) {
    it(
      `${name}: doubted at most 1 % (analytic bound 1 %)`,
      () => {
        let doubted = 0;
        for (let r = 0; r < n; r++) {
          const s = levelSwing(stretchMs(shapedRecord(level, FS, length, 90_000 + r)), 1);
          expect(s.tested).toBe(true);
          if (s.excessDb > 0) doubted++;
        }
        console.log(`${name}: ${doubted} of ${n} stationary records doubted`);
        expect(doubted).toBeLessThanOrEqual(upper999(n, LEVEL_GATE.falseDoubtRate));
      },
      60_000 * SCALE,
    );
  }
});

describe("level gate: a run that swings outside the tolerance is caught", () => {
  it(
    "+2 dB for the first half, -2.9 dB for the second (+-1 dB tolerance), 64 s: doubted in at least 99 % of runs",
    () => {
      let doubted = 0;
      for (let r = 0; r < n; r++) {
        const x = shapedRecord(broad, FS, 1 << 14, 95_000 + r);
        for (let i = 0; i < x.length; i++) x[i] = x[i]! * Math.sqrt(10 ** ((i < x.length / 2 ? 2 : -2.9) / 10));
        if (levelSwing(stretchMs(x), 1).excessDb > 0) doubted++;
      }
      console.log(`step +2/-2.9 dB: ${doubted} of ${n} doubted`);
      expect(doubted).toBeGreaterThanOrEqual(lower999(n, 0.99));
    },
    60_000 * SCALE,
  );
  it(
    "a swing inside the tolerance (+-0.5 dB halves, +-1 dB allowed) is not doubted more than 1 %",
    () => {
      let doubted = 0;
      for (let r = 0; r < n; r++) {
        const x = shapedRecord(broad, FS, 1 << 14, 97_000 + r);
        for (let i = 0; i < x.length; i++) x[i] = x[i]! * Math.sqrt(10 ** ((i < x.length / 2 ? 0.5 : -0.5) / 10));
        if (levelSwing(stretchMs(x), 1).excessDb > 0) doubted++;
      }
      expect(doubted).toBeLessThanOrEqual(upper999(n, LEVEL_GATE.falseDoubtRate));
    },
    60_000 * SCALE,
  );
  it("drift holding 64 % of the mean square dominates: DRIFT_DOMINATES; 10 % does not", () => {
    expect(levelGate(undefined, 1, 1, 0.64, 20).map((f) => f.code)).toEqual(["DRIFT_DOMINATES"]);
    expect(levelGate(undefined, 1, 1, 0.1, 20)).toEqual([]);
  });
  it("too short a run (fewer than 16 stretches) is not tested", () => {
    expect(levelSwing(new Float64Array(15).fill(1), 1).tested).toBe(false);
  });
});
