import { describe, expect, it } from "vitest";
import { RainflowCounter } from "../../../src/estimate/response/rainflow.js";

/** Cycles summed by range: { range: count }. */
function histogram(c: RainflowCounter): Record<number, number> {
  const h: Record<number, number> = {};
  for (const { range, count } of c.cycles()) h[range] = (h[range] ?? 0) + count;
  return h;
}

describe("RainflowCounter (ASTM E1049-85, sec. 5.4.4)", () => {
  it("the standard's example -2, 1, -3, 5, -1, 3, -4, 4, -2 counts 3: 0.5, 4: 1.5, 6: 0.5, 8: 1.0, 9: 0.5 (docs/REFERENCES.md sec. 14, from memory)", () => {
    const c = new RainflowCounter(1, true);
    c.push([-2, 1, -3, 5, -1, 3, -4, 4, -2]);
    c.finish();
    expect(histogram(c)).toEqual({ 3: 0.5, 4: 1.5, 6: 0.5, 8: 1, 9: 0.5 });
  });
  it("finds the turning points itself: the example sampled finely (straight lines between the points, repeated values) counts the same", () => {
    const pts = [-2, 1, -3, 5, -1, 3, -4, 4, -2];
    const samples: number[] = [];
    for (let i = 0; i + 1 < pts.length; i++)
      for (let j = 0; j < 8; j++) samples.push(pts[i]! + ((pts[i + 1]! - pts[i]!) * j) / 8);
    samples.push(-2, -2, -2);
    const c = new RainflowCounter(1, true);
    // Pushed in blocks of 5 to cross block edges.
    for (let i = 0; i < samples.length; i += 5) c.push(Float64Array.from(samples.slice(i, i + 5)));
    c.finish();
    expect(histogram(c)).toEqual({ 3: 0.5, 4: 1.5, 6: 0.5, 8: 1, 9: 0.5 });
  });
  it("damage sum is sum of count x (range / 2)^b: the example at b = 3", () => {
    const c = new RainflowCounter(3);
    c.push([-2, 1, -3, 5, -1, 3, -4, 4, -2]);
    const d = c.finish();
    const expected = 0.5 * 1.5 ** 3 + 1.5 * 2 ** 3 + 0.5 * 3 ** 3 + 1 * 4 ** 3 + 0.5 * 4.5 ** 3;
    expect(d).toBeCloseTo(expected, 12);
  });
  it("a sine of amplitude A over k periods counts k cycles' worth of range 2A (ASTM counts equal successive ranges as half cycles: two halves are one cycle)", () => {
    const c = new RainflowCounter(2, true);
    const x = new Float64Array(10 * 64 + 1);
    for (let i = 0; i < x.length; i++) x[i] = 3 * Math.sin((2 * Math.PI * i) / 64 + 0.1);
    c.push(x);
    c.finish();
    let cycles = 0;
    for (const { range, count } of c.cycles()) if (Math.abs(range - 6) < 1e-2) cycles += count;
    expect(cycles).toBeGreaterThanOrEqual(9.5);
    expect(cycles).toBeLessThanOrEqual(10);
  });
});
