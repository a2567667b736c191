/**
 * Mean squares of consecutive, non-overlapping stretches of a record (the values a stationarity test
 * looks at; Bendat & Piersol, Random Data, 4th ed. 2010, sec. 10.3). Each value is the mean square about
 * the stretch's own mean, so a steady offset (gravity, sensor bias) does not hide a change in level; the
 * sums are shifted by the stretch's first sample to keep them small (Chan, Golub & LeVeque 1983).
 * A trailing part shorter than a stretch is left out. Non-finite samples are left out of their stretch.
 * Memory: one number per stretch (3600 for an hour in 1 s stretches).
 */
export class StretchMeanSquares {
  private readonly values: number[] = [];
  private readonly stretchMeans: number[] = [];
  private n = 0;
  private seen = 0;
  private shift = NaN;
  private s1 = 0;
  private s2 = 0;

  constructor(readonly stretchLength: number) {
    if (!(Number.isInteger(stretchLength) && stretchLength >= 2))
      throw new RangeError(`stretch of ${stretchLength} samples: needs a whole number >= 2`);
  }

  push(x: Float64Array, frames: number): void {
    const len = this.stretchLength;
    let i = 0;
    while (i < frames) {
      const end = Math.min(frames, i + (len - this.seen));
      let s1 = this.s1;
      let s2 = this.s2;
      let n = this.n;
      let shift = this.shift;
      this.seen += end - i;
      if (shift !== shift) {
        // The shift is the stretch's first finite sample.
        while (i < end && x[i]! - x[i]! !== 0) i++;
        if (i < end) shift = x[i]!;
      }
      for (; i < end; i++) {
        const d = x[i]! - shift;
        if (d - d === 0) {
          s1 += d;
          s2 += d * d;
          n++;
        }
      }
      if (this.seen === len) {
        // Mean square about the stretch mean: (S2 - S1^2 / n) / n.
        this.values.push(n > 0 ? Math.max(0, s2 - (s1 * s1) / n) / n : NaN);
        this.stretchMeans.push(n > 0 ? shift + s1 / n : NaN);
        s1 = 0;
        s2 = 0;
        n = 0;
        shift = NaN;
        this.seen = 0;
      }
      this.s1 = s1;
      this.s2 = s2;
      this.n = n;
      this.shift = shift;
    }
  }

  /** The complete stretches' means so far (NaN for a stretch with no finite sample): a slow drift of the level. */
  means(): Float64Array {
    return Float64Array.from(this.stretchMeans);
  }

  /** The complete stretches' mean squares so far (NaN for a stretch with no finite sample). */
  result(): Float64Array {
    return Float64Array.from(this.values);
  }
}
