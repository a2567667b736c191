/**
 * Running moments of a sample stream, one pass, merged block by block: two passes inside a block,
 * then the pairwise update of Chan, Golub & LeVeque (1979, "Updating formulae and a pairwise algorithm
 * for computing sample variances", Stanford CS report STAN-CS-79-773) extended to the third and fourth
 * central moments and to a co-moment with the sample index (Pébay 2008, "Formulas for robust, one-pass
 * parallel computation of covariances and arbitrary-order statistical moments", Sandia SAND2008-6212).
 * Non-finite samples are counted and left out of every moment.
 */
export interface SampleStatistics {
  /** Finite samples used. */
  count: number;
  /** NaN or infinite samples (left out of every figure). */
  nonFinite: number;
  mean: number;
  /** sqrt(mean of x^2), mean included. */
  rms: number;
  /** Population standard deviation (divides by n). */
  std: number;
  min: number;
  max: number;
  /** max |x - mean| / std. */
  crestFactor: number;
  /** sqrt(n) M3 / M2^1.5. */
  skewness: number;
  /** Pearson (non-excess) kurtosis n M4 / M2^2; 3 for a Gaussian. */
  kurtosis: number;
  /** Samples equal to the record's minimum and maximum (many means the signal may be clipped). */
  atMin: number;
  atMax: number;
}

export class RunningMoments {
  private n = 0;
  private nonFinite = 0;
  private mean = 0;
  private m2 = 0;
  private m3 = 0;
  private m4 = 0;
  // Sample index moments, for the residual after a least-squares line.
  private tMean = 0;
  private tM2 = 0;
  private cTx = 0;
  private min = Infinity;
  private max = -Infinity;
  private atMin = 0;
  private atMax = 0;
  /** Index of the next sample in the whole record. */
  private index = 0;

  push(x: Float64Array, count = x.length): void {
    let nb = 0;
    let sum = 0;
    let tSum = 0;
    let min = this.min;
    let max = this.max;
    let atMin = this.atMin;
    let atMax = this.atMax;
    const base = this.index;
    for (let i = 0; i < count; i++) {
      const v = x[i]!;
      if (v - v !== 0) {
        this.nonFinite++;
        continue;
      }
      nb++;
      sum += v;
      tSum += base + i;
      if (v < min) {
        min = v;
        atMin = 1;
      } else if (v === min) atMin++;
      if (v > max) {
        max = v;
        atMax = 1;
      } else if (v === max) atMax++;
    }
    this.min = min;
    this.max = max;
    this.atMin = atMin;
    this.atMax = atMax;
    this.index += count;
    if (nb === 0) return;
    const mb = sum / nb;
    const tb = tSum / nb;
    let s2 = 0;
    let s3 = 0;
    let s4 = 0;
    let st2 = 0;
    let stx = 0;
    for (let i = 0; i < count; i++) {
      const v = x[i]!;
      if (v - v !== 0) continue;
      const d = v - mb;
      const d2 = d * d;
      const dt = base + i - tb;
      s2 += d2;
      s3 += d2 * d;
      s4 += d2 * d2;
      st2 += dt * dt;
      stx += dt * d;
    }
    this.merge(nb, mb, s2, s3, s4, tb, st2, stx);
  }

  private merge(nb: number, mb: number, m2b: number, m3b: number, m4b: number, tb: number, t2b: number, cb: number): void {
    const na = this.n;
    if (na === 0) {
      this.n = nb;
      this.mean = mb;
      this.m2 = m2b;
      this.m3 = m3b;
      this.m4 = m4b;
      this.tMean = tb;
      this.tM2 = t2b;
      this.cTx = cb;
      return;
    }
    const n = na + nb;
    const d = mb - this.mean;
    const d2 = d * d;
    const m2a = this.m2;
    const m3a = this.m3;
    this.m4 =
      this.m4 + m4b + (d2 * d2 * na * nb * (na * na - na * nb + nb * nb)) / (n * n * n) +
      (6 * d2 * (na * na * m2b + nb * nb * m2a)) / (n * n) + (4 * d * (na * m3b - nb * m3a)) / n;
    this.m3 = m3a + m3b + (d2 * d * na * nb * (na - nb)) / (n * n) + (3 * d * (na * m2b - nb * m2a)) / n;
    this.m2 = m2a + m2b + (d2 * na * nb) / n;
    const dt = tb - this.tMean;
    this.cTx += cb + (d * dt * na * nb) / n;
    this.tM2 += t2b + (dt * dt * na * nb) / n;
    this.mean += (d * nb) / n;
    this.tMean += (dt * nb) / n;
    this.n = n;
  }

  /** Mean square after removing nothing, the record's mean, or its least-squares line. */
  residualMeanSquare(detrend: "none" | "mean" | "linear"): number {
    if (this.n === 0) return NaN;
    if (detrend === "none") return this.mean * this.mean + this.m2 / this.n;
    if (detrend === "mean" || this.tM2 === 0) return this.m2 / this.n;
    return Math.max(0, this.m2 - (this.cTx * this.cTx) / this.tM2) / this.n;
  }

  result(): SampleStatistics {
    const n = this.n;
    const variance = n > 0 ? this.m2 / n : NaN;
    const std = Math.sqrt(variance);
    const peak = Math.max(Math.abs(this.max - this.mean), Math.abs(this.min - this.mean));
    return {
      count: n,
      nonFinite: this.nonFinite,
      mean: n > 0 ? this.mean : NaN,
      rms: Math.sqrt(this.mean * this.mean + variance),
      std,
      min: n > 0 ? this.min : NaN,
      max: n > 0 ? this.max : NaN,
      crestFactor: std > 0 ? peak / std : NaN,
      skewness: this.m2 > 0 ? (Math.sqrt(n) * this.m3) / Math.pow(this.m2, 1.5) : NaN,
      kurtosis: this.m2 > 0 ? (n * this.m4) / (this.m2 * this.m2) : NaN,
      atMin: this.atMin,
      atMax: this.atMax,
    };
  }
}
