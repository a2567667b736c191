import { describe, expect, it } from "vitest";
import { lineSpectrum, powerLawSpectrum, spectralMoments } from "../../../src/estimate/response/inputSpectrum.js";
import { parseProfile, profileLevel } from "../../../src/compare/testProfile.js";

describe("inputSpectrum", () => {
  it("spectralMoments integrates polynomials of degree up to 15 exactly on each sub-interval (8-point Gauss-Legendre, Abramowitz & Stegun Table 25.4)", () => {
    const s = powerLawSpectrum([{ f1: 1, f2: 3, g1: 1, exponent: 0 }]);
    for (const p of [0, 1, 5, 11]) {
      const m = spectralMoments(s, (f) => f ** p, 2, 1);
      expect(Math.abs(m.m0 / ((3 ** (p + 1) - 1) / (p + 1)) - 1)).toBeLessThan(1e-13);
      expect(Math.abs(m.m4 / ((3 ** (p + 5) - 1) / (p + 5)) - 1)).toBeLessThan(1e-13);
    }
  });
  it("spectralMoments of a flat 0..1000 Hz spectrum: m2/m0 = 1000^2/3 (Hz moments)", () => {
    const m = spectralMoments(powerLawSpectrum([{ f1: 0, f2: 1000, g1: 1, exponent: 0 }]), () => 1, 0, 1);
    expect(m.m0).toBeCloseTo(1000, 9);
    expect(Math.abs(m.m2 / m.m0 / (1e6 / 3) - 1)).toBeLessThan(1e-12);
  });
  it("powerLawSpectrum takes a profile's segments as they are: level equals profileLevel and the integral its RMS^2", () => {
    const p = parseProfile(
      "title: D\nunits: g2/Hz\npoints: [{hz: 10, level: 0.001}, {hz: 40, level: 0.02}, {hz: 300, level: 0.02}, {hz: 1500, level: 0.002}]\ntolerance: {bands: [{fromHz: 10, toHz: 1500, upperDb: 3, lowerDb: 3}]}\n",
      "d.yaml",
    );
    const s = powerLawSpectrum(p.segments);
    for (const f of [10, 17.3, 40, 299.9, 1500]) expect(s.level(f)).toBeCloseTo(profileLevel(p, f), 14);
    // Invented profile D of docs/REFERENCES.md sec. 5: 3.5236 g.
    expect(Math.sqrt(spectralMoments(s, () => 1, 100, 1).m0)).toBeCloseTo(3.5236, 4);
  });
  it("lineSpectrum holds each line over its own band: the integral is sum(P) df over the lines kept, DC over [0, df/2]", () => {
    const f = Float64Array.from({ length: 9 }, (_, k) => 2 * k);
    const p = Float64Array.from([5, 1, 2, 3, 4, 5, 6, 7, 8]);
    const all = lineSpectrum(f, p);
    expect(all.fminHz).toBe(0);
    expect(spectralMoments(all, () => 1, 5, 0.1).m0).toBeCloseTo(5 * 1 + (1 + 2 + 3 + 4 + 5 + 6 + 7) * 2 + 8 * 2, 10);
    const band = lineSpectrum(f, p, 4, 10);
    expect([band.fminHz, band.fmaxHz]).toEqual([3, 11]);
    expect(spectralMoments(band, () => 1, 5, 0.1).m0).toBeCloseTo((2 + 3 + 4 + 5) * 2, 10);
  });
});
