import { describe, expect, it } from "vitest";
import { analyzeRecording } from "../../../src/pass/analyzeRecording.js";
import { gaussian, python, tempDir } from "../../helpers.js";
import { writeFileSync } from "node:fs";
import { join } from "node:path";

/**
 * Peak-hold against scipy 1.17.1: scipy.signal.welch (Hann, 50 % overlap, mean removed, density) of each
 * 2 s stretch on its own, and the largest at each line. A record quiet (sigma 1) but for one loud
 * stretch (sigma 3) from 6 to 8 s, 1 kHz, 12 s, written as a CSV the test makes.
 */
describe("peak-hold spectrum (psd --peak-hold)", () => {
  it("equals the largest of scipy's per-stretch Welch PSDs at every line, and stands 8.5-10.5 x the quiet level (the loud stretch is 9 x) where the loud stretch lies", async () => {
    const fs = 1000;
    const x = gaussian(12 * fs, 4);
    for (let i = 6 * fs; i < 8 * fs; i++) x[i]! *= 3;
    const dir = tempDir();
    const f = join(dir, "rec.csv");
    writeFileSync(f, "a\n" + Array.from(x, (v) => v.toFixed(6)).join("\n") + "\n");
    const a = await analyzeRecording(f, { csv: { sampleRateHz: fs }, segmentLength: 256, peakHoldS: 2 });
    const h = a.channels[0]!.peakHold!;
    expect(h.stretches).toBe(6);
    expect(h.averagesPerStretch).toBe(14);
    const ref = JSON.parse(
      python(`
import json, numpy as np, scipy.signal as sg
x = np.array([float(l) for l in open(${JSON.stringify(f)}).read().split()[1:]])
ps = [sg.welch(x[s*2000:(s+1)*2000], fs=1000, window='hann', nperseg=256, noverlap=128, detrend='constant', scaling='density')[1] for s in range(6)]
print(json.dumps(np.max(ps, axis=0).tolist()))
`),
    ) as number[];
    let worst = 0;
    for (let k = 0; k < ref.length; k++) worst = Math.max(worst, Math.abs(h.psd[k]! - ref[k]!) / Math.max(...ref));
    expect(worst).toBeLessThan(1e-9);
    // Where the maximum sits: the loud stretch (6 s) at most lines; its level about 9 x the quiet 2/fs plus the upper tail.
    const atLoud = Array.from(h.atS).filter((t) => t === 6).length;
    expect(atLoud / h.atS.length).toBeGreaterThan(0.95);
    let mean = 0;
    for (let k = 1; k < h.psd.length - 1; k++) mean += h.psd[k]!;
    mean /= h.psd.length - 2;
    expect(mean / (2 / fs)).toBeGreaterThan(8.5);
    expect(mean / (2 / fs)).toBeLessThan(10.5);
  });
  it("refuses a stretch shorter than one segment", async () => {
    const dir = tempDir();
    const f = join(dir, "rec.csv");
    writeFileSync(f, "a\n" + Array.from(gaussian(4000, 1), (v) => v.toFixed(6)).join("\n") + "\n");
    await expect(
      analyzeRecording(f, { csv: { sampleRateHz: 1000 }, segmentLength: 256, peakHoldS: 0.1 }),
    ).rejects.toThrow(/peakHoldS.*OPTION_INVALID|OPTION_INVALID/);
  });
});
