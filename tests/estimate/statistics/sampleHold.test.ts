import { describe, expect, it } from "vitest";
import { SampleHoldAccumulator } from "../../../src/estimate/statistics/sampleHold.js";
import { gaussian, seeded } from "../../helpers.js";

/** A sensor's readings held to the file's rate: each reading repeated `factor` times (or a random 3-5 times with jitter). */
function held(readings: Float64Array, factor: number, jitter = false, seed = 1): Float64Array {
  const rnd = seeded(seed);
  const out: number[] = [];
  for (const v of readings) {
    const k = jitter ? 3 + Math.floor(3 * rnd()) : factor;
    for (let j = 0; j < k; j++) out.push(v);
  }
  return Float64Array.from(out);
}

function hold(x: Float64Array, fs: number, blocks = 1) {
  const a = new SampleHoldAccumulator();
  const step = Math.ceil(x.length / blocks);
  for (let i = 0; i < x.length; i += step) a.push(x.subarray(i, i + step), Math.min(step, x.length - i));
  return a.result(fs);
}

describe("SampleHoldAccumulator: runs of repeated values in one pass", () => {
  it("a 50 Hz sensor held 4x to 200 Hz: held, runs of exactly 4, update rate 50 Hz, in one block or many", () => {
    const x = held(gaussian(3000, 5), 4);
    for (const blocks of [1, 7, 1000]) {
      const h = hold(x, 200, blocks);
      expect(h.held).toBe(true);
      expect(h.modalRun).toBe(4);
      expect(h.meanRun).toBe(4);
      expect(h.updateRateHz).toBe(50);
      expect(h.heldShare).toBe(1);
      expect(h.runs).toBe(3000);
    }
  });
  it("held 2x: update rate half the file's", () => {
    const h = hold(held(gaussian(3000, 6), 2), 256);
    expect(h.held).toBe(true);
    expect(h.updateRateHz).toBe(128);
  });
  it("a jittered hold (3, 4 or 5 copies, mean 4): the update rate from the mean run, 200 / 4 within 3 %", () => {
    const h = hold(held(gaussian(5000, 7), 4, true, 9), 200);
    expect(h.held).toBe(true);
    expect(Math.abs(h.updateRateHz / 50 - 1)).toBeLessThan(0.03);
  });
  it("not held: Gaussian noise; a 16-bit channel of quiet noise (1.5 codes r.m.s., many equal neighbours); a constant", () => {
    expect(hold(gaussian(20000, 8), 200).held).toBe(false);
    const quiet = Float64Array.from(gaussian(20000, 9, 1.5), Math.round);
    const q = hold(quiet, 200);
    expect(q.heldShare).toBeGreaterThan(0.1); // it does repeat
    expect(q.held).toBe(false);
    expect(hold(new Float64Array(20000).fill(9.81), 200).held).toBe(false);
  });
  it("a held extreme counts as one run at the maximum: 4x-held noise whose largest reading occurs once has runsAtMax 1", () => {
    const h = hold(held(gaussian(3000, 10), 4), 200);
    expect(h.runsAtMax).toBe(1);
    expect(h.runsAtMin).toBe(1);
  });
  it("NaN samples break no run and are not counted", () => {
    const x = held(gaussian(500, 11), 4);
    x[10] = NaN;
    const h = hold(x, 200);
    expect(h.held).toBe(true);
    expect(h.updateRateHz).toBeCloseTo(50, 1);
  });
});
