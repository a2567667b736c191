import FFT from "fft.js";
import { describe, expect, it } from "vitest";
import { SegmentPower } from "../../../src/estimate/spectral/segmentPower.js";
import { seeded } from "../../helpers.js";

/** |X[k]|^2, k = 0..n/2, of y by fft.js (a general-purpose FFT library), the reference here. */
function referencePower(y: Float64Array): Float64Array {
  const n = y.length;
  const out = new Float64Array(2 * n);
  new FFT(n).realTransform(out, y);
  const p = new Float64Array(n / 2 + 1);
  for (let k = 0; k <= n / 2; k++) p[k] = out[2 * k]! ** 2 + out[2 * k + 1]! ** 2;
  return p;
}

describe("SegmentPower: windowed power spectrum of a real segment", () => {
  for (const n of [2, 4, 8, 16, 32, 64, 128, 256, 512, 1024, 2048, 4096, 8192, 16384]) {
    it(`N = ${n}: matches fft.js on (x - offset - slope i) w within 1e-13 of the largest bin, and adds into acc`, () => {
      const u = seeded(n);
      const x = Float64Array.from({ length: n }, () => 5 + u() - 0.5);
      const w = Float64Array.from({ length: n }, () => u());
      for (const [offset, slope] of [
        [0, 0],
        [5, 0],
        [5.2, 1e-3],
      ] as const) {
        const y = x.map((v, i) => (v - offset - slope * i) * w[i]!);
        const ref = referencePower(y);
        const acc = new Float64Array(n / 2 + 1).fill(1);
        const ms = new SegmentPower(n).add(x, w, offset, slope, acc);
        const top = Math.max(...ref);
        for (let k = 0; k <= n / 2; k++)
          expect(Math.abs(acc[k]! - 1 - ref[k]!)).toBeLessThanOrEqual(1e-13 * top + 1e-15);
        const sumSq = y.reduce((s, v) => s + v * v, 0);
        expect(Math.abs(ms - sumSq)).toBeLessThanOrEqual(1e-13 * sumSq);
      }
    });
  }
  it("a naive DFT agrees at N = 8 (definition of the transform, e^{-2 pi i k n / N})", () => {
    const x = Float64Array.from([0.3, -1.2, 2.5, 0.7, -0.4, 1.1, 0, -2]);
    const w = new Float64Array(8).fill(1);
    const acc = new Float64Array(5);
    new SegmentPower(8).add(x, w, 0, 0, acc);
    for (let k = 0; k <= 4; k++) {
      let re = 0;
      let im = 0;
      for (let i = 0; i < 8; i++) {
        re += x[i]! * Math.cos((-2 * Math.PI * k * i) / 8);
        im += x[i]! * Math.sin((-2 * Math.PI * k * i) / 8);
      }
      expect(acc[k]).toBeCloseTo(re * re + im * im, 12);
    }
  });
  it("refuses a size that is not a power of two", () => {
    expect(() => new SegmentPower(12)).toThrow(RangeError);
  });
});
