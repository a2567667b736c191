import FFT from "fft.js";
import { gaussian } from "./helpers.js";

/**
 * Test-only records with a chosen one-sided PSD, made independently of psdgate's own synthesizer:
 * seeded white Gaussian noise, shaped in the frequency domain by one FFT of the whole record (fft.js, a
 * reference library): bin k scaled by sqrt(G(f_k) fs / 2), its mirror alike, and transformed back. The
 * result is a stationary Gaussian record (circular over its length) whose PSD at every fine bin is G.
 * G = 0 outside the function's support (a drive that stops at the profile's ends).
 */
export function shapedRecord(level: (fHz: number) => number, sampleRateHz: number, length: number, seed: number): Float64Array {
  const fft = new FFT(length);
  const w = gaussian(length, seed);
  const spec = fft.createComplexArray() as number[];
  fft.realTransform(spec, w);
  fft.completeSpectrum(spec);
  for (let k = 0; k < length; k++) {
    const kk = k <= length / 2 ? k : length - k;
    const f = (kk * sampleRateHz) / length;
    const g = Math.sqrt(Math.max(0, level(f)) * (sampleRateHz / 2));
    spec[2 * k] = spec[2 * k]! * g;
    spec[2 * k + 1] = spec[2 * k + 1]! * g;
  }
  const out = fft.createComplexArray() as number[];
  fft.inverseTransform(out, spec);
  const x = new Float64Array(length);
  for (let i = 0; i < length; i++) x[i] = out[2 * i]!;
  return x;
}
