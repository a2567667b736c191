import { describe, expect, it } from "vitest";
import {
  detrendBiasedLines,
  lineVarianceInflation,
  spectralKernel,
} from "../../../src/estimate/spectral/spectralKernel.js";
import { welchPsd } from "../../../src/estimate/spectral/psdEstimate.js";
import { spectralWindow } from "../../../src/estimate/spectral/windows.js";
import { gaussian } from "../../helpers.js";

describe("spectralKernel", () => {
  const hann = spectralKernel("hann", spectralWindow("hann", 1024), "mean");
  it("Hann: neighbouring lines correlate by 4/9 and 1/36 (|sum w^2 e^(-2 pi i d n/N)|^2 / (sum w^2)^2, computed in closed form), inflation 1 + 2(4/9 + 1/36)", () => {
    expect(hann.lineCorrelation[1]).toBeCloseTo(4 / 9, 12);
    expect(hann.lineCorrelation[2]).toBeCloseTo(1 / 36, 12);
    expect(hann.lineCorrelation[3]).toBeCloseTo(0, 12);
    expect(lineVarianceInflation(hann)).toBeCloseTo(1 + 2 * (4 / 9 + 1 / 36), 12);
  });
  it("the kernel's weights sum to 1 and hold all but 1 % on each side within the half-width (Hann: 2 bins)", () => {
    let s = 0;
    for (const w of hann.weights) s += w;
    expect(s).toBeCloseTo(1, 12);
    expect(hann.halfWidthBins).toBe(2);
    expect(hann.tailShare).toBeLessThan(0.01);
  });
  it("mean removal biases Hann line 1 by -1/6 (|W(1)|^2 / (N sum w^2) = (N/4)^2 / (N 3N/8)) and no other; the bias matches white-noise Welch", () => {
    expect(hann.detrendBias[1]).toBeCloseTo(-1 / 6, 12);
    expect(Math.abs(hann.detrendBias[2]!)).toBeLessThan(1e-12);
    expect(detrendBiasedLines(hann)).toBe(2);
    // Seeded white noise, 4000 averages: line 1 reads 1/6 low (within 3 sigma of sqrt(2/nu)).
    const p = welchPsd(gaussian(1024 * 4000, 3), 1024, { segmentLength: 1024 });
    const level = 2 / 1024; // docs/REFERENCES.md sec. 1: unit-variance white noise has one-sided density 2/fs
    expect(Math.abs(p.psd[1]! / level - (1 - 1 / 6))).toBeLessThan(3 * Math.sqrt(2 / p.dof));
  });
  it("flat top with mean removal biases DC and lines 1 and 2 by more than 1 % (line 1 by about -25 %)", () => {
    const k = spectralKernel("flattop", spectralWindow("flattop", 1024), "mean");
    expect(detrendBiasedLines(k)).toBe(3);
    expect(k.detrendBias[1]).toBeLessThan(-0.2);
  });
});
