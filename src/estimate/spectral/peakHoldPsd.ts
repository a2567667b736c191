import type { SegmentPower } from "./segmentPower.js";
import { WelchAccumulator, type WelchSettings } from "./welchPsd.js";

/**
 * Peak-hold spectrum of a non-stationary record: the record cut into consecutive stretches, a Welch PSD
 * of each stretch on the same settings as the whole-record PSD (Welch 1967), and at each line the largest
 * of the stretches' levels, with the stretch that holds it. Beside the Welch average of the whole record
 * it shows what the loudest part of the record reached at each frequency (a pothole, a rough stretch of
 * road), which the average spreads over the whole length. A trailing stretch shorter than the stretch
 * length is left out; segments do not cross stretch boundaries. Memory: two spectra, whatever the length.
 *
 * Each stretch's level is itself an estimate with few averages (its chi-square scatter is wide), and the
 * largest of many such estimates lies above every one's true level on a stationary record: on one whose
 * stretches all have the same spectrum the peak-hold sits at the upper tail of the stretch estimates, not
 * at the true level (common practice: read it as "at most this loud", never as a stationary level).
 */
export interface PeakHoldPsd {
  stretchS: number;
  stretches: number;
  /** Welch averages in each stretch (the DOF of a stretch's level is about twice this for Hann at 50 %). */
  averagesPerStretch: number;
  /** Largest stretch level per line, one-sided density in the result unit squared per Hz. */
  psd: Float64Array;
  /** Start of the stretch that holds each line's largest level, s from the first sample analysed. */
  atS: Float64Array;
}

export class PeakHoldPsdAccumulator {
  private current: WelchAccumulator;
  private fill = 0;
  private stretches = 0;
  private averages = 0;
  private readonly max: Float64Array;
  private readonly at: Float64Array;

  constructor(
    private readonly settings: WelchSettings,
    private readonly power: SegmentPower,
    private readonly stretchLength: number,
    private readonly sampleRateHz: number,
  ) {
    if (stretchLength < settings.segmentLength)
      throw new RangeError("a peak-hold stretch must hold at least one segment");
    this.current = new WelchAccumulator(settings, power);
    this.max = new Float64Array(settings.segmentLength / 2 + 1);
    this.at = new Float64Array(this.max.length);
  }

  push(x: Float64Array, frames: number): void {
    let i = 0;
    while (i < frames) {
      const m = Math.min(frames - i, this.stretchLength - this.fill);
      this.current.push(i === 0 && m === x.length ? x : x.subarray(i, i + m), m);
      this.fill += m;
      i += m;
      if (this.fill === this.stretchLength) this.closeStretch();
    }
  }

  private closeStretch(): void {
    const sums = this.current.finish(this.sampleRateHz);
    if (sums.segments > 0) {
      this.averages = sums.segments;
      const startS = (this.stretches * this.stretchLength) / this.sampleRateHz;
      for (let k = 0; k < sums.psd.length; k++) {
        if (this.stretches === 0 || sums.psd[k]! > this.max[k]!) {
          this.max[k] = sums.psd[k]!;
          this.at[k] = startS;
        }
      }
    }
    this.stretches++;
    this.current = new WelchAccumulator(this.settings, this.power);
    this.fill = 0;
  }

  finish(sampleRateHz: number): PeakHoldPsd {
    return {
      stretchS: this.stretchLength / sampleRateHz,
      stretches: this.stretches,
      averagesPerStretch: this.averages,
      psd: this.max,
      atS: this.at,
    };
  }
}
