import { describe, expect, it } from "vitest";
import { BandSpectrogramAccumulator, thirdOctaveBands } from "../../../src/estimate/spectral/bandSpectrogram.js";
import { welchPsd } from "../../../src/estimate/spectral/psdEstimate.js";
import { SegmentPower } from "../../../src/estimate/spectral/segmentPower.js";
import { spectralWindow } from "../../../src/estimate/spectral/windows.js";
import { gaussian } from "../../helpers.js";

describe("BandSpectrogramAccumulator", () => {
  it("each row is the Welch PSD of its own stretch summed over the band's lines (same as welchPsd on that stretch)", () => {
    const fs = 1000;
    const n = 512;
    const x = gaussian(3 * 2048 + 300, 17);
    for (let i = 2048; i < x.length; i++) x[i]! *= 2; // the level changes between stretches
    const bands = thirdOctaveBands([4, 8, 16, 31.5, 63]);
    const acc = new BandSpectrogramAccumulator(
      { segmentLength: n, hop: 128, window: spectralWindow("hann", n), detrend: "mean" },
      new SegmentPower(n),
      2048,
      bands,
      fs,
    );
    for (let i = 0; i < x.length; i += 700)
      acc.push(x.subarray(i, Math.min(x.length, i + 700)), Math.min(700, x.length - i));
    const s = acc.finish(fs);
    expect(s.meanSquare.length).toBe(3); // the trailing 300 samples are left out
    expect(s.averagesPerStretch).toBe((2048 - 512) / 128 + 1);
    for (let r = 0; r < 3; r++) {
      const p = welchPsd(x.subarray(r * 2048, (r + 1) * 2048), fs, { segmentLength: n, overlap: 0.75 });
      bands.forEach((b, j) => {
        let sum = 0;
        for (let k = 0; k < p.psd.length; k++)
          if (p.frequencyHz[k]! >= b.lo && p.frequencyHz[k]! < b.hi) sum += p.psd[k]! * p.lineSpacingHz;
        expect(s.meanSquare[r]![j]).toBeCloseTo(sum, 12);
      });
    }
    expect(s.startS).toEqual([0, 2.048, 4.096]);
  });
  it("thirdOctaveBands: edges at centre x 2^(-1/6) and 2^(1/6) (IEC 61260 base-2, common practice)", () => {
    const [b] = thirdOctaveBands([10]);
    expect(b!.lo).toBeCloseTo(10 / 2 ** (1 / 6), 12);
    expect(b!.hi / b!.lo).toBeCloseTo(2 ** (1 / 3), 12);
  });
});
