import FFT from "fft.js";
import type { EventFinder } from "../../../src/estimate/response/eventFinder.js";
import { gaussian, seeded } from "../../helpers.js";

/** Test-made records for the event finder (tests/estimate/response/eventFinder*.test.ts). */
export const FS = 1000;
export const FC = 100;

/**
 * Test-made Gaussian background: seeded white noise (helpers.gaussian), cut to a flat band 0..FC by an
 * ideal filter in one FFT of the record (fft.js), scaled to unit r.m.s. Its zero up-crossing rate is
 * sqrt(m2 / m0) = FC / sqrt(3) (flat one-sided PSD on 0..FC: m2 / m0 = FC^2 / 3).
 */
export function bandLimited(n: number, seed: number): Float64Array {
  const x = gaussian(n, seed);
  const f = new FFT(n);
  const spec = f.createComplexArray();
  f.realTransform(spec, x);
  f.completeSpectrum(spec);
  for (let k = 0; k < n; k++) {
    const fk = (Math.min(k, n - k) * FS) / n;
    if (fk > FC || k === 0) {
      spec[2 * k] = 0;
      spec[2 * k + 1] = 0;
    }
  }
  const out = f.createComplexArray();
  f.inverseTransform(out, spec);
  const y = new Float64Array(n);
  let ss = 0;
  for (let i = 0; i < n; i++) {
    y[i] = out[2 * i]!;
    ss += y[i]! * y[i]!;
  }
  const s = Math.sqrt(ss / n);
  for (let i = 0; i < n; i++) y[i]! /= s;
  return y;
}

/** The 1 s stretch mean squares about each stretch's mean (what shockRecording hands backgroundRms). */
export function stretchMeanSquares(x: Float64Array, len: number): number[] {
  const out: number[] = [];
  for (let s = 0; s + len <= x.length; s += len) {
    let m = 0;
    for (let i = s; i < s + len; i++) m += x[i]!;
    m /= len;
    let q = 0;
    for (let i = s; i < s + len; i++) q += (x[i]! - m) ** 2;
    out.push(q / len);
  }
  return out;
}

/** Pushes in blocks of seeded random lengths (1..3000) to cross block edges everywhere. */
export function run(finder: EventFinder, x: Float64Array, seed: number) {
  const u = seeded(seed);
  for (let i = 0; i < x.length; ) {
    const len = Math.min(x.length - i, 1 + Math.floor(u() * 3000));
    finder.push(x.subarray(i, i + len), len);
    i += len;
  }
  return finder.finish();
}
