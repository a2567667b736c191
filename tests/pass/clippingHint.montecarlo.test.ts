import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyzeRecording } from "../../src/pass/analyzeRecording.js";
import { gaussian, tempDir } from "../helpers.js";
import { wavBytes } from "../wavBytes.js";

/**
 * The clipping hint on integer codes near the quantisation step. A Gaussian record of sigma a few tenths of a step
 * fills its extreme code by itself (the code is a bin one step wide); the hint asks for more there than
 * n (Q((d - q/2)/sigma) - Q((d + q/2)/sigma)) by 4 Poisson sigma, a one-sided rate of about 3e-5 a side (normal
 * approximation, common practice). The records are seeded Gaussian noise rounded to 16-bit codes, made here.
 */
const RECORDS = 150;
const N = 1 << 17;

describe("clipping hint near the quantisation step (Monte Carlo)", () => {
  it(`Gaussian records at sigma 0.35, 0.5 and 0.8 LSB: no CLIPPING (${3 * RECORDS} records); cut at 1.3 sigma (sigma 3 LSB): every one`, async () => {
    const dir = tempDir();
    let falseHints = 0;
    for (const [k, sigma] of [0.35, 0.5, 0.8].entries())
      for (let r = 0; r < RECORDS; r++) {
        const x = gaussian(N, 7000 + 1000 * k + r, sigma).map(Math.round);
        const f = join(dir, `q${r % 4}.wav`);
        writeFileSync(f, wavBytes({ bits: 16, channels: 1, samples: Array.from(x) }));
        const a = await analyzeRecording(f, { segmentLength: 1024, spectrum: false });
        if (a.channels[0]!.doubts.some((d) => d.code === "CLIPPING")) falseHints++;
      }
    let found = 0;
    for (let r = 0; r < 50; r++) {
      const x = gaussian(N, 9500 + r, 3).map((v) => Math.max(-4, Math.min(4, Math.round(v))));
      const f = join(dir, `c${r % 4}.wav`);
      writeFileSync(f, wavBytes({ bits: 16, channels: 1, samples: Array.from(x) }));
      const a = await analyzeRecording(f, { segmentLength: 1024, spectrum: false });
      if (a.channels[0]!.doubts.some((d) => d.code === "CLIPPING")) found++;
    }
    console.log(`clipping hint MC: ${falseHints} of ${3 * RECORDS} quiet records flagged; ${found} of 50 cut records`);
    // 450 records x 2 sides x 3e-5: 0.03 expected.
    expect(falseHints).toBe(0);
    expect(found).toBe(50);
  }, 240_000);
});
