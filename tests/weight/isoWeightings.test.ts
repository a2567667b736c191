import { describe, expect, it } from "vitest";
import {
  analogSections,
  THIRD_OCTAVE_CENTRES_HZ,
  WEIGHTING_NAMES,
  weightingMagnitude,
  weightingPowerGains,
} from "../../src/weight/isoWeightings.js";

/** Equal to 4 significant figures. */
const sig4 = (x: number) => Number(x.toPrecision(4));

describe("weightingMagnitude (closed form of the ISO 2631-1 Annex A analog prototypes)", () => {
  it("at 100 rad/s gives the ISO 8041 reference values to 4 significant figures (docs/REFERENCES.md sec. 8, confirmed)", () => {
    const f = 100 / (2 * Math.PI);
    // ISO 8041-derived reference data as reproduced in docs/REFERENCES.md sec. 8.
    expect(sig4(weightingMagnitude("Wd", f))).toBe(0.1261);
    expect(sig4(weightingMagnitude("Wc", f))).toBe(0.5145);
    expect(sig4(weightingMagnitude("We", f))).toBe(0.06287);
    expect(sig4(weightingMagnitude("Wj", f))).toBe(1.019);
    expect(sig4(weightingMagnitude("Wb", f))).toBe(0.8126);
    // Wk: computed in docs/REFERENCES.md sec. 8 (the reference value itself was not seen; 0.7718 from memory).
    expect(sig4(weightingMagnitude("Wk", f))).toBe(0.7718);
  });

  // docs/REFERENCES.md sec. 8, "Weighting factors at one-third-octave centres (computed from the filters)",
  // which reproduce ISO 2631-1 Table 3 at the nominal centres (Table 3 itself from memory).
  const table: Record<string, Record<number, number>> = {
    Wk: {
      0.5: 0.4182,
      1: 0.4825,
      2: 0.5314,
      4: 0.9672,
      8: 1.0364,
      10: 0.9884,
      16: 0.7687,
      31.5: 0.4048,
      63: 0.1861,
      80: 0.1324,
    },
    Wd: {
      0.5: 0.8528,
      1: 1.011,
      2: 0.8902,
      4: 0.5119,
      6.3: 0.3231,
      8: 0.2531,
      10: 0.2017,
      16: 0.1254,
      31.5: 0.0632,
      63: 0.0295,
      80: 0.0211,
    },
    Wc: { 0.5: 0.8431, 1: 0.991, 2: 1.0117, 4: 1.0238, 8: 0.8909, 16: 0.5118, 31.5: 0.256, 63: 0.1185, 80: 0.0844 },
    We: { 0.5: 0.8624, 1: 0.8798, 2: 0.5115, 4: 0.2531, 8: 0.1254, 16: 0.0625, 31.5: 0.0316, 63: 0.0148, 80: 0.0105 },
  };
  for (const [name, row] of Object.entries(table)) {
    it(`${name} at the nominal one-third-octave centres matches docs/REFERENCES.md sec. 8 to its printed 4 decimals`, () => {
      for (const [f, v] of Object.entries(row))
        expect(Math.abs(weightingMagnitude(name as "Wk", Number(f)) - v), `${name} ${f} Hz`).toBeLessThanOrEqual(
          0.5e-4 + 1e-12,
        );
    });
  }
  it("Wk at 6.3 Hz is 1.054 to 4 significant figures (docs/REFERENCES.md prints 1.0540; the filter gives 1.05438, ISO Table 3 1054 x 1/1000 from memory)", () => {
    expect(sig4(weightingMagnitude("Wk", 6.3))).toBe(1.054);
    expect(weightingMagnitude("Wk", 6.3)).toBeCloseTo(1.05438, 5);
  });
  it("Wd at 10 Hz is the filter's 0.2017, not the 0.212 printed in some copies of Table 3 (docs/REFERENCES.md, disagreements item 2)", () => {
    expect(sig4(weightingMagnitude("Wd", 10))).toBe(0.2017);
  });
  it("every weighting is 0 at DC and falls off above 100 Hz (band limits 0.4-100 Hz, Annex A)", () => {
    for (const w of WEIGHTING_NAMES) {
      expect(weightingMagnitude(w, 0)).toBe(0);
      expect(weightingMagnitude(w, 1000)).toBeLessThan(0.01 * weightingMagnitude(w, 10));
    }
  });
  it("analogSections: Wd has no step, Wj no transition, Wk both (Annex A table)", () => {
    expect(analogSections("Wd").sections.map((s) => s.role)).toEqual(["high-pass", "low-pass", "transition"]);
    expect(analogSections("Wj").sections.map((s) => s.role)).toEqual(["high-pass", "low-pass", "upward step"]);
    expect(analogSections("Wk").sections.map((s) => s.role)).toEqual([
      "high-pass",
      "low-pass",
      "transition",
      "upward step",
    ]);
  });
  it("weightingPowerGains is |W|^2 line by line", () => {
    const g = weightingPowerGains("Wk", Float64Array.from(THIRD_OCTAVE_CENTRES_HZ));
    THIRD_OCTAVE_CENTRES_HZ.forEach((f, i) => expect(g[i]).toBeCloseTo(weightingMagnitude("Wk", f) ** 2, 14));
  });
});
