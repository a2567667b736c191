import FFT from "fft.js";
import { describe, expect, it } from "vitest";
import { welchPsd } from "../../../src/estimate/spectral/psdEstimate.js";
import { spectralKernel } from "../../../src/estimate/spectral/spectralKernel.js";
import { spectralTones } from "../../../src/estimate/spectral/toneEstimate.js";
import { spectralWindow } from "../../../src/estimate/spectral/windows.js";
import { seeded } from "../../helpers.js";

/**
 * The tone candidates' kernel-shape test (spectralTones) on records this test makes itself: Gaussian noise shaped in
 * the frequency domain by a base-excited single-degree-of-freedom mount (random vibration with a resonance a few lines
 * wide, which is not a tone), and white Gaussian noise with one sine between lines (which is). 1024 Hz, 1024-point Hann
 * segments (1 Hz lines), 50 % overlap, 32 s (about 119 DOF) and 256 s (about 950 DOF).
 */

/** Seeded uniforms (tests/helpers.ts, mulberry32) and Box-Muller normals from them. */
function normals(seed: number) {
  const uniform = seeded(seed);
  return { normal: () => Math.sqrt(-2 * Math.log(1 - uniform())) * Math.cos(2 * Math.PI * uniform()), uniform };
}

const FS = 1024;
const SEGMENT = 1024;

/** |base-excitation transmissibility|^2 of a mode at fn, quality factor q (common practice). */
function transmissibility2(f: number, fn: number, q: number): number {
  const r = f / fn;
  const c = (r / q) ** 2;
  return (1 + c) / ((1 - r * r) ** 2 + c);
}

/**
 * Gaussian noise of one-sided density 2/fs times (f / 10)^slope |T(f)|^2 (one FFT of the whole record, n a power of
 * 2): a road input falling with frequency through a mount.
 */
function resonantRecord(n: number, fn: number, q: number, slope: number, seed: number): Float64Array {
  const g = normals(seed);
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) x[i] = g.normal();
  const fft = new FFT(n);
  const spec = fft.createComplexArray() as number[];
  fft.realTransform(spec, Array.from(x));
  fft.completeSpectrum(spec);
  for (let k = 0; k < n; k++) {
    const f = (Math.min(k, n - k) * FS) / n;
    const s = f > 0 ? Math.sqrt((f / 10) ** slope * transmissibility2(f, fn, q)) : 0;
    spec[2 * k] = spec[2 * k]! * s;
    spec[2 * k + 1] = spec[2 * k + 1]! * s;
  }
  const out = fft.createComplexArray() as number[];
  fft.inverseTransform(out, spec);
  for (let i = 0; i < n; i++) x[i] = out[2 * i]!;
  return x;
}

/** White Gaussian noise of one-sided density G plus A cos(2 pi f t + phi). */
function toneRecord(n: number, G: number, hz: number, peak: number, seed: number): Float64Array {
  const g = normals(seed);
  const sd = Math.sqrt((G * FS) / 2);
  const phase = 2 * Math.PI * g.uniform();
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) x[i] = sd * g.normal() + peak * Math.cos((2 * Math.PI * hz * i) / FS + phase);
  return x;
}

function tonesNear(x: Float64Array, hz: number, within: number): number {
  const p = welchPsd(x, FS, { segmentLength: SEGMENT });
  const w = spectralWindow("hann", SEGMENT);
  const k = spectralKernel("hann", w, "mean");
  return spectralTones(p, w, k.halfWidthBins).filter((t) => Math.abs(t.frequencyHz - hz) <= within).length;
}

describe("tone candidates: a resonance of random vibration a few lines wide is not a tone (Monte Carlo)", () => {
  // Half-power bandwidth fn / Q: 2 lines (20 Hz, Q 10), 3.7 lines (22 Hz, Q 6: the Corran K7 rack's mount) and
  // 6 lines (30 Hz, Q 5), on a road input falling as f^-0.9 or f^-0.6; 40 records each at 32 s and 16 at 256 s.
  // Measured at 32 s without the shape test: 38/40, 27/40, 8/40 and 0/40 records gave a candidate (the motorway
  // sample's, 10.2 dB above its background, was one); with it: 0 in every case, at 32 s and at 256 s.
  const cases = [
    { fn: 20.3, q: 10, slope: -0.9 },
    { fn: 22, q: 6, slope: -0.9 },
    { fn: 22, q: 6, slope: -0.6 },
    { fn: 30.6, q: 5, slope: -0.9 },
  ];
  it.each(cases)("fn $fn Hz, Q $q, road slope $slope: a candidate in few records", ({ fn, q, slope }) => {
    const counts: string[] = [];
    for (const [n, records] of [
      [1 << 15, 40],
      [1 << 18, 16],
    ] as const) {
      let flagged = 0;
      for (let r = 0; r < records; r++)
        flagged += tonesNear(resonantRecord(n, fn, q, slope, 9000 + 97 * r + n), fn, 4) > 0 ? 1 : 0;
      counts.push(`${n / FS} s: ${flagged}/${records}`);
      // At most 10 % of the records (measured: see the closing line of the describe).
      expect(flagged, counts.join(", ")).toBeLessThanOrEqual(Math.ceil(0.1 * records));
    }
  });
});

describe("tone candidates: a sine between lines is still found (Monte Carlo)", () => {
  // The shape test's own false-rejection rate is SHAPE_LEVEL (1e-4) per tone where the lines' chi-square scatter holds;
  // the lines within reach are correlated (window, overlap), so the rate is measured: 0 of 160 tones missed.
  it("12 to 30 dB above a white background, anywhere between lines, 32 s and 256 s: found in every record", () => {
    let missed = 0;
    let tried = 0;
    const g = normals(4242);
    for (const [n, records] of [
      [1 << 15, 120],
      [1 << 18, 40],
    ] as const) {
      for (let r = 0; r < records; r++) {
        const hz = 100 + Math.floor(300 * g.uniform()) + g.uniform();
        const G = 1e-3;
        // A^2 / 2 = 3 G 10^(db / 10): the peak line stands (A^2 / 2) h / (G df) above the background, h the share of
        // the tone on it (2/3 for Hann on a line, about 0.48 half-way between: common practice), so 1.6-3 dB above db.
        const db = 12 + 18 * g.uniform();
        const peak = Math.sqrt(((2 * G * 10 ** (db / 10)) / (2 / 3)) * 2);
        missed += tonesNear(toneRecord(n, G, hz, peak, 5000 + r + n), hz, 1) === 1 ? 0 : 1;
        tried++;
      }
    }
    expect(missed, `${missed} of ${tried} tones missed`).toBe(0);
  });
});
