import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { amplitudeGates } from "../../src/compare/amplitudeGates.js";
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
});
