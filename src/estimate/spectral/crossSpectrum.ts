import { normalizeWelchOptions, type ResolvedWelchOptions, type WelchOptions } from "./welchOptions.js";
import { RealFft } from "./realFft.js";
import { oneSidedDensity, SegmentRing } from "./segmentRing.js";
import type { WelchSettings } from "./welchPsd.js";
import { spectralWindow } from "./windows.js";

/**
 * Welch's method for several channels at once: the auto spectra G_cc of every channel and the cross
 * spectra G_rj = (2 / (fs sum w^2)) E[conj(X_r) X_j] of one reference channel r against each of the
 * others (Bendat & Piersol 2010, Random Data, 4th ed., sec. 11.6; scipy.signal.csd forms the same
 * conj(X) Y, so welch(x) = csd(x, x)).
 *
 * The channels are segmented, detrended and windowed in lockstep, and each channel's segment is
 * transformed once. A segment with a non-finite sample in any channel is left out of every sum, so
 * all spectra average the same segments. Same one-sided scaling as WelchAccumulator: lines
 * 0 < k < N/2 doubled, DC and Nyquist not. The fused auto-spectrum kernel (SegmentPower) stays the
 * fast path for `psd`; this accumulator pays a general real FFT per channel (estimate/spectral/realFft.ts).
 */
export interface CrossSpectrumSums {
  segments: number;
  skippedSegments: number;
  samples: number;
  /** Auto spectra, one per channel in push order, length N/2 + 1, (unit)^2/Hz. */
  auto: Float64Array[];
  /**
   * Cross spectra of the reference channel against channel j (j != reference), real and imaginary parts; undefined at
   * the reference.
   */
  crossRe: (Float64Array | undefined)[];
  crossIm: (Float64Array | undefined)[];
  reference: number;
}

export class CrossSpectrumAccumulator {
  private readonly n: number;
  private readonly hop: number;
  private readonly window: Float64Array;
  private readonly detrend: WelchSettings["detrend"];
  private readonly channels: number;
  private readonly reference: number;
  private readonly fft: RealFft;
  private readonly ring: SegmentRing;
  private readonly onFull = () => this.processSegment();
  private readonly work: Float64Array;
  /** Bins 0..N/2 of each channel's current segment. */
  private readonly specRe: Float64Array[];
  private readonly specIm: Float64Array[];
  private readonly auto: Float64Array[];
  private readonly crossRe: (Float64Array | undefined)[];
  private readonly crossIm: (Float64Array | undefined)[];
  private readonly sumW2: number;
  private segments = 0;
  private skipped = 0;
  private samples = 0;

  constructor(settings: WelchSettings, channels: number, reference = 0) {
    if (!Number.isInteger(channels) || channels < 1)
      throw new RangeError(`channels must be a whole number >= 1, got ${channels}`);
    if (!Number.isInteger(reference) || reference < 0 || reference >= channels)
      throw new RangeError(`reference channel ${reference} out of range`);
    this.n = settings.segmentLength;
    this.hop = settings.hop;
    this.window = settings.window;
    this.detrend = settings.detrend;
    if (this.window.length !== this.n) throw new RangeError("window and segment length differ");
    this.channels = channels;
    this.reference = reference;
    this.fft = new RealFft(this.n);
    const half = this.n / 2 + 1;
    this.ring = new SegmentRing(this.n, this.hop, channels);
    this.work = new Float64Array(this.n);
    this.specRe = Array.from({ length: channels }, () => new Float64Array(half));
    this.specIm = Array.from({ length: channels }, () => new Float64Array(half));
    this.auto = Array.from({ length: channels }, () => new Float64Array(half));
    this.crossRe = Array.from({ length: channels }, (_, j) => (j === reference ? undefined : new Float64Array(half)));
    this.crossIm = Array.from({ length: channels }, (_, j) => (j === reference ? undefined : new Float64Array(half)));
    let s = 0;
    for (let i = 0; i < this.n; i++) s += this.window[i]! * this.window[i]!;
    this.sumW2 = s;
  }

  /** One block: `blocks[c]` holds channel c's next `count` samples (all channels the same count). */
  push(blocks: Float64Array[], count = blocks[0]?.length ?? 0): void {
    if (blocks.length !== this.channels)
      throw new RangeError(`expected ${this.channels} channel blocks, got ${blocks.length}`);
    this.samples += count;
    this.ring.push(blocks, count, this.onFull);
  }

  private processSegment(): void {
    const n = this.n;
    for (let c = 0; c < this.channels; c++) {
      const x = this.ring.segments[c]!;
      let s = 0;
      for (let i = 0; i < n; i++) s += x[i]!;
      if (!Number.isFinite(s)) {
        this.skipped++;
        return;
      }
    }
    const mid = (n - 1) / 2;
    const half = n / 2;
    for (let c = 0; c < this.channels; c++) {
      const x = this.ring.segments[c]!;
      let mean = 0;
      let slope = 0;
      if (this.detrend !== "none") {
        for (let i = 0; i < n; i++) mean += x[i]!;
        mean /= n;
      }
      if (this.detrend === "linear") {
        // Least-squares line on the sample index: slope = sum (i - mid) x_i / sum (i - mid)^2.
        let a = 0;
        for (let i = 0; i < n; i++) a += (i - mid) * x[i]!;
        slope = a / ((n * (n * n - 1)) / 12);
      }
      const w = this.window;
      const y = this.work;
      for (let i = 0; i < n; i++) y[i] = (x[i]! - mean - slope * (i - mid)) * w[i]!;
      const out = this.fft.forward(y);
      const re = this.specRe[c]!;
      const im = this.specIm[c]!;
      const acc = this.auto[c]!;
      for (let k = 0; k <= half; k++) {
        const a = out[2 * k]!;
        const b = out[2 * k + 1]!;
        re[k] = a;
        im[k] = b;
        acc[k]! += a * a + b * b;
      }
    }
    // conj(X_r) X_j = (a - ib)(c + id) = (ac + bd) + i(ad - bc).
    const rr = this.specRe[this.reference]!;
    const ri = this.specIm[this.reference]!;
    for (let j = 0; j < this.channels; j++) {
      if (j === this.reference) continue;
      const jr = this.specRe[j]!;
      const ji = this.specIm[j]!;
      const cr = this.crossRe[j]!;
      const ci = this.crossIm[j]!;
      for (let k = 0; k <= half; k++) {
        const a = rr[k]!;
        const b = ri[k]!;
        const c = jr[k]!;
        const d = ji[k]!;
        cr[k]! += a * c + b * d;
        ci[k]! += a * d - b * c;
      }
    }
    this.segments++;
  }

  finish(sampleRateHz: number): CrossSpectrumSums {
    const half = this.n / 2;
    const k = this.segments;
    const scaled = (s: Float64Array | undefined): Float64Array | undefined =>
      s === undefined
        ? undefined
        : k === 0
          ? new Float64Array(half + 1).fill(NaN)
          : oneSidedDensity(s, sampleRateHz, this.sumW2, k);
    return {
      segments: k,
      skippedSegments: this.skipped,
      samples: this.samples,
      auto: this.auto.map((a) => scaled(a)!),
      crossRe: this.crossRe.map(scaled),
      crossIm: this.crossIm.map(scaled),
      reference: this.reference,
    };
  }
}

/**
 * The cross spectra as a listener on the one pass (the shape of pass/analysisOptions.ts PassAccumulator):
 * built at start() from the resolved Welch geometry, pushed the conditioned, window-cut blocks of every
 * channel (the reference first, by default), finished at the record's final rate. It holds an auto
 * spectrum per channel and a complex cross spectrum per other channel, 2k - 1 segment-length spectra,
 * which it declares so the pass bounds memory before the read (`option`: the key that sets k).
 */
export class CrossSpectrumListener {
  readonly spectra: { count: number; option: string };
  private acc: CrossSpectrumAccumulator | undefined;
  private taper: Float64Array | undefined;

  constructor(
    private readonly channels: number,
    option: string,
    private readonly reference = 0,
  ) {
    this.spectra = { count: 2 * channels - 1, option };
  }

  start(_designRateHz: number, analysis: { welch: ResolvedWelchOptions }): void {
    const w = analysis.welch;
    this.taper = spectralWindow(w.window, w.segmentLength);
    this.acc = new CrossSpectrumAccumulator(
      { segmentLength: w.segmentLength, hop: w.hop, window: this.taper, detrend: w.detrend },
      this.channels,
      this.reference,
    );
  }

  push(blocks: Float64Array[], frames: number): void {
    this.acc!.push(blocks, frames);
  }

  finish(sampleRateHz: number): CrossSpectrumSums & { window: Float64Array } {
    return { ...this.acc!.finish(sampleRateHz), window: this.taper! };
  }
}

/** Cross-spectral density of two whole signals held in memory (for files, analyzeTransfer streams). */
export function crossSpectralDensity(
  x: Float64Array,
  y: Float64Array,
  sampleRateHz: number,
  options: WelchOptions = {},
): CrossSpectrumSums & { settings: ResolvedWelchOptions; window: Float64Array } {
  if (x.length !== y.length) throw new RangeError(`x and y differ in length (${x.length} and ${y.length})`);
  const s = normalizeWelchOptions(options, sampleRateHz);
  const window = spectralWindow(s.window, s.segmentLength);
  const acc = new CrossSpectrumAccumulator(
    { segmentLength: s.segmentLength, hop: s.hop, window, detrend: s.detrend },
    2,
    0,
  );
  acc.push([x, y]);
  return { ...acc.finish(sampleRateHz), settings: s, window };
}
