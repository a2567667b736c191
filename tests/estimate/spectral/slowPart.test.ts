import { describe, expect, it } from "vitest";
import { SlowPart } from "../../../src/estimate/spectral/slowPart.js";
import { spectralWindow } from "../../../src/estimate/spectral/windows.js";
import { gaussian } from "../../helpers.js";

/** Window-weighted and plain mean squares of d_i = x_i - offset - slope (i - mid), computed directly. */
const gapOf = (x: Float64Array, w: Float64Array, offset: number, slope: number) => {
  const n = x.length;
  const mid = (n - 1) / 2;
  let sw = 0;
  let ws = 0;
  let ps = 0;
  for (let i = 0; i < n; i++) {
    const d = x[i]! - offset - slope * (i - mid);
    sw += w[i]! * w[i]!;
    ws += w[i]! * w[i]! * d * d;
    ps += d * d;
  }
  return { gap: ws / sw - ps / n, plain: ps / n };
};

describe("SlowPart", () => {
  it("a segment that is a polynomial of degree <= 6: the gap it explains is its whole windowed-minus-plain gap", () => {
    const n = 1024;
    const w = spectralWindow("hann", n);
    const s = new SlowPart(n, w);
    const x = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const u = (2 * i) / (n - 1) - 1;
      x[i] = 3 + 2 * u - 5 * u ** 2 + u ** 3 + 4 * u ** 6;
    }
    let mean = 0;
    for (const v of x) mean += v;
    mean /= n;
    const direct = gapOf(x, w, mean, 0);
    // The rest is zero to rounding, so the leverage term adds nothing.
    expect(s.gap(x, mean, 0, direct.plain)).toBeCloseTo(direct.gap, 10);
    expect(Math.abs(direct.gap)).toBeGreaterThan(0.1);
  });
  it("white noise: the leverage term is small and positive, and a rectangular window explains no gap", () => {
    const n = 4096;
    const s = new SlowPart(n, spectralWindow("hann", n));
    expect(s.leverageGap).toBeGreaterThan(0);
    expect(s.leverageGap).toBeLessThan(7 / n);
    const r = new SlowPart(n, spectralWindow("rectangular", n));
    const x = gaussian(n, 5);
    expect(Math.abs(r.gap(x, 0, 0, gapOf(x, new Float64Array(n).fill(1), 0, 0).plain))).toBeLessThan(1e-12);
  });
  it("segments shorter than 64 are left alone", () => {
    const s = new SlowPart(32, spectralWindow("hann", 32));
    expect(s.enabled).toBe(false);
    expect(s.gap(gaussian(32, 1), 0, 0, 1)).toBe(0);
  });
});
