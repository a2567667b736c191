import { sdofFiltered } from "./sdofSimulation.js";
import { RainflowCounter } from "../../../src/estimate/response/rainflow.js";
import { TimeResponseAccumulator } from "../../../src/estimate/response/timeResponse.js";

/** The test's own SDOF simulation and references for the time-domain damage (tests/estimate/response/timeResponse*.test.ts). */
export const FS = 1000;
export const FN = 20;
export const Q = 10;

/**
 * The test's exact SDOF simulation, independent of the recursive filters: the input zero-padded to twice its
 * length (so the circular response starts at rest and nothing wraps), transformed once (fft.js), multiplied by
 * the exact transfer functions, absolute acceleration (1 + i 2 zeta r) / (1 - r^2 + i 2 zeta r) and relative
 * displacement -1 / (w_n^2 (1 - r^2 + i 2 zeta r)), and transformed back. Also the relative displacement's
 * spectral moments m0, m1, m2, m4 (Hz) of a white input of one-sided density g0.
 */
export function exactSdof(base: Float64Array, fn: number, q: number) {
  return sdofFiltered(base, FS, fn, q, 2 * base.length);
}

/** Spectral moments (Hz) of the relative displacement for a white input of one-sided density g0 on 0..fs/2. */
export function relDispMoments(fn: number, q: number, g0: number) {
  const zeta = 1 / (2 * q);
  const wn4 = (2 * Math.PI * fn) ** 4;
  const m = [0, 0, 0, 0, 0];
  const df = 0.001;
  for (let f = df / 2; f < FS / 2; f += df) {
    const r = f / fn;
    const h2 = 1 / (wn4 * ((1 - r * r) ** 2 + (2 * zeta * r) ** 2));
    for (let k = 0; k <= 4; k++) m[k]! += f ** k * h2 * g0 * df;
  }
  return { m0: m[0]!, m1: m[1]!, m2: m[2]!, m4: m[4]! };
}

export function lnGamma(z: number): number {
  // Lanczos (g = 7, n = 9), common practice; enough for whole and half-whole arguments here.
  const c = [
    0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
    12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
  ];
  z -= 1;
  let x = c[0]!;
  for (let i = 1; i < 9; i++) x += c[i]! / (z + i);
  const t = z + 7.5;
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(x);
}

/**
 * Dirlik's rainflow-range density (Dirlik, T., "Application of computers in fatigue analysis", PhD thesis,
 * University of Warwick, 1985; its constants from memory, docs/REFERENCES.md sec. 17 says check before citing):
 * E[D] = nu_p T E[(range/2)^b] with nu_p = sqrt(m4/m2) and
 * E[(range/2)^b] = m0^(b/2) [D1 Q^b Gamma(1+b) + 2^(b/2) Gamma(1+b/2) (D2 |R|^b + D3)].
 */
export function dirlikDamage(
  m: { m0: number; m1: number; m2: number; m4: number },
  b: number,
  durationS: number,
): number {
  const xm = (m.m1 / m.m0) * Math.sqrt(m.m2 / m.m4);
  const g = m.m2 / Math.sqrt(m.m0 * m.m4);
  const d1 = (2 * (xm - g * g)) / (1 + g * g);
  const R = (g - xm - d1 * d1) / (1 - g - d1 + d1 * d1);
  const d2 = (1 - g - d1 + d1 * d1) / (1 - R);
  const d3 = 1 - d1 - d2;
  const qq = (1.25 * (g - d3 - d2 * R)) / d1;
  const e =
    m.m0 ** (b / 2) *
    (d1 * qq ** b * Math.exp(lnGamma(1 + b)) +
      2 ** (b / 2) * Math.exp(lnGamma(1 + b / 2)) * (d2 * Math.abs(R) ** b + d3));
  return Math.sqrt(m.m4 / m.m2) * durationS * e;
}

export function rainflowSum(x: Float64Array, b: number): number {
  const c = new RainflowCounter(b);
  c.push(x);
  return c.finish();
}

export function timeDomain(base: Float64Array, b: number) {
  const acc = new TimeResponseAccumulator(Float64Array.from([FN]), Q, FS, b);
  for (let i = 0; i < base.length; i += 4096)
    acc.push(base.subarray(i, Math.min(base.length, i + 4096)), Math.min(4096, base.length - i));
  return acc.finish();
}
