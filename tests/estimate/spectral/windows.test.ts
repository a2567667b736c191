import { describe, expect, it } from "vitest";
import { spectralWindow, windowFigures, WINDOW_NAMES } from "../../../src/estimate/spectral/windows.js";
import { scipyReference } from "../../helpers.js";

describe("spectralWindow", () => {
  // Harris 1978, Proc. IEEE 66(1), Table 1 prints coherent gain and ENBW to 2 decimals (no flat top there):
  // rectangular 1.00 / 1.00, Hann 0.50 / 1.50, Hamming 0.54 / 1.36, 4-term Blackman-Harris (-92 dB) 0.36 / 2.00.
  const harris: Record<string, { cg: number; enbw: number }> = {
    rectangular: { cg: 1.0, enbw: 1.0 },
    hann: { cg: 0.5, enbw: 1.5 },
    hamming: { cg: 0.54, enbw: 1.36 },
    "blackman-harris": { cg: 0.36, enbw: 2.0 },
  };
  for (const name of WINDOW_NAMES) {
    if (harris[name]) {
      it(`${name}: coherent gain and ENBW match Harris 1978 Table 1 (its 2 decimals)`, () => {
        const f = windowFigures(spectralWindow(name, 4096));
        expect(f.coherentGain).toBeCloseTo(harris[name]!.cg, 2);
        expect(f.enbwBins).toBeCloseTo(harris[name]!.enbw, 2);
      });
    }
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
