import { describe, expect, it } from "vitest";
import { spectralWindow, windowFigures, WINDOW_NAMES } from "../../src/estimate/windows.js";
import { scipyReference } from "../helpers.js";

describe("spectralWindow", () => {
  // Harris 1978, Proc. IEEE 66(1), Table 1 (CG, ENBW), reproduced for periodic N=4096 in ../shared/REFERENCES.md sec. 1.
  const harris: Record<string, { cg: number; enbw: number }> = {
    rectangular: { cg: 1.0, enbw: 1.0 },
    hann: { cg: 0.5, enbw: 1.5 },
    hamming: { cg: 0.54, enbw: 1.3628 },
    "blackman-harris": { cg: 0.35875, enbw: 2.0044 },
    flattop: { cg: 0.21558, enbw: 3.7702 }, // D'Antona & Ferrero 2006 coefficients (scipy's flattop)
  };
  for (const name of WINDOW_NAMES) {
    it(`${name}: coherent gain and ENBW match Harris 1978 Table 1 (1e-4)`, () => {
      const f = windowFigures(spectralWindow(name, 4096));
      expect(f.coherentGain).toBeCloseTo(harris[name]!.cg, 4);
      expect(f.enbwBins).toBeCloseTo(harris[name]!.enbw, 4);
    });
    it(`${name}: matches scipy.signal.get_window(fftbins=True) figures to 1e-12`, () => {
      // scipy 1.17.1, tests/fixtures/scipy-reference.json
      const f = windowFigures(spectralWindow(name, 4096));
      expect(Math.abs(f.coherentGain - scipyReference.windows[name]!.coherentGain)).toBeLessThan(1e-12);
      expect(Math.abs(f.enbwBins - scipyReference.windows[name]!.enbwBins)).toBeLessThan(1e-12);
    });
  }
  it("hann is periodic: w[0] = 0 and w[N/2] = 1, not symmetric", () => {
    const w = spectralWindow("hann", 8);
    expect(w[0]).toBe(0);
    expect(w[4]).toBeCloseTo(1, 15);
    expect(w[7]).toBeCloseTo(w[1]!, 15);
  });
});
