import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyzeRecording } from "../../src/pass/analyzeRecording.js";
import { autocorrelationFourthSum, offsetLines, owensT, upCrossingChance } from "../../src/compare/amplitudeGates.js";
import { welchPsd } from "../../src/estimate/spectral/psdEstimate.js";
import { spectralWindow } from "../../src/estimate/spectral/windows.js";
import { gaussian, python, tempDir } from "../helpers.js";
import { shapedRecord } from "../shapedRecords.js";
import { wavBytes } from "../wavBytes.js";

const FS = 5120;
const broadband = (f: number) => (f >= 20 && f <= 2000 ? 0.01 : 0);

function wavFile(x: Float64Array, name: string): string {
  const f = join(tempDir(), name);
  writeFileSync(f, wavBytes({ tag: 3, bits: 32, channels: 1, sampleRate: FS, samples: Array.from(x) }));
  return f;
}

describe("amplitudeGates", () => {
  it("Owen's T and the up-crossing chance match scipy (owens_t, and the bivariate integral by quad) for every rho", () => {
    const hs = [0, 0.5, 2, 3, 4.2364, 6, 9, 12];
    const as = [0, 1e-3, 0.01, 0.1, 0.5, 1, 2, 10, 1e3];
    const cs = [0.5, 3, 4.2364, 6];
    const rhos = [-0.99, -0.5, 0, 0.5, 0.9, 0.99, 0.999, 0.9998, 0.99999];
    // scipy.special.owens_t; the chance as integral_{-inf}^{c} phi(x) Q((c - rho x) / sqrt(1 - rho^2)) dx by
    // scipy.integrate.quad, an independent form (scipy 1.17, general-purpose reference library)
    const ref = JSON.parse(
      python(`
import json, numpy as np
from scipy.special import owens_t
from scipy.stats import norm
from scipy import integrate
hs, as_, cs, rhos = ${JSON.stringify([hs, as, cs, rhos])}
t = [[float(owens_t(h, a)) for a in as_] for h in hs]
def chance(c, r):
    s = np.sqrt(1 - r * r)
    f = lambda x: norm.pdf(x) * norm.sf((c - r * x) / s)
    # the integrand lives within a few s / r of c when r is near 1: split there so quad sees it
    w = min(10, 40 * s / max(abs(r), 1e-3))
    a, _ = integrate.quad(f, c - w, c, epsabs=0, epsrel=1e-13, limit=2000)
    b, _ = integrate.quad(f, -np.inf, c - w, epsabs=0, epsrel=1e-13, limit=2000)
    return a + b
u = [[chance(c, r) for r in rhos] for c in cs]
print(json.dumps({"t": t, "u": u}))`),
    ) as { t: number[][]; u: number[][] };
    hs.forEach((h, i) =>
      as.forEach((a, j) => {
        const want = ref.t[i]![j]!;
        expect(Math.abs(owensT(h, a) - want)).toBeLessThanOrEqual(1e-12 * want + 1e-300);
      }),
    );
    cs.forEach((c, i) =>
      rhos.forEach((r, j) => {
        const want = ref.u[i]![j]!;
        expect(Math.abs(upCrossingChance(c, r) - want) / want).toBeLessThan(1e-9);
      }),
    );
    expect(upCrossingChance(3, 1)).toBe(0);
    expect(upCrossingChance(3, Number.NaN)).toBe(0);
  });
  it("autocorrelationFourthSum: white noise gives 1 (independent samples), a narrow band much more", () => {
    const w = welchPsd(gaussian(1 << 16, 1), 1024, { segmentLength: 256 });
    expect(autocorrelationFourthSum(w)).toBeLessThan(1.05);
    const nb = welchPsd(
      shapedRecord((f) => (f > 95 && f < 105 ? 1 : 0), 1024, 1 << 16, 2),
      1024,
      { segmentLength: 1024 },
    );
    expect(autocorrelationFourthSum(nb)).toBeGreaterThan(10);
  });
  it("a record saturated at 2.2 sigma with 2 LSB of noise on top is in doubt (crest factor and kurtosis far below Gaussian)", async () => {
    const x = shapedRecord(broadband, FS, 1 << 18, 3);
    let s = 0;
    for (const v of x) s += v * v;
    const sigma = Math.sqrt(s / x.length);
    const lsb = (4.4 * sigma) / 65536;
    const noise = gaussian(x.length, 4);
    for (let i = 0; i < x.length; i++)
      x[i] = Math.max(-2.2 * sigma, Math.min(2.2 * sigma, x[i]!)) + 2 * lsb * noise[i]!;
    const a = await analyzeRecording(wavFile(x, "saturated.wav"), { segmentLength: 2048 });
    const codes = a.channels[0]!.doubts.map((d) => d.code);
    expect(codes).toContain("CREST_LOW");
    expect(codes).toContain("KURTOSIS_LOW");
  });
  it("a Gaussian record of the same spectrum raises neither doubt (20 records)", async () => {
    for (let r = 0; r < 20; r++) {
      const a = await analyzeRecording(wavFile(shapedRecord(broadband, FS, 1 << 16, 100 + r), `g${r}.wav`), {
        segmentLength: 2048,
      });
      expect(a.channels[0]!.doubts).toEqual([]);
    }
  });
  it("a record with shocks on top gets a note (kurtosis above Gaussian), not a doubt", async () => {
    const x = shapedRecord(broadband, FS, 1 << 17, 5);
    for (let i = 1000; i < x.length; i += 9000) x[i] = x[i]! + 30;
    const a = await analyzeRecording(wavFile(x, "shocks.wav"), { segmentLength: 2048 });
    expect(a.channels[0]!.notes.map((n) => n.code)).toContain("KURTOSIS_HIGH");
    expect(a.channels[0]!.doubts.map((d) => d.code)).not.toContain("KURTOSIS_LOW");
  });
  it("offsetLines: a constant leaks into as many lines as the periodic cosine-sum window has terms (Harris 1978)", () => {
    expect(offsetLines(spectralWindow("rectangular", 1024))).toBe(1);
    expect(offsetLines(spectralWindow("hann", 1024))).toBe(2);
    expect(offsetLines(spectralWindow("hamming", 1024))).toBe(2);
    expect(offsetLines(spectralWindow("blackman-harris", 1024))).toBe(4);
  });
  it("--detrend none on an axis with gravity (1 g on a Gaussian record of 0.09 g): no gate doubt or crest note, the gates judge the motion about its mean", async () => {
    for (const window of ["hann", "blackman-harris", "rectangular"] as const) {
      const x = shapedRecord(broadband, FS, 1 << 17, 8);
      for (let i = 0; i < x.length; i++) x[i] = 0.02 * x[i]! + 1;
      const a = await analyzeRecording(wavFile(x, "gravity.wav"), { segmentLength: 2048, detrend: "none", window });
      expect(a.channels[0]!.doubts).toEqual([]);
      expect(a.channels[0]!.notes.map((n) => n.code)).not.toContain("CREST_HIGH");
    }
  });
  it("a slow drift far below the first line is a note, and check is not made inconclusive by it", async () => {
    const x = shapedRecord(broadband, FS, 1 << 18, 6);
    for (let i = 0; i < x.length; i++)
      x[i] = x[i]! + 3 * Math.sin((2 * Math.PI * 0.05 * i) / FS) + 0.1 * (i / x.length);
    const a = await analyzeRecording(wavFile(x, "drift.wav"), { segmentLength: 2048 });
    expect(a.channels[0]!.notes.map((n) => n.code)).toContain("BELOW_FIRST_LINE");
    expect(a.channels[0]!.doubts).toEqual([]);
  });
});
