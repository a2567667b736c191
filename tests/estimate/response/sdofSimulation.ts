import FFT from "fft.js";
import { gaussian } from "../../helpers.js";

/**
 * Test-only records: seeded white Gaussian base acceleration (variance 1, so G0 = 2 / fs over 0..fs/2)
 * and the SDOF's responses to it by circular filtering with the exact complex transfer functions
 * (fft.js as the transform), absolute acceleration T = (1 + i 2 zeta r) / (1 - r^2 + i 2 zeta r) and
 * relative displacement Z = -1 / (omega_n^2 (1 - r^2 + i 2 zeta r)). Independent of psdgate's synth.
 */
export function sdofRecords(
  n: number,
  rate: number,
  fnHz: number,
  q: number,
  seed: number,
): { base: Float64Array; accel: Float64Array; relDisp: Float64Array } {
  const base = gaussian(n, seed);
  return { base, ...sdofFiltered(base, rate, fnHz, q, n) };
}

/**
 * The SDOF's responses to `base` by the exact complex transfer functions on a circular transform of `length`
 * points (fft.js): `length` = base.length filters circularly; 2 x base.length zero-pads, so the response starts at
 * rest and nothing wraps. The first base.length samples are returned.
 */
export function sdofFiltered(
  base: Float64Array,
  rate: number,
  fnHz: number,
  q: number,
  length: number,
): { accel: Float64Array; relDisp: Float64Array } {
  const n = length;
  const f = new FFT(n);
  const x = new Float64Array(n);
  x.set(base);
  const spec = f.createComplexArray();
  f.realTransform(spec, x);
  f.completeSpectrum(spec);
  const a = f.createComplexArray();
  const z = f.createComplexArray();
  const zeta = 1 / (2 * q);
  const wn2 = (2 * Math.PI * fnHz) ** 2;
  for (let k = 0; k < n; k++) {
    const r = ((k <= n / 2 ? k : k - n) * rate) / n / fnHz;
    const dr = 1 - r * r;
    const di = 2 * zeta * r;
    const den = dr * dr + di * di;
    // 1 / D = (dr - i di) / den
    const ir = dr / den;
    const ii = -di / den;
    // T = (1 + i di) / D
    const tr = ir - di * ii;
    const ti = ii + di * ir;
    const xr = spec[2 * k]!;
    const xi = spec[2 * k + 1]!;
    a[2 * k] = xr * tr - xi * ti;
    a[2 * k + 1] = xr * ti + xi * tr;
    z[2 * k] = -(xr * ir - xi * ii) / wn2;
    z[2 * k + 1] = -(xr * ii + xi * ir) / wn2;
  }
  const out = f.createComplexArray();
  const real = (c: number[]) => {
    f.inverseTransform(out, c);
    const y = new Float64Array(base.length);
    for (let i = 0; i < base.length; i++) y[i] = out[2 * i]!;
    return y;
  };
  return { accel: real(a), relDisp: real(z) };
}
