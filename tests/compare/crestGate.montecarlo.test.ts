import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { amplitudeGates, offsetLines } from "../../src/compare/amplitudeGates.js";
import { spectralWindow } from "../../src/estimate/spectral/windows.js";
import { analyzeRecording } from "../../src/pass/analyzeRecording.js";
import { tempDir } from "../helpers.js";
import { recordShaper } from "../shapedRecords.js";
import { wavBytes } from "../wavBytes.js";

/**
 * The crest gate on records sampled far above their bandwidth (a slow ride or transport record at a laboratory
 * rate): lag-one correlation about 0.9999. For a Gaussian record the chance that its largest |d| stays below c
 * is about exp(-N_c) (crossings of a high level are nearly Poisson; Cramer & Leadbetter 1967, ch. 12), so
 * U = exp(-N_c at the observed crest) is about uniform on (0, 1). The records are made here (seeded Gaussian
 * noise shaped by one FFT, tests/shapedRecords.ts), not by psdgate's synth.
 */
const FS = 4096;
const N = 1 << 16;
const RECORDS = 400;
const band = (f: number) => (f >= 2 && f <= 15 ? 1e-3 : 0);

describe("crest gate on oversampled Gaussian records (Monte Carlo)", () => {
  it(`exp(-N_c) at the observed crest is about uniform: P(U < 0.1) and P(U < 0.02) within binomial bounds (${RECORDS} records)`, async () => {
    const make = recordShaper(band, FS, N);
    const dir = tempDir();
    const us: number[] = [];
    let crestDoubts = 0;
    for (let r = 0; r < RECORDS; r++) {
      const x = make(9000 + r);
      const f = join(dir, `r${r % 4}.wav`);
      writeFileSync(f, wavBytes({ tag: 3, bits: 32, channels: 1, sampleRate: FS, samples: Array.from(x) }));
      const a = await analyzeRecording(f, { segmentLength: 4096 });
      const ch = a.channels[0]!;
      const g = amplitudeGates(ch.stats, ch.psd, N / FS);
      us.push(Math.exp(-g.crossingsAtCrest));
      if (ch.doubts.some((d) => d.code === "CREST_LOW")) crestDoubts++;
    }
    const below = (t: number) => us.filter((u) => u < t).length;
    console.log(
      `crest gate MC: U<0.1 ${below(0.1)}/${RECORDS}, U<0.02 ${below(0.02)}, U<0.5 ${below(0.5)}, CREST_LOW ${crestDoubts}`,
    );
    // Binomial(400, p) 99.9 % two-sided bounds (normal approximation, common practice): p = 0.1: 40 +- 19.7;
    // p = 0.02: 8 +- 9.2. The earlier quadrature (Q(c) - P(both above)) over-counted N_c here: measured on
    // these 400 records, 352 had U below 0.1 and 222 were put in doubt (CREST_LOW) though none is clipped.
    expect(below(0.1)).toBeGreaterThanOrEqual(21);
    expect(below(0.1)).toBeLessThanOrEqual(59);
    expect(below(0.02)).toBeLessThanOrEqual(17);
    // The gate's rate is CREST_GATE_RATE (1e-6) a record: none of these unclipped records may be in doubt.
    expect(crestDoubts).toBe(0);
  }, 120_000);
  it(`--detrend none with 1 g of gravity on the same records: exp(-N_c) about uniform, no gate doubt (${RECORDS} records)`, async () => {
    // The gates take the segments about their means and leave the offset's lines out of the autocorrelation; before,
    // the offset made every record's crest factor about 1.1 (CREST_LOW on all of them).
    const make = recordShaper(band, FS, N);
    const dir = tempDir();
    const skip = offsetLines(spectralWindow("hann", 4096));
    const us: number[] = [];
    let doubts = 0;
    let crestHigh = 0;
    for (let r = 0; r < RECORDS; r++) {
      const x = make(9000 + r);
      for (let i = 0; i < x.length; i++) x[i] = x[i]! + 1;
      const f = join(dir, `g${r % 4}.wav`);
      writeFileSync(f, wavBytes({ tag: 3, bits: 32, channels: 1, sampleRate: FS, samples: Array.from(x) }));
      const a = await analyzeRecording(f, { segmentLength: 4096, detrend: "none" });
      const ch = a.channels[0]!;
      const g = amplitudeGates(ch.stats, ch.psd, N / FS, skip);
      us.push(Math.exp(-g.crossingsAtCrest));
      if (ch.doubts.some((d) => d.code === "CREST_LOW" || d.code === "KURTOSIS_LOW")) doubts++;
      if (ch.notes.some((d) => d.code === "CREST_HIGH")) crestHigh++;
    }
    const below = (t: number) => us.filter((u) => u < t).length;
    console.log(
      `crest gate MC, detrend none + 1 g: U<0.1 ${below(0.1)}/${RECORDS}, U<0.02 ${below(0.02)}, U>0.9 ${us.filter((u) => u > 0.9).length}, doubts ${doubts}, CREST_HIGH ${crestHigh}`,
    );
    // The same binomial bounds as above, and the upper tail likewise (p = 0.1: 40 +- 19.7).
    expect(below(0.1)).toBeGreaterThanOrEqual(21);
    expect(below(0.1)).toBeLessThanOrEqual(59);
    expect(below(0.02)).toBeLessThanOrEqual(17);
    expect(us.filter((u) => u > 0.9).length).toBeLessThanOrEqual(59);
    expect(doubts).toBe(0);
  }, 240_000);
});
