import { describe, expect, it } from "vitest";
import { welchDof } from "../../../src/estimate/spectral/welchDof.js";
import { spectralWindow } from "../../../src/estimate/spectral/windows.js";

describe("welchDof", () => {
  const hann = spectralWindow("hann", 1024);
  for (const k of [1, 2, 5, 10, 30, 100]) {
    it(`Hann, 50 % overlap, K=${k}: 36K^2/(19K-1) (Percival & Walden 1993, eq. 292b; only lag 1 contributes)`, () => {
      const expected = k === 1 ? 2 : (36 * k * k) / (19 * k - 1);
      expect(Math.abs(welchDof(hann, 512, k) - expected)).toBeLessThan(1e-9);
    });
  }
  it("rectangular without overlap: 2K (independent segments)", () => {
    expect(welchDof(spectralWindow("rectangular", 256), 256, 17)).toBeCloseTo(34, 12);
  });
  // Large-K DOF per segment, docs/REFERENCES.md sec. 2 (computed from eq. 292b, N = 1024).
  const perSegment: [string, number, number][] = [
    ["rectangular", 0.5, 1.333],
    ["hann", 0.75, 1.039],
    ["hamming", 0.5, 1.803],
    ["blackman-harris", 0.75, 1.403],
    ["flattop", 0.5, 1.999],
  ];
  for (const [w, ov, ratio] of perSegment) {
    it(`${w} at ${ov * 100} % overlap: nu/K -> ${ratio}`, () => {
      const win = spectralWindow(w as "hann", 1024);
      const k = 100000;
      expect(welchDof(win, 1024 - Math.round(ov * 1024), k) / k).toBeCloseTo(ratio, 3);
    });
  }
});
