import type { SegmentPower } from "./segmentPower.js";
import { WelchAccumulator, type WelchSettings } from "./welchPsd.js";

/**
 * A spectrogram in bands: the record cut into consecutive stretches, a Welch PSD of each stretch on the
 * same settings as the whole-record PSD (Welch 1967), and each PSD summed into bands, sum P df over the
 * lines with lo <= f < hi, so memory is bands x stretches whatever the segment length. A trailing
 * stretch shorter than the stretch length is left out. Segments do not cross stretch boundaries.
 */
export interface BandSpectrogram {
  stretchS: number;
  /** Start of each stretch, s from the first sample analysed. */
  startS: number[];
  bandsHz: { lo: number; hi: number; centre: number }[];
  /** meanSquare[stretch][band], in the input unit squared. */
  meanSquare: Float64Array[];
  /** Welch averages per stretch. */
  averagesPerStretch: number;
}

export class BandSpectrogramAccumulator {
  private current: WelchAccumulator;
  private fill = 0;
  private readonly rows: Float64Array[] = [];
  private averages = 0;

  constructor(
    private readonly settings: WelchSettings,
    private readonly power: SegmentPower,
    private readonly stretchLength: number,
    private readonly bandsHz: { lo: number; hi: number; centre: number }[],
    private readonly sampleRateHz: number,
  ) {
    if (stretchLength < settings.segmentLength)
      throw new RangeError("a spectrogram stretch must hold at least one segment");
    this.current = new WelchAccumulator(settings, power);
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
    this.averages = sums.segments;
    const df = this.sampleRateHz / this.settings.segmentLength;
    const row = new Float64Array(this.bandsHz.length);
    for (let k = 0; k < sums.psd.length; k++) {
      const f = k * df;
      for (let b = 0; b < this.bandsHz.length; b++)
        if (f >= this.bandsHz[b]!.lo && f < this.bandsHz[b]!.hi) row[b]! += sums.psd[k]! * df;
    }
    this.rows.push(row);
    this.current = new WelchAccumulator(this.settings, this.power);
    this.fill = 0;
  }

  finish(sampleRateHz: number): BandSpectrogram {
    const stretchS = this.stretchLength / sampleRateHz;
    return {
      stretchS,
      startS: this.rows.map((_, i) => i * stretchS),
      bandsHz: this.bandsHz,
      meanSquare: this.rows,
      averagesPerStretch: this.averages,
    };
  }
}

/** One-third-octave bands around nominal centres: centre x 2^(+-1/6) (IEC 61260, common practice). */
export function thirdOctaveBands(centresHz: readonly number[]): { lo: number; hi: number; centre: number }[] {
  const r = 2 ** (1 / 6);
  return centresHz.map((c) => ({ lo: c / r, hi: c * r, centre: c }));
}
