import { describe, expect, it } from "vitest";
import { welchPsd } from "../../../src/estimate/spectral/psdEstimate.js";
import { WelchWeightedMeanSquare } from "../../../src/estimate/spectral/welchTimeWeights.js";
import { spectralWindow } from "../../../src/estimate/spectral/windows.js";
import { gaussian } from "../../helpers.js";

describe("WelchWeightedMeanSquare", () => {
  it("equals sum(P) df of welchPsd (detrend none) exactly on a non-stationary record, for several overlaps and lengths (Parseval per segment)", () => {
    for (const [n, overlap, len] of [
      [256, 0.5, 5000],
      [256, 0.75, 4097],
      [128, 0.6, 3333],
      [64, 0, 1000],
    ] as const) {
      const x = gaussian(len, 11);
      for (let i = 0; i < len; i++) x[i]! *= 1 + (3 * i) / len; // the level grows along the record
      const p = welchPsd(x, 100, { segmentLength: n, overlap, detrend: "none" });
      let area = 0;
      for (let k = 0; k < p.psd.length; k++) area += p.psd[k]!;
      const acc = new WelchWeightedMeanSquare(spectralWindow("hann", n), p.settings.hop);
      acc.push(x.subarray(0, 700), 700);
      acc.push(x.subarray(700), len - 700);
      const r = acc.finish();
      expect(r.segments).toBe(p.averages);
      expect(r.meanSquare / (area * p.lineSpacingHz) - 1).toBeCloseTo(0, 12);
    }
  });
  it("with a periodic Hann window at 75 % overlap every interior sample has the same weight (COLA of w^2, common practice)", () => {
    const acc = new WelchWeightedMeanSquare(spectralWindow("hann", 64), 16);
    const w = (acc as unknown as { periodicWeight: Float64Array }).periodicWeight;
    for (const v of w) expect(v).toBeCloseTo(w[0]!, 12);
  });
});
