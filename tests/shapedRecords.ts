import FFT from "fft.js";
import { gaussian } from "./helpers.js";

/**
 * Test-only records with a chosen one-sided PSD, made independently of psdgate's own synthesizer:
 * seeded white Gaussian noise, shaped in the frequency domain by one FFT of the whole record (fft.js, a
 * reference library): bin k scaled by sqrt(G(f_k) fs / 2), its mirror alike, and transformed back. The
 * result is a stationary Gaussian record (circular over its length) whose PSD at every fine bin is G.
 * G = 0 outside the function's support (a drive that stops at the profile's ends).
 */
export function shapedRecord(
  level: (fHz: number) => number,
  sampleRateHz: number,
  length: number,
  seed: number,
): Float64Array {
  return recordShaper(level, sampleRateHz, length)(seed);
}

/**
 * The same records, many of one PSD: the FFT tables, the work arrays and the bin gains are made once
 * (a Monte Carlo loop spent more time on them and on G(f) than on the transforms). Same bytes as
 * shapedRecord for the same seed.
 */
export function recordShaper(
  level: (fHz: number) => number,
  sampleRateHz: number,
  length: number,
): (seed: number) => Float64Array {
  const fft = new FFT(length);
  const gain = new Float64Array(length);
  for (let k = 0; k < length; k++) {
    const kk = k <= length / 2 ? k : length - k;
    gain[k] = Math.sqrt(Math.max(0, level((kk * sampleRateHz) / length)) * (sampleRateHz / 2));
  }
  const spec = fft.createComplexArray() as number[];
  const out = fft.createComplexArray() as number[];
  return (seed) => {
    const w = gaussian(length, seed);
    fft.realTransform(spec, w);
    fft.completeSpectrum(spec);
    for (let k = 0; k < length; k++) {
      const g = gain[k]!;
      spec[2 * k] = spec[2 * k]! * g;
      spec[2 * k + 1] = spec[2 * k + 1]! * g;
    }
    fft.inverseTransform(out, spec);
    const x = new Float64Array(length);
    for (let i = 0; i < length; i++) x[i] = out[2 * i]!;
    return x;
  };
}
