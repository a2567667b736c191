import { SegmentPower } from "./segmentPower.js";
import { oneSidedDensity, SegmentRing } from "./segmentRing.js";
import { SlowPart } from "./slowPart.js";

/**
 * Welch's averaged modified periodogram, accumulated as samples arrive (Welch 1967, IEEE Trans. Audio
 * Electroacoust. AU-15(2):70-73). Memory is one segment buffer, one work buffer and the running sum,
 * whatever the record's length.
 *
 * One-sided density: P[k] = 2 |X[k]|^2 / (fs sum w^2) for 0 < k < N/2, and without the factor 2 at
 * k = 0 and k = N/2 (DC and Nyquist are not mirrored), so sum(P) df equals the window-weighted mean
 * square. Segments start every `hop` samples; a trailing partial segment is dropped, as in
 * scipy.signal.welch. Each segment is detrended (none, mean, least-squares line) before windowing.
 */
export type Detrend = "none" | "mean" | "linear";
export const DETREND_NAMES: readonly Detrend[] = ["none", "mean", "linear"];

export interface WelchSettings {
  segmentLength: number;
  hop: number;
  window: Float64Array;
  detrend: Detrend;
}

export interface WelchSums {
  /** Segments averaged. */
  segments: number;
  /** Segments left out because they held a non-finite sample. */
  skippedSegments: number;
  /** Samples seen. */
  samples: number;
  /** One-sided density, length N/2 + 1, in (input unit)^2/Hz. */
  psd: Float64Array;
  /** Average over segments of sum((detrended x * w)^2) / sum(w^2): what sum(P) df must equal exactly. */
  windowedMeanSquare: number;
  /** Average over segments of the plain mean square of the detrended segment (no window). */
  segmentMeanSquare: number;
  /**
   * Average over segments of the windowed-minus-plain mean square that each segment's own shape explains (its
   * slow part, weighed by the window and plainly, and the fit's leverage; slowPart.ts): what windowedMeanSquare
   * - segmentMeanSquare is expected to be. 0 for segments shorter than 64.
   */
  expectedGap: number;
  /**
   * Standard error of windowedMeanSquare - segmentMeanSquare from the record itself, by batch means over
   * consecutive segments (so overlap and slow correlation are in it); NaN with fewer than 4 batches.
   */
  meanSquareGapError: number;
  /** Batches behind meanSquareGapError (and slowGapError). */
  meanSquareGapBatches: number;
  /** The same for windowedMeanSquare - segmentMeanSquare - expectedGap. */
  slowGapError: number;
  /**
   * Amplitude figures of the detrended segments (so drift slower than the first line is not in them):
   * Pearson kurtosis and the crest factor max |d| / rms(d), over the segments that tile the record (with
   * 50 % overlap every other one), so each sample counts once. With detrend "none", about each segment's mean.
   */
  detrendedKurtosis: number;
  detrendedCrestFactor: number;
}

const MAX_BATCHES = 64;

/**
 * Batch means of a stream of per-segment values in bounded memory: at most MAX_BATCHES batches; when
 * they are full, neighbours merge and the batch size doubles (batch means method: Schmeiser 1982,
 * Operations Research 30(3):556-568). The spread of the batch means estimates the standard error of
 * the overall mean even when neighbouring values are correlated, as overlapping segments are.
 */
class BatchMeans {
  private readonly sums = new Float64Array(MAX_BATCHES);
  private size = 1;
  private full = 0;
  private partial = 0;
  private partialCount = 0;

  push(v: number): void {
    this.partial += v;
    this.partialCount++;
    if (this.partialCount < this.size) return;
    this.sums[this.full++] = this.partial;
    this.partial = 0;
    this.partialCount = 0;
    if (this.full === MAX_BATCHES) {
      for (let i = 0; i < MAX_BATCHES / 2; i++) this.sums[i] = this.sums[2 * i]! + this.sums[2 * i + 1]!;
      this.full = MAX_BATCHES / 2;
      this.size *= 2;
    }
  }

  /** Standard error of the mean of all values pushed, from the complete batches; NaN below 4. */
  standardError(): { error: number; batches: number } {
    const b = this.full;
    if (b < 4) return { error: NaN, batches: b };
    let m = 0;
    for (let i = 0; i < b; i++) m += this.sums[i]! / this.size;
    m /= b;
    let v = 0;
    for (let i = 0; i < b; i++) v += (this.sums[i]! / this.size - m) ** 2;
    return { error: Math.sqrt(v / (b - 1) / b), batches: b };
  }
}

export class WelchAccumulator {
  private readonly n: number;
  private readonly hop: number;
  private readonly window: Float64Array;
  private readonly detrend: Detrend;
  private readonly power: SegmentPower;
  private readonly ring: SegmentRing;
  private readonly one: Float64Array[] = [new Float64Array(0)];
  private readonly onFull = () => this.processSegment();
  private readonly sum: Float64Array;
  private readonly sumW2: number;
  /** Sum of squares of the current segment, written by sumOf. */
  private readonly sq = new Float64Array(1);
  private segments = 0;
  private skipped = 0;
  private samples = 0;
  private weightedMs = 0;
  private plainMs = 0;
  private fourth = 0;
  private peak = 0;
  private tiled = 0;
  private tiledPlain = 0;
  /** Every tileStride-th segment starts where the last one ended (N / hop, at least 1). */
  private readonly tileStride: number;
  private readonly gaps = new BatchMeans();
  private readonly slowGaps = new BatchMeans();
  private readonly slow: SlowPart;
  private expected = 0;

  /** `power` may be shared by the accumulators of one segment length (it holds only scratch space). */
  constructor(settings: WelchSettings, power?: SegmentPower) {
    this.n = settings.segmentLength;
    this.hop = settings.hop;
    this.window = settings.window;
    this.detrend = settings.detrend;
    this.power = power ?? new SegmentPower(this.n);
    if (this.power.size !== this.n || this.window.length !== this.n)
      throw new RangeError("window, FFT and segment length differ");
    this.ring = new SegmentRing(this.n, this.hop, 1);
    this.tileStride = Math.max(1, Math.floor(this.n / this.hop));
    this.sum = new Float64Array(this.n / 2 + 1);
    let s = 0;
    for (let i = 0; i < this.n; i++) s += this.window[i]! * this.window[i]!;
    this.sumW2 = s;
    this.slow = new SlowPart(this.n, this.window);
  }

  push(x: Float64Array, count = x.length): void {
    this.samples += count;
    this.one[0] = x;
    this.ring.push(this.one, count, this.onFull);
  }

  private processSegment(): void {
    const n = this.n;
    const x = this.ring.segments[0]!;
    // Sums run on four accumulators: one chain of dependent additions would wait on every add.
    const sum = sumOf(x, n, this.sq);
    if (!Number.isFinite(sum)) {
      this.skipped++;
      return;
    }
    const mean = this.detrend === "none" ? 0 : sum / n;
    let slope = 0;
    const mid = (n - 1) / 2;
    if (this.detrend === "linear") {
      // Least-squares line on the sample index: slope = sum (i - mid) x_i / sum (i - mid)^2.
      let a = 0;
      let b = 0;
      let i = 0;
      for (; i + 1 < n; i += 2) {
        a += (i - mid) * x[i]!;
        b += (i + 1 - mid) * x[i + 1]!;
      }
      for (; i < n; i++) a += (i - mid) * x[i]!;
      slope = (a + b) / ((n * (n * n - 1)) / 12);
    }
    // y[i] = (x[i] - mean - slope (i - mid)) w[i], applied as the kernel loads the segment.
    const ms = this.power.add(x, this.window, mean - slope * mid, slope, this.sum);
    // Plain residual mean square of the same detrended segment: sum x^2 - n mean^2 - slope^2 sum (i - mid)^2;
    // and its fourth power and peak, for the amplitude gates.
    const plain = Math.max(0, this.sq[0]! - n * mean * mean - (slope * slope * (n * (n * n - 1))) / 12) / n;
    // Amplitude figures from segments that tile the record (every stride-th one): each sample once. They are
    // taken about the segment's mean even with detrend "none": the gates ask whether the motion is Gaussian, and an
    // offset (gravity, 1 g on 0.09 g of motion) made a clean record's crest factor 1.3, read as clipping.
    if (this.segments % this.tileStride === 0) {
      const centre = this.detrend === "none" ? sum / n : mean;
      this.fourthAndPeak(x, centre - slope * mid, slope);
      this.tiledPlain += this.detrend === "none" ? Math.max(0, this.sq[0]! - n * centre * centre) / n : plain;
      this.tiled++;
    }
    this.weightedMs += ms / this.sumW2;
    this.plainMs += plain;
    const expected = this.slow.gap(x, mean, slope, plain);
    this.expected += expected;
    this.gaps.push(ms / this.sumW2 - plain);
    this.slowGaps.push(ms / this.sumW2 - plain - expected);
    this.segments++;
  }

  /**
   * Sum of d^4 and the largest |d| for d = x - (offset + slope i), one pass over the segment. Branch-free
   * (Math.max / Math.min, no sign test: a branch on random data costs more than the pass), two chains.
   */
  private fourthAndPeak(x: Float64Array, offset: number, slope: number): void {
    const n = this.n;
    let s4a = 0;
    let s4b = 0;
    let hi = -Infinity;
    let lo = Infinity;
    let i = 0;
    for (; i + 1 < n; i += 2) {
      const d0 = x[i]! - offset - slope * i;
      const d1 = x[i + 1]! - offset - slope * (i + 1);
      const q0 = d0 * d0;
      const q1 = d1 * d1;
      s4a += q0 * q0;
      s4b += q1 * q1;
      hi = Math.max(hi, d0, d1);
      lo = Math.min(lo, d0, d1);
    }
    for (; i < n; i++) {
      const d = x[i]! - offset - slope * i;
      s4a += d * d * d * d;
      hi = Math.max(hi, d);
      lo = Math.min(lo, d);
    }
    this.fourth += (s4a + s4b) / n;
    this.peak = Math.max(this.peak, hi, -lo);
  }

  finish(sampleRateHz: number): WelchSums {
    const k = this.segments;
    const gap = this.gaps.standardError();
    const psd = oneSidedDensity(this.sum, sampleRateHz, this.sumW2, k);
    return {
      segments: k,
      skippedSegments: this.skipped,
      samples: this.samples,
      psd,
      windowedMeanSquare: k > 0 ? this.weightedMs / k : NaN,
      segmentMeanSquare: k > 0 ? this.plainMs / k : NaN,
      expectedGap: k > 0 ? this.expected / k : NaN,
      meanSquareGapError: gap.error,
      meanSquareGapBatches: gap.batches,
      slowGapError: this.slowGaps.standardError().error,
      detrendedKurtosis:
        this.tiled > 0 && this.tiledPlain > 0 ? this.fourth / this.tiled / (this.tiledPlain / this.tiled) ** 2 : NaN,
      detrendedCrestFactor:
        this.tiled > 0 && this.tiledPlain > 0 ? this.peak / Math.sqrt(this.tiledPlain / this.tiled) : NaN,
    };
  }
}

/** Sum of x[0..n), on four accumulators; the sum of squares goes to sq[0]. */
function sumOf(x: Float64Array, n: number, sq: Float64Array): number {
  let a = 0;
  let b = 0;
  let c = 0;
  let d = 0;
  let qa = 0;
  let qb = 0;
  let i = 0;
  for (; i + 3 < n; i += 4) {
    const x0 = x[i]!;
    const x1 = x[i + 1]!;
    const x2 = x[i + 2]!;
    const x3 = x[i + 3]!;
    a += x0;
    b += x1;
    c += x2;
    d += x3;
    qa += x0 * x0 + x2 * x2;
    qb += x1 * x1 + x3 * x3;
  }
  for (; i < n; i++) {
    a += x[i]!;
    qa += x[i]! * x[i]!;
  }
  sq[0] = qa + qb;
  return a + b + (c + d);
}
