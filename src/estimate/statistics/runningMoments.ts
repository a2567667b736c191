/**
 * Running moments of a sample stream in one pass. Power sums of d = x - K are kept, with the shift K
 * set to the mean of the first block, so the sums stay small whatever the offset (the "shifted data"
 * algorithm; Chan, Golub & LeVeque 1983, "Algorithms for computing the sample variance", The American
 * Statistician 37(3):242-247). Each block's sums are formed apart and then added, which bounds the
 * rounding. Central moments follow from the power sums (Pébay 2008, Sandia SAND2008-6212, eq. 1.1).
 * A co-moment with the sample index gives the residual after a least-squares line. Non-finite samples
 * are counted and left out of every moment.
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

const [N, NONFINITE, S1, S2, S3, S4, ST, STT, STD, MIN, MAX, AT_MIN, AT_MAX, SUMS] = [
  0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13,
] as const;

/**
 * The hot loop, kept apart from the class so the engine optimises it as a plain function over arrays:
 * power sums of x - shift, block-relative index sums, extremes. Min/max/at* come in and go out in `b`.
 */
function blockSums(x: Float64Array, count: number, shift: number, b: Float64Array): void {
  let n = 0;
  let bad = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  let s4 = 0;
  // The index sums over the finite samples: those of every index (closed forms) less the non-finite ones'. In a block
  // of up to EXACT_INDEX_SUMS all are integers below 2^53, so this is exactly the sum taken sample by sample, with
  // two fewer chains in the loop; a longer block sums them sample by sample after it (indexSums).
  let stBad = 0;
  let sttBad = 0;
  let std = 0;
  let min = b[MIN]!;
  let max = b[MAX]!;
  let atMin = b[AT_MIN]!;
  let atMax = b[AT_MAX]!;
  for (let i = 0; i < count; i++) {
    const v = x[i]!;
    if (v - v !== 0) {
      bad++;
      stBad += i;
      sttBad += i * i;
      continue;
    }
    const d = v - shift;
    const d2 = d * d;
    n++;
    s1 += d;
    s2 += d2;
    s3 += d2 * d;
    s4 += d2 * d2;
    std += i * d;
    if (v < min) {
      min = v;
      atMin = 1;
    } else if (v === min) atMin++;
    if (v > max) {
      max = v;
      atMax = 1;
    } else if (v === max) atMax++;
  }
  b[N] = n;
  b[NONFINITE] = bad;
  b[S1] = s1;
  b[S2] = s2;
  b[S3] = s3;
  b[S4] = s4;
  if (count <= EXACT_INDEX_SUMS) {
    b[ST] = (count * (count - 1)) / 2 - stBad;
    b[STT] = ((count - 1) * count * (2 * count - 1)) / 6 - sttBad;
  } else indexSums(x, count, b);
  b[STD] = std;
  b[MIN] = min;
  b[MAX] = max;
  b[AT_MIN] = atMin;
  b[AT_MAX] = atMax;
}

/** Up to this block length every index sum (and the closed forms' products) is an integer below 2^53. */
const EXACT_INDEX_SUMS = 1 << 17;

/** The index sums of a longer block sample by sample, as they always were: the same rounding, so the same bits. */
function indexSums(x: Float64Array, count: number, b: Float64Array): void {
  let st = 0;
  let stt = 0;
  for (let i = 0; i < count; i++) {
    const v = x[i]!;
    if (v - v !== 0) continue;
    const t = i + 0.0;
    st += t;
    stt += t * t;
  }
  b[ST] = st;
  b[STT] = stt;
}

// A few short calls at load time give every line of blockSums type feedback (V8 allocates feedback only
// after several calls). Without them, the engine's on-stack compilation of the first long call reaches
// the stores after the loop with none, and in about one run in four that compiled loop is entered and
// thrown away again on every later call: 0.5 s lost on 10 M samples ("insufficient type feedback for
// generic keyed access" under node --trace-deopt).
for (let i = 0; i < 32; i++) blockSums(new Float64Array(2), 2, 0, new Float64Array(SUMS));

export class RunningMoments {
  private n = 0;
  private nonFinite = 0;
  private shift = NaN;
  private s1 = 0;
  private s2 = 0;
  private s3 = 0;
  private s4 = 0;
  private st = 0;
  private stt = 0;
  private std = 0;
  private min = Infinity;
  private max = -Infinity;
  private atMin = 0;
  private atMax = 0;
  /** Index of the next sample in the whole record. */
  private index = 0;

  private readonly sums = new Float64Array(SUMS);

  push(x: Float64Array, count = x.length): void {
    if (Number.isNaN(this.shift)) {
      let s = 0;
      let m = 0;
      for (let i = 0; i < count; i++) {
        const v = x[i]!;
        if (v - v === 0) {
          s += v;
          m++;
        }
      }
      if (m > 0) this.shift = s / m;
    }
    const b = this.sums;
    b[MIN] = this.min;
    b[MAX] = this.max;
    b[AT_MIN] = this.atMin;
    b[AT_MAX] = this.atMax;
    blockSums(x, count, Number.isNaN(this.shift) ? 0 : this.shift, b);
    // Block-relative index sums, shifted to the record's index.
    const n = b[N]!;
    const base = this.index;
    this.n += n;
    this.nonFinite += b[NONFINITE]!;
    this.s1 += b[S1]!;
    this.s2 += b[S2]!;
    this.s3 += b[S3]!;
    this.s4 += b[S4]!;
    this.st += b[ST]! + base * n;
    this.stt += b[STT]! + 2 * base * b[ST]! + base * base * n;
    this.std += b[STD]! + base * b[S1]!;
    this.min = b[MIN]!;
    this.max = b[MAX]!;
    this.atMin = b[AT_MIN]!;
    this.atMax = b[AT_MAX]!;
    this.index += count;
  }

  /** Central sums M2, M3, M4 and the mean, from the shifted power sums. */
  private central(): { mean: number; m2: number; m3: number; m4: number } {
    const n = this.n;
    const m = this.s1 / n;
    const m2 = Math.max(0, this.s2 - n * m * m);
    const m3 = this.s3 - 3 * m * this.s2 + 2 * n * m * m * m;
    const m4 = this.s4 - 4 * m * this.s3 + 6 * m * m * this.s2 - 3 * n * m * m * m * m;
    return { mean: this.shift + m, m2, m3, m4 };
  }

  /** Mean square after removing nothing, the record's mean, or its least-squares line. */
  residualMeanSquare(detrend: "none" | "mean" | "linear"): number {
    const n = this.n;
    if (n === 0) return NaN;
    const { mean, m2 } = this.central();
    if (detrend === "none") return mean * mean + m2 / n;
    const tM2 = this.stt - (this.st * this.st) / n;
    if (detrend === "mean" || !(tM2 > 0)) return m2 / n;
    const cTx = this.std - (this.st * this.s1) / n;
    return Math.max(0, m2 - (cTx * cTx) / tM2) / n;
  }

  result(): SampleStatistics {
    const n = this.n;
    const c = n > 0 ? this.central() : { mean: NaN, m2: NaN, m3: NaN, m4: NaN };
    const variance = c.m2 / n;
    const std = Math.sqrt(variance);
    const peak = Math.max(Math.abs(this.max - c.mean), Math.abs(this.min - c.mean));
    return {
      count: n,
      nonFinite: this.nonFinite,
      mean: c.mean,
      rms: Math.sqrt(c.mean * c.mean + variance),
      std,
      min: n > 0 ? this.min : NaN,
      max: n > 0 ? this.max : NaN,
      crestFactor: std > 0 ? peak / std : NaN,
      skewness: c.m2 > 0 ? (Math.sqrt(n) * c.m3) / Math.pow(c.m2, 1.5) : NaN,
      kurtosis: c.m2 > 0 ? (n * c.m4) / (c.m2 * c.m2) : NaN,
      atMin: this.atMin,
      atMax: this.atMax,
    };
  }
}
