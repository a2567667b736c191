/**
 * Streaming amplitude histogram. The bin grid is fixed from the first block (mean +- 10 standard
 * deviations of that block, 400 bins), so the record is read once; samples beyond it are counted as
 * under- and overflow. `densityAround` regroups the fine bins for display around the final mean.
 */
export interface AmplitudeHistogram {
  /** Left edge of every display bin, then the right edge of the last: length bins + 1. */
  edges: number[];
  /** Probability density of the samples in each display bin (count / (n * width)). */
  density: number[];
  underflow: number;
  overflow: number;
  count: number;
}

const FINE_BINS = 400;

export class HistogramAccumulator {
  private lo = NaN;
  private width = NaN;
  private readonly counts = new Float64Array(FINE_BINS);
  private under = 0;
  private over = 0;
  private n = 0;

  push(x: Float64Array, count = x.length): void {
    if (Number.isNaN(this.lo)) {
      let s = 0;
      let s2 = 0;
      let m = 0;
      for (let i = 0; i < count; i++) {
        const v = x[i]!;
        if (v - v !== 0) continue;
        s += v;
        s2 += v * v;
        m++;
      }
      if (m === 0) return;
      const mean = s / m;
      const sd = Math.sqrt(Math.max(s2 / m - mean * mean, 0)) || Math.abs(mean) || 1;
      this.lo = mean - 10 * sd;
      this.width = (20 * sd) / FINE_BINS;
    }
    const lo = this.lo;
    const inv = 1 / this.width;
    const c = this.counts;
    for (let i = 0; i < count; i++) {
      const v = x[i]!;
      if (v - v !== 0) continue;
      const b = Math.floor((v - lo) * inv);
      if (b < 0) this.under++;
      else if (b >= FINE_BINS) this.over++;
      else c[b]!++;
      this.n++;
    }
  }

  /** Display bins of about `sd / 4` covering mean +- 5 sd (the final statistics). */
  densityAround(mean: number, sd: number): AmplitudeHistogram {
    const empty = { edges: [], density: [], underflow: this.under, overflow: this.over, count: this.n };
    if (this.n === 0 || !(sd > 0) || Number.isNaN(this.lo)) return empty;
    const group = Math.max(1, Math.round(sd / 4 / this.width));
    const first = Math.max(0, Math.floor((mean - 5 * sd - this.lo) / this.width));
    const last = Math.min(FINE_BINS, Math.ceil((mean + 5 * sd - this.lo) / this.width));
    const edges: number[] = [];
    const density: number[] = [];
    for (let b = first; b < last; b += group) {
      const e = Math.min(last, b + group);
      let s = 0;
      for (let k = b; k < e; k++) s += this.counts[k]!;
      edges.push(this.lo + b * this.width);
      density.push(s / (this.n * (e - b) * this.width));
    }
    edges.push(this.lo + last * this.width);
    return { edges, density, underflow: this.under, overflow: this.over, count: this.n };
  }
}
