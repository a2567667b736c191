/**
 * The part of a segment's windowed-minus-plain mean square that the segment's own shape explains, for the
 * Parseval check (parsevalCheck.ts says why it is needed).
 *
 * The window weighs sample i by a_i = w_i^2 / sum w^2, the plain mean square by 1/n; the two agree in expectation
 * only when the detrended segment's variance is the same at every i. Content with a period near or beyond the
 * segment's length breaks that: within a segment it is a trend or a bow the per-segment detrend leaves (a 1.5 Hz sway
 * over a 0.16 s segment is a ramp, small mid-segment where the window looks and large at the ends where it does
 * not). So each detrended segment d is split into its slow part s, the least-squares fit of the polynomials of
 * degree <= DEGREE on the sample index, and the rest r = d - s, and
 *
 *   gap(d) = W(d) - P(d) = [W(s) - P(s)] + [W(r) + 2 W(s, r) - P(r)],
 *
 * with W the window-weighted and P the plain mean square. The first bracket is known exactly per segment; the
 * second has expectation sigma^2 (q/n - sum a_i h_i) for white r (h_i the leverage of the q = DEGREE + 1 fitted
 * terms at i: the fit takes some of the noise too, more at the ends than mid-segment), with sigma^2 = P(r) n / (n - q).
 * Degree 6 follows a sway below the first line (at most one cycle per segment) closely enough that what is left
 * of it is below the batch-means spread of an hour's record; degree 4 left 0.2-0.5 % of a 15 % sway between
 * 0.7 and 1 line (measured with numpy on seeded records while choosing it).
 *
 * The fit also takes a little of faster content (of a random-phase sinusoid at line k about 1.9 / k^2 of its power,
 * Hann, 4096 points; 0.24 at line 2), which the white-noise term covers only for a flat spectrum: so this is the
 * check's second reference, not its only one (parsevalCheck.ts).
 *
 * Sums run on the monomials u^k, u = (i - mid) / mid in [-1, 1], with the 7 x 7 Gram matrix inverted once.
 */
export const SLOW_PART_DEGREE = 6;
const Q = SLOW_PART_DEGREE + 1;
/** Below this segment length the correction is off (gap 0): too few samples per fitted term. */
const MIN_LENGTH = 64;

export class SlowPart {
  readonly enabled: boolean;
  private readonly n: number;
  private readonly mid: number;
  /** sum_i u_i^k and sum_i (i - mid) u_i^k. */
  private readonly s = new Float64Array(Q);
  private readonly t = new Float64Array(Q);
  private readonly gInv = new Float64Array(Q * Q);
  /** sum_i a_i u_i^(j+k). */
  private readonly mW = new Float64Array(Q * Q);
  /** q/n - sum a_i h_i: the white-noise expectation of the rest's gap per unit variance. */
  readonly leverageGap: number;
  private readonly m = new Float64Array(Q);
  private readonly beta = new Float64Array(Q);

  constructor(n: number, window: Float64Array) {
    this.n = n;
    this.mid = (n - 1) / 2;
    this.enabled = n >= MIN_LENGTH;
    if (!this.enabled) {
      this.leverageGap = 0;
      return;
    }
    let sw2 = 0;
    for (let i = 0; i < n; i++) sw2 += window[i]! * window[i]!;
    const g = new Float64Array(2 * Q - 1);
    const gw = new Float64Array(2 * Q - 1);
    for (let i = 0; i < n; i++) {
      const u = (i - this.mid) / this.mid;
      const a = (window[i]! * window[i]!) / sw2;
      let p = 1;
      for (let k = 0; k < 2 * Q - 1; k++) {
        g[k]! += p;
        gw[k]! += a * p;
        if (k < Q) {
          this.s[k]! += p;
          this.t[k]! += (i - this.mid) * p;
        }
        p *= u;
      }
    }
    const gm = new Float64Array(Q * Q);
    for (let j = 0; j < Q; j++)
      for (let k = 0; k < Q; k++) {
        gm[j * Q + k] = g[j + k]!;
        this.mW[j * Q + k] = gw[j + k]!;
      }
    invert(gm, this.gInv, Q);
    let ah = 0;
    const v = new Float64Array(Q);
    for (let i = 0; i < n; i++) {
      const u = (i - this.mid) / this.mid;
      let p = 1;
      for (let k = 0; k < Q; k++) {
        v[k] = p;
        p *= u;
      }
      let h = 0;
      for (let j = 0; j < Q; j++) {
        let r = 0;
        for (let k = 0; k < Q; k++) r += this.gInv[j * Q + k]! * v[k]!;
        h += v[j]! * r;
      }
      ah += ((window[i]! * window[i]!) / sw2) * h;
    }
    this.leverageGap = Q / n - ah;
  }

  /**
   * Expected W(d) - P(d) of one segment d_i = x_i - offset - slope (i - mid): the slow part's exact gap plus the
   * rest's white-noise expectation. `plain` is P(d).
   */
  gap(x: Float64Array, offset: number, slope: number, plain: number): number {
    if (!this.enabled) return 0;
    const n = this.n;
    const mid = this.mid;
    const inv = 1 / mid;
    let m0 = 0;
    let m1 = 0;
    let m2 = 0;
    let m3 = 0;
    let m4 = 0;
    let m5 = 0;
    let m6 = 0;
    // Samples i and n-1-i sit at u and -u: their sum carries the even powers, their difference the odd ones.
    const half = n >> 1;
    for (let i = 0; i < half; i++) {
      const u = (i - mid) * inv;
      const u2 = u * u;
      const a = x[i]!;
      const b = x[n - 1 - i]!;
      let e = a + b;
      let o = (a - b) * u;
      m0 += e;
      m1 += o;
      e *= u2;
      o *= u2;
      m2 += e;
      m3 += o;
      e *= u2;
      o *= u2;
      m4 += e;
      m5 += o;
      m6 += e * u2;
    }
    if (n & 1) m0 += x[half]!;
    const m = this.m;
    m[0] = m0;
    m[1] = m1;
    m[2] = m2;
    m[3] = m3;
    m[4] = m4;
    m[5] = m5;
    m[6] = m6;
    for (let k = 0; k < Q; k++) m[k] = m[k]! - offset * this.s[k]! - slope * this.t[k]!;
    const b = this.beta;
    let ps = 0;
    for (let j = 0; j < Q; j++) {
      let r = 0;
      for (let k = 0; k < Q; k++) r += this.gInv[j * Q + k]! * m[k]!;
      b[j] = r;
      ps += r * m[j]!;
    }
    ps /= n;
    let ws = 0;
    for (let j = 0; j < Q; j++) {
      let r = 0;
      for (let k = 0; k < Q; k++) r += this.mW[j * Q + k]! * b[k]!;
      ws += b[j]! * r;
    }
    const rest = (Math.max(0, plain - ps) * n) / (n - Q);
    return ws - ps + rest * this.leverageGap;
  }
}

/** Gauss-Jordan inverse with partial pivoting of the q x q matrix a (overwritten) into out. */
function invert(a: Float64Array, out: Float64Array, q: number): void {
  out.fill(0);
  for (let i = 0; i < q; i++) out[i * q + i] = 1;
  for (let c = 0; c < q; c++) {
    let piv = c;
    for (let r = c + 1; r < q; r++) if (Math.abs(a[r * q + c]!) > Math.abs(a[piv * q + c]!)) piv = r;
    if (piv !== c)
      for (let k = 0; k < q; k++) {
        [a[c * q + k], a[piv * q + k]] = [a[piv * q + k]!, a[c * q + k]!];
        [out[c * q + k], out[piv * q + k]] = [out[piv * q + k]!, out[c * q + k]!];
      }
    const d = a[c * q + c]!;
    for (let k = 0; k < q; k++) {
      a[c * q + k] = a[c * q + k]! / d;
      out[c * q + k] = out[c * q + k]! / d;
    }
    for (let r = 0; r < q; r++) {
      if (r === c) continue;
      const f = a[r * q + c]!;
      if (f === 0) continue;
      for (let k = 0; k < q; k++) {
        a[r * q + k] = a[r * q + k]! - f * a[c * q + k]!;
        out[r * q + k] = out[r * q + k]! - f * out[c * q + k]!;
      }
    }
  }
}
