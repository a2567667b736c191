import type { AnalogSection } from "./isoWeightings.js";
import type { DigitalBiquad } from "./bilinearBiquads.js";

/**
 * An analog second-order section realised digitally by matching its magnitude over a band, for rates
 * where the bilinear transform's frequency warping is too coarse (phone and logger rates of 100-400 Hz).
 *
 * Poles: impulse invariance, z = exp(s T) (Oppenheim & Schafer, Discrete-Time Signal Processing, 3rd ed.
 * 2010, sec. 7.1), so the digital poles sit exactly where the analog ones map, with no warping:
 *   a1 = -2 exp(-zeta w0 T) cos(w0 T sqrt(1 - zeta^2)),  a2 = exp(-2 zeta w0 T)   (cosh for zeta > 1).
 * Zeros: the numerator is chosen so that |H(e^jwT)|^2 matches the analog |H(jw)|^2 over the band. With
 * phi1 = sin^2(wT/2), phi0 = 1 - phi1, phi2 = 4 phi0 phi1, a biquad's squared magnitude is
 *   |H|^2 = (B0 phi0 + B1 phi1 + B2 phi2) / (A0 phi0 + A1 phi1 + A2 phi2),
 *   A0 = (1 + a1 + a2)^2, A1 = (1 - a1 + a2)^2, A2 = -4 a2,  B likewise from b0, b1, b2
 * (the form of Vicanek, "Matched Second Order Digital Filters", 2016; from memory, and checked here by
 * scipy.signal.sosfreqz on the coefficients, tests/weight/bilinearBiquads.test.ts), which is linear in B0, B1, B2.
 * Vicanek matches three frequencies; here B is the least-squares solution of |H|^2 / |H_analog|^2 = 1 at 200 log-spaced
 * frequencies over the band (relative error, so a section is held alike at 1 Hz and at 80 Hz), solved by Householder
 * QR. The minimum-phase numerator follows from B (same paper):
 *   b1 = (sqrt B0 - sqrt B1) / 2,  W = (sqrt B0 + sqrt B1) / 2,  b0 = (W + sqrt(W^2 + B2)) / 2,  b2 = -B2 / (4 b0).
 * Returns undefined when no real minimum-phase numerator fits (B0 or B1 negative, or W^2 + B2 < 0):
 * the caller keeps the bilinear section.
 */
export function fittedSection(s: AnalogSection, sampleRateHz: number, bandTopHz: number): DigitalBiquad | undefined {
  const [na2, na1, na0] = s.a;
  const T = 1 / sampleRateHz;
  const w0 = Math.sqrt(na0 / na2);
  const zeta = na1 / (2 * Math.sqrt(na0 * na2));
  const r = Math.exp(-zeta * w0 * T);
  const a1 =
    zeta < 1
      ? -2 * r * Math.cos(w0 * T * Math.sqrt(1 - zeta * zeta))
      : -2 * r * Math.cosh(w0 * T * Math.sqrt(zeta * zeta - 1));
  const a2 = r * r;
  const A0 = (1 + a1 + a2) ** 2;
  const A1 = (1 - a1 + a2) ** 2;
  const A2 = -4 * a2;
  const m = 200;
  const lo = 0.1;
  const hi = Math.min(bandTopHz, (0.999 * sampleRateHz) / 2);
  // Rows: [phi0, phi1, phi2] / (A(phi) |H_analog|^2), target 1.
  const M = new Float64Array(3 * m);
  const y = new Float64Array(m).fill(1);
  for (let i = 0; i < m; i++) {
    const f = lo * (hi / lo) ** (i / (m - 1));
    const p1 = Math.sin((Math.PI * f) / sampleRateHz) ** 2;
    const p0 = 1 - p1;
    const p2 = 4 * p0 * p1;
    const d = (A0 * p0 + A1 * p1 + A2 * p2) * analogSquared(s, 2 * Math.PI * f);
    M[3 * i] = p0 / d;
    M[3 * i + 1] = p1 / d;
    M[3 * i + 2] = p2 / d;
  }
  const B = leastSquares3(M, y, m);
  if (B === undefined) return undefined;
  const [B0, B1, B2] = B;
  if (!(B0 >= 0 && B1 >= 0)) return undefined;
  const s0 = Math.sqrt(B0);
  const s1 = Math.sqrt(B1);
  const W = (s0 + s1) / 2;
  const disc = W * W + B2;
  if (!(disc >= 0) || !(W > 0)) return undefined;
  const b0 = (W + Math.sqrt(disc)) / 2;
  return { b0, b1: (s0 - s1) / 2, b2: -B2 / (4 * b0), a1, a2 };
}

/** |b(jw)/a(jw)|^2 of one analog section. */
function analogSquared(s: AnalogSection, w: number): number {
  const w2 = w * w;
  const nr = s.b[2] - s.b[0] * w2;
  const ni = s.b[1] * w;
  const dr = s.a[2] - s.a[0] * w2;
  const di = s.a[1] * w;
  return (nr * nr + ni * ni) / (dr * dr + di * di);
}

/**
 * Least squares min |M x - y| for an m x 3 matrix (row-major), by Householder QR (Golub & Van Loan,
 * Matrix Computations, 4th ed. 2013, sec. 5.3): the columns here differ by orders of magnitude at high
 * rates, where the normal equations would square the condition number. Undefined when rank-deficient.
 */
function leastSquares3(M: Float64Array, y: Float64Array, m: number): [number, number, number] | undefined {
  const n = 3;
  for (let k = 0; k < n; k++) {
    let norm = 0;
    for (let i = k; i < m; i++) norm += M[3 * i + k]! ** 2;
    norm = Math.sqrt(norm);
    if (!(norm > 0)) return undefined;
    const alpha = M[3 * k + k]! > 0 ? -norm : norm;
    // v = x - alpha e1 over rows k..m-1, stored in place of column k.
    M[3 * k + k]! -= alpha;
    let vv = 0;
    for (let i = k; i < m; i++) vv += M[3 * i + k]! ** 2;
    if (vv > 0) {
      for (let j = k + 1; j < n; j++) {
        let s = 0;
        for (let i = k; i < m; i++) s += M[3 * i + k]! * M[3 * i + j]!;
        const t = (2 * s) / vv;
        for (let i = k; i < m; i++) M[3 * i + j]! -= t * M[3 * i + k]!;
      }
      let s = 0;
      for (let i = k; i < m; i++) s += M[3 * i + k]! * y[i]!;
      const t = (2 * s) / vv;
      for (let i = k; i < m; i++) y[i]! -= t * M[3 * i + k]!;
    }
    M[3 * k + k] = alpha; // R's diagonal
  }
  const x: [number, number, number] = [0, 0, 0];
  for (let k = n - 1; k >= 0; k--) {
    let s = y[k]!;
    for (let j = k + 1; j < n; j++) s -= M[3 * k + j]! * x[j]!;
    const d = M[3 * k + k]!;
    if (!(Math.abs(d) > 0)) return undefined;
    x[k] = s / d;
  }
  return x;
}
