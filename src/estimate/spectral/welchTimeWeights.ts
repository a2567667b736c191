/**
 * The mean square of a signal as a Welch average sees it. Welch's estimate (Welch 1967) integrates to
 * sum_k P_k df = (1 / (K sum w^2)) sum_n c[n] x[n]^2 (no detrending), where K is the number of segments and
 * c[n] = sum over the segments k that hold sample n of w[n - k hop]^2: a sample's weight in the average.
 * Inside the record c is periodic in the hop (constant for a periodic Hann window at 75 % overlap, the
 * constant-overlap-add property of w^2); the first and last segment's worth taper, and samples past the
 * last whole segment get none. On a stationary record that changes nothing; on a non-stationary one
 * (quiet ends, a loud middle) the PSD's mean square differs from the plain time average. This accumulator
 * gives the time-domain value with Welch's weights, so a PSD-route figure can be checked like for like.
 * Memory: the window's weights and a ring of one segment plus one hop of squared samples.
 */
export class WelchWeightedMeanSquare {
  private readonly n: number;
  private readonly hop: number;
  private readonly w2: Float64Array;
  private readonly sumW2: number;
  /** Weight of sample i < N from the segments k >= 0 that hold it. */
  private readonly startWeight: Float64Array;
  /** Weight of sample i >= N: periodic in the hop. */
  private readonly periodicWeight: Float64Array;
  private readonly ring: Float64Array;
  private count = 0;
  private sum = 0;

  constructor(window: Float64Array, hop: number) {
    this.n = window.length;
    this.hop = hop;
    this.w2 = Float64Array.from(window, (v) => v * v);
    this.sumW2 = this.w2.reduce((a, b) => a + b, 0);
    this.startWeight = new Float64Array(this.n);
    for (let i = 0; i < this.n; i++) for (let k = 0; k * hop <= i; k++) this.startWeight[i]! += this.w2[i - k * hop]!;
    this.periodicWeight = new Float64Array(hop);
    for (let j = 0; j < hop; j++) {
      // Sample i = N + j (any i >= N with the same phase) lies in segments starting at i - m for m = i - k hop in [0,
      // N).
      const i = this.n + j;
      for (let k = Math.ceil((i - this.n + 1) / hop); k * hop <= i; k++)
        this.periodicWeight[j]! += this.w2[i - k * hop]!;
    }
    this.ring = new Float64Array(this.n + hop);
  }

  private weight(i: number): number {
    return i < this.n ? this.startWeight[i]! : this.periodicWeight[(i - this.n) % this.hop]!;
  }

  push(x: Float64Array, frames: number): void {
    const ringLen = this.ring.length;
    for (let f = 0; f < frames; f++) {
      const v = x[f]!;
      const q = v * v;
      const i = this.count++;
      this.sum += this.weight(i) * q;
      this.ring[i % ringLen] = q;
    }
  }

  /** Segments Welch averaged for this many samples, and the mean square with their weights. */
  finish(): { segments: number; meanSquare: number } {
    const total = this.count;
    const segments = total >= this.n ? Math.floor((total - this.n) / this.hop) + 1 : 0;
    if (segments === 0) return { segments, meanSquare: NaN };
    // Correct the tail: samples from K hop on (fewer than N of them, all in the ring) lose the segments that never
    // came.
    const lastStart = (segments - 1) * this.hop;
    let s = this.sum;
    const from = Math.max(0, total - this.ring.length);
    for (let i = from; i < total; i++) {
      let actual = 0;
      for (let k = Math.max(0, Math.ceil((i - this.n + 1) / this.hop)); k * this.hop <= Math.min(i, lastStart); k++)
        actual += this.w2[i - k * this.hop]!;
      s += (actual - this.weight(i)) * this.ring[i % this.ring.length]!;
    }
    return { segments, meanSquare: s / (segments * this.sumW2) };
  }
}
