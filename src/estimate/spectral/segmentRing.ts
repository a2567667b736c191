/**
 * Welch segmenting for one or several channels in lockstep: samples fill a segment buffer per channel;
 * each time the segments are full, `onFull` runs on them, then they shift by the hop (overlap) or the
 * next `hop - N` samples are dropped (a hop longer than the segment). A trailing partial segment is
 * never handed on, as in scipy.signal.welch. Memory: one segment per channel, whatever the length.
 * Shared by WelchAccumulator (auto spectra) and CrossSpectrumAccumulator (cross spectra).
 */
export class SegmentRing {
  readonly segments: Float64Array[];
  private readonly n: number;
  private readonly hop: number;
  private fill = 0;
  /** Samples still to drop before the next segment starts (hop larger than the segment). */
  private skip = 0;

  constructor(segmentLength: number, hop: number, channels: number) {
    this.n = segmentLength;
    this.hop = hop;
    this.segments = Array.from({ length: channels }, () => new Float64Array(segmentLength));
  }

  /** The next `count` samples of every channel (`blocks[c]` for channel c). */
  push(blocks: readonly Float64Array[], count: number, onFull: () => void): void {
    const chans = this.segments.length;
    let i = 0;
    while (i < count) {
      if (this.skip > 0) {
        const d = Math.min(this.skip, count - i);
        this.skip -= d;
        i += d;
        continue;
      }
      const m = Math.min(this.n - this.fill, count - i);
      for (let c = 0; c < chans; c++) this.segments[c]!.set(blocks[c]!.subarray(i, i + m), this.fill);
      this.fill += m;
      i += m;
      if (this.fill === this.n) {
        onFull();
        if (this.hop < this.n) {
          for (let c = 0; c < chans; c++) this.segments[c]!.copyWithin(0, this.hop, this.n);
          this.fill = this.n - this.hop;
        } else {
          this.fill = 0;
          this.skip = this.hop - this.n;
        }
      }
    }
  }
}

/**
 * One-sided density from a sum of |X[k]|^2 (or of conj(X) Y parts) over `segments` segments:
 * P[k] = 2 sum[k] / (fs sum w^2 K) for 0 < k < N/2, without the 2 at DC and Nyquist (Welch 1967).
 */
export function oneSidedDensity(
  sum: Float64Array,
  sampleRateHz: number,
  sumW2: number,
  segments: number,
): Float64Array {
  const half = sum.length - 1;
  const p = new Float64Array(half + 1);
  if (segments === 0) return p;
  const scale = 1 / (sampleRateHz * sumW2 * segments);
  for (let i = 0; i <= half; i++) p[i] = sum[i]! * scale * (i === 0 || i === half ? 1 : 2);
  return p;
}
