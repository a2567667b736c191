/**
 * The samples before a record's first one, predicted from its start: what a weighting filter settles on so that its
 * state at x[0] is that of a record already running (bilinearBiquads.ts, BiquadCascade).
 *
 * An autoregressive model x[n] + a_1 x[n-1] + ... + a_p x[n-p] = e[n] is fitted to the start by Burg's method
 * (J. P. Burg, 1967; the recursion as in S. M. Kay, Modern Spectral Estimation, 1988, ch. 7, from memory): each stage's
 * reflection coefficient k = -2 sum f b / (sum f^2 + sum b^2) minimises the forward and backward prediction errors
 * together, so |k| <= 1 and the model is stable. The criterion is the same read forwards or backwards, so the one
 * model predicts backwards too: x[-j] = -(a_1 x[-j+1] + ... + a_p x[-j+p]). What the start holds that is predictable
 * (a sine at any phase, a body bounce, an engine's tone, a slope) is continued into the past with its phase; what is not
 * (noise) fades to the level the caller removed. A sine is continued exactly (checked in
 * tests/weight/startPrediction.test.ts), and the past joins x[0] without the jump an odd reflection about the start's
 * mean leaves (2 (m - x[0])), which rang the 0.4 Hz band limit: a 1 Hz sine starting at its crest read +175 % in crest
 * factor and +19 % in MTVV through Wk.
 */

/** Burg's AR(order) coefficients a_1..a_order of x (x[n] + sum a_k x[n-k] = e[n]). Needs x.length > order + 1. */
export function burgCoefficients(x: Float64Array, order: number): Float64Array {
  const n = x.length;
  const a = new Float64Array(order);
  const prev = new Float64Array(order);
  // Forward errors f[i] = f_m(i + 1 + m), backward errors b[i] = b_m(i + m): m = 0 at the start.
  const f = x.slice(1);
  const b = x.slice(0, n - 1);
  let len = n - 1;
  for (let m = 0; m < order && len > 1; m++) {
    let num = 0;
    let den = 0;
    for (let i = 0; i < len; i++) {
      num += f[i]! * b[i]!;
      den += f[i]! * f[i]! + b[i]! * b[i]!;
    }
    const k = den > 0 ? (-2 * num) / den : 0;
    prev.set(a.subarray(0, m));
    for (let i = 0; i < m; i++) a[i] = prev[i]! + k * prev[m - 1 - i]!;
    a[m] = k;
    // Next stage, in place: b'[i] = b[i] + k f[i], f'[i] = f[i + 1] + k b[i + 1] (b[i + 1] not yet updated).
    for (let i = 0; i < len - 1; i++) {
      const fi = f[i]!;
      b[i] = b[i]! + k * fi;
      f[i] = f[i + 1]! + k * b[i + 1]!;
    }
    len--;
  }
  return a;
}

/**
 * The `count` samples before x[0], in time order (out[count - 1] is x[-1]), predicted backwards by Burg's AR(order)
 * model of x. Returns false (out untouched beyond what was written) when the model cannot be fitted (x too short) or the
 * prediction leaves the range a stable model can reach (non-finite, or beyond 10 x the start's largest |x|).
 */
export function predictBefore(x: Float64Array, order: number, count: number, out: Float64Array): boolean {
  const p = Math.min(order, Math.floor((x.length - 1) / 3));
  if (p < 2 || count < 1) return false;
  const a = burgCoefficients(x, p);
  let big = 0;
  for (let i = 0; i < x.length; i++) big = Math.max(big, Math.abs(x[i]!));
  const bound = 10 * big;
  // buf[count + i] = x[i] for i < p; buf[j] for j < count are the predictions, the earliest first.
  const buf = new Float64Array(count + p);
  buf.set(x.subarray(0, p), count);
  for (let j = count - 1; j >= 0; j--) {
    let s = 0;
    for (let k = 0; k < p; k++) s -= a[k]! * buf[j + 1 + k]!;
    if (!(Math.abs(s) <= bound)) return false;
    buf[j] = s;
  }
  out.set(buf.subarray(0, count));
  return true;
}
