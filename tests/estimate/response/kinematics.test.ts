import { describe, expect, it } from "vitest";
import { lineSpectrum, powerLawSpectrum } from "../../../src/estimate/response/inputSpectrum.js";
import { displacementPsd, spectrumMotion, velocityPsd } from "../../../src/estimate/response/kinematics.js";
import { STANDARD_GRAVITY_M_PER_S2 as G } from "../../../src/units.js";

describe("spectrumMotion (docs/REFERENCES.md sec. 6)", () => {
  it("flat 0.04 g^2/Hz on 20-2000 Hz: 8.8994 g, 69.45 mm/s, 0.3207 mm RMS (closed forms, computed), 1e-6 against the closed forms", () => {
    const m = spectrumMotion(powerLawSpectrum([{ f1: 20, f2: 2000, g1: 0.04, exponent: 0 }]), G);
    expect(m.accelerationRms).toBeCloseTo(8.8994, 4);
    expect(m.velocityRms * 1000).toBeCloseTo(69.45, 2);
    expect(m.displacementRms * 1000).toBeCloseTo(0.3207, 4);
    const v2 = ((0.04 * G * G) / (4 * Math.PI ** 2)) * (1 / 20 - 1 / 2000);
    const d2 = ((0.04 * G * G) / (16 * Math.PI ** 4)) * (1 / (3 * 20 ** 3) - 1 / (3 * 2000 ** 3));
    expect(Math.abs(m.velocityRms ** 2 / v2 - 1)).toBeLessThan(1e-6);
    expect(Math.abs(m.displacementRms ** 2 / d2 - 1)).toBeLessThan(1e-6);
    expect(m.displacementPeakToPeak).toBeCloseTo(6 * m.displacementRms, 15);
  });
  it("profile A (20/80/350/2000 Hz, NAVMAT P-9492): 52.56 mm/s and 0.1943 mm RMS, 6-sigma stroke 1.166 mm (docs/REFERENCES.md sec. 6, 1e-3)", () => {
    const pts = [
      [20, 0.01],
      [80, 0.04],
      [350, 0.04],
      [2000, 0.007],
    ] as const;
    const segs = pts.slice(1).map(([f2, g2], i) => ({
      f1: pts[i]![0],
      f2,
      g1: pts[i]![1],
      exponent: Math.log(g2 / pts[i]![1]) / Math.log(f2 / pts[i]![0]),
    }));
    const m = spectrumMotion(powerLawSpectrum(segs), G);
    expect(Math.abs((m.velocityRms * 1000) / 52.56 - 1)).toBeLessThan(1e-3);
    expect(Math.abs((m.displacementRms * 1000) / 0.1943 - 1)).toBeLessThan(1e-3);
    expect(Math.abs((m.displacementPeakToPeak * 1000) / 1.166 - 1)).toBeLessThan(1e-3);
    expect(Math.abs(m.accelerationRms / 6.0582 - 1)).toBeLessThan(1e-4);
  });
  it("a range that starts at 0 Hz is refused (the displacement would be infinite)", () => {
    expect(() => spectrumMotion(powerLawSpectrum([{ f1: 0, f2: 10, g1: 1, exponent: 0 }]), 1)).toThrow(/above 0 Hz/);
  });
  it("velocityPsd and displacementPsd divide by (2 pi f)^2 and ^4, NaN at 0 Hz; a line spectrum of them integrates like spectrumMotion", () => {
    const f = Float64Array.from({ length: 513 }, (_, k) => k * 2);
    const p = f.map((x) => (x >= 20 ? 0.01 : 0));
    const v = velocityPsd(f, p, G);
    const d = displacementPsd(f, p, G);
    expect(v[0]).toBeNaN();
    expect(v[10]).toBeCloseTo((0.01 * G * G) / (2 * Math.PI * 20) ** 2, 12);
    expect(d[10]).toBeCloseTo((0.01 * G * G) / (2 * Math.PI * 20) ** 4, 15);
    const m = spectrumMotion(lineSpectrum(f, p, 20), G);
    let sv = 0;
    for (let k = 10; k < v.length; k++) sv += v[k]! * 2;
    // Lines held over their own band versus sampled at their centre: within 1 %.
    expect(Math.abs(m.velocityRms / Math.sqrt(sv) - 1)).toBeLessThan(0.01);
  });
});
