import type { AnalogSection } from "./isoWeightings.js";
import { predictBefore } from "./startPrediction.js";

/**
 * Analog second-order sections realised as digital biquads by the bilinear transform with pre-warping
 * (Oppenheim & Schafer, Discrete-Time Signal Processing, 3rd ed. 2010, sec. 7.2.2):
 *
 *   s = c (1 - z^-1) / (1 + z^-1),   c = wp / tan(wp / (2 fs)),
 *
 * so that the analog frequency wp lands exactly on the digital frequency wp. Each section is pre-warped
 * at its own pole frequency: the corners of the band limits (0.4 and 100 Hz) and of the transition and
 * step sit where the analog ones do, and the warping error of a section grows only towards Nyquist,
 * as (pi f / fs)^2 / 3 in frequency (Taylor series of tan). The error of the realised magnitude against
 * the analog one, at the one-third-octave centres 0.5-80 Hz, is within 0.06 % at fs = 5120 Hz, 0.4 % at
 * 2000 Hz, 1.5 % at 1000 Hz, 5.6 % at 512 Hz and 11 % at 400 Hz, most of it near 80 Hz; at 200 Hz the 100 Hz
 * band limit cannot be pre-warped at all. weightingFilter.ts therefore also makes the fitted realisation
 * (fittedBiquads.ts) and keeps the closer of the two; this file keeps the high-pass and the cascade.
 */
export interface DigitalBiquad {
  b0: number;
  b1: number;
  b2: number;
  a1: number;
  a2: number;
}

/** Bilinear transform of one analog section, pre-warped at its pole frequency. Needs poleHz < fs/2. */
export function bilinearSection(s: AnalogSection, sampleRateHz: number): DigitalBiquad {
  const wp = 2 * Math.PI * s.poleHz;
  if (!(s.poleHz > 0 && s.poleHz < sampleRateHz / 2))
    throw new RangeError(`pre-warp frequency ${s.poleHz} Hz is not below Nyquist ${sampleRateHz / 2} Hz`);
  const c = wp / Math.tan(wp / (2 * sampleRateHz));
  const c2 = c * c;
  const [nb2, nb1, nb0] = s.b;
  const [na2, na1, na0] = s.a;
  const a0 = na2 * c2 + na1 * c + na0;
  return {
    b0: (nb2 * c2 + nb1 * c + nb0) / a0,
    b1: (2 * nb0 - 2 * nb2 * c2) / a0,
    b2: (nb2 * c2 - nb1 * c + nb0) / a0,
    a1: (2 * na0 - 2 * na2 * c2) / a0,
    a2: (na2 * c2 - na1 * c + na0) / a0,
  };
}

/** |H(e^{j 2 pi f / fs})| of a cascade of biquads with a gain. */
export function cascadeMagnitude(
  sections: readonly DigitalBiquad[],
  gain: number,
  frequencyHz: number,
  sampleRateHz: number,
): number {
  const t = (2 * Math.PI * frequencyHz) / sampleRateHz;
  const c1 = Math.cos(t);
  const s1 = Math.sin(t);
  const c2 = Math.cos(2 * t);
  const s2 = Math.sin(2 * t);
  let m = Math.abs(gain);
  for (const q of sections) {
    const nr = q.b0 + q.b1 * c1 + q.b2 * c2;
    const ni = -(q.b1 * s1 + q.b2 * s2);
    const dr = 1 + q.a1 * c1 + q.a2 * c2;
    const di = -(q.a1 * s1 + q.a2 * s2);
    m *= Math.sqrt((nr * nr + ni * ni) / (dr * dr + di * di));
  }
  return m;
}

/**
 * A cascade of biquads run over blocks, transposed direct form II (one state pair per section).
 * State carries across blocks. Before the first sample the cascade settles on a past predicted from the record's own
 * start (startPrediction.ts): the level m of the first `settleSamples` samples (a Hann-weighted mean, so a tone's
 * unfinished period barely moves it), Burg's autoregressive model of order `predictionOrder` fitted to the start less m,
 * and `settleSamples` samples before x[0] predicted backwards with it, run from the steady state for m (scipy.signal.
 * lfilter_zi times it), output discarded. What the start holds that is predictable (gravity, a tilt's slope, a sine at
 * any phase: a body bounce, an engine's tone, a calibrator) is continued into the past with its phase, so it sets off
 * no transient; noise fades to m. Whatever the steady start leaves decays through the prediction: exp(-zeta w1 K/fs)
 * for the slowest section (0.4 Hz, zeta 0.707: 1e-4 after 5 s). When no model can be fitted (a start too short) or its
 * prediction runs away, the past is the odd reflection of the start about m, the earlier method (scipy.signal.filtfilt
 * pads with the odd reflection about x[0]): it joins x[0] with a jump of 2 (m - x[0]), which rang the 0.4 Hz band
 * limit when the start was a sine away from its mean (a 1 Hz sine at its crest: crest factor +175 %, MTVV +19 %
 * through Wk). predictionOrder 0 keeps that reflection always. A non-finite input is replaced by the last finite one
 * (counted in `heldSamples`), so one NaN does not poison the recursion for the rest of the record.
 */
export class BiquadCascade {
  private readonly coef: Float64Array;
  private readonly state: Float64Array;
  private readonly count: number;
  private started = false;
  private last = 0;
  heldSamples = 0;

  /**
   * Samples of the start the cascade settles on before the first sample (0: steady state for the first block's mean
   * only).
   */
  readonly settleSamples: number;

  /** Order of the model the past is predicted with (0: the odd reflection about the start's level). */
  readonly predictionOrder: number;

  constructor(
    sections: readonly DigitalBiquad[],
    readonly gain: number,
    settleSamples = 0,
    predictionOrder = 0,
  ) {
    this.settleSamples = Math.max(0, Math.floor(settleSamples));
    this.predictionOrder = Math.max(0, Math.floor(predictionOrder));
    this.count = sections.length;
    this.coef = new Float64Array(5 * this.count);
    this.state = new Float64Array(2 * this.count);
    sections.forEach((q, i) => this.coef.set([q.b0, q.b1, q.b2, q.a1, q.a2], 5 * i));
  }

  /**
   * Start the filter as though the input had been u forever (steady state of every section). The first
   * `process` settles the cascade on the record's start (settleOn) unless this was called before.
   */
  startAt(u: number): void {
    this.settle(u);
    this.last = u;
    this.started = true;
  }

  /**
   * Settle on the start: the level m of the first K = min(settleSamples, frames) samples (Hann-weighted mean of the
   * finite ones), the steady state for m, then K - 1 samples before x[0] predicted backwards from the start less m
   * (startPrediction.ts), plus m, run through the cascade with the output discarded. Without a model (predictionOrder 0,
   * a start too short, a prediction that runs away) the past is the odd reflection x[-k] = 2 m - x[k], k = K-1 ... 1.
   * settleSamples 0: the steady state for the block's mean only.
   */
  private settleOn(x: Float64Array, frames: number): void {
    const k = this.settleSamples > 0 ? Math.min(this.settleSamples, frames) : frames;
    // The start with non-finite samples held at the last finite one (the first finite one before any).
    const start = new Float64Array(k);
    let first = 0;
    for (let i = 0; i < k; i++) {
      const v = x[i]!;
      if (v - v === 0) {
        first = v;
        break;
      }
    }
    let last = first;
    let n = 0;
    for (let i = 0; i < k; i++) {
      const v = x[i]!;
      if (v - v === 0) {
        last = v;
        n++;
      }
      start[i] = last;
    }
    const m = n > 0 ? hannMean(start, this.settleSamples > 0) : 0;
    this.startAt(m);
    if (this.settleSamples === 0 || k < 2) return;
    const r = new Float64Array(k - 1);
    for (let i = 0; i < k; i++) start[i]! -= m;
    if (this.predictionOrder > 0 && predictBefore(start, this.predictionOrder, k - 1, r)) {
      for (let j = 0; j < k - 1; j++) r[j]! += m;
    } else {
      for (let j = 0; j < k - 1; j++) r[j] = m - start[k - 1 - j]!;
    }
    this.run(r, k - 1);
  }

  /** The cascade over y[0..frames) in place (no gain, no NaN handling). */
  private run(y: Float64Array, frames: number): void {
    const c = this.coef;
    const st = this.state;
    for (let k = 0; k < this.count; k++) {
      const b0 = c[5 * k]!;
      const b1 = c[5 * k + 1]!;
      const b2 = c[5 * k + 2]!;
      const a1 = c[5 * k + 3]!;
      const a2 = c[5 * k + 4]!;
      let s1 = st[2 * k]!;
      let s2 = st[2 * k + 1]!;
      for (let i = 0; i < frames; i++) {
        const u = y[i]!;
        const out = b0 * u + s1;
        s1 = b1 * u - a1 * out + s2;
        s2 = b2 * u - a2 * out;
        y[i] = out;
      }
      st[2 * k] = s1;
      st[2 * k + 1] = s2;
    }
  }

  /** Steady state of every section for the constant input u (before the gain). */
  private settle(u: number): void {
    let x = u;
    const c = this.coef;
    for (let i = 0; i < this.count; i++) {
      const b0 = c[5 * i]!,
        b1 = c[5 * i + 1]!,
        b2 = c[5 * i + 2]!,
        a1 = c[5 * i + 3]!,
        a2 = c[5 * i + 4]!;
      const y = ((b0 + b1 + b2) / (1 + a1 + a2)) * x;
      const s2 = b2 * x - a2 * y;
      this.state[2 * i + 1] = s2;
      this.state[2 * i] = b1 * x - a1 * y + s2;
      x = y;
    }
  }

  /** y[i] = H{x}[i] for i < frames; y may be x (in place). */
  process(x: Float64Array, y: Float64Array, frames: number): void {
    if (frames === 0) return;
    if (!this.started) this.settleOn(x, frames);
    let held = 0;
    let last = this.last;
    for (let i = 0; i < frames; i++) {
      let v = x[i]!;
      if (v - v !== 0) {
        v = last;
        held++;
      } else last = v;
      y[i] = v;
    }
    this.last = last;
    this.heldSamples += held;
    this.run(y, frames);
    const g = this.gain;
    if (g !== 1) for (let i = 0; i < frames; i++) y[i]! *= g;
  }
}

/**
 * The start's level: the Hann-weighted mean sum w x / sum w, w = sin^2(pi (i + 1/2) / K) (tapered: a tone's unfinished
 * period leaks into it as the window's sidelobes, not as a plain mean's 1/(pi f T)); the plain mean when `tapered` is
 * false.
 */
function hannMean(x: Float64Array, tapered: boolean): number {
  const k = x.length;
  let sw = 0;
  let s = 0;
  for (let i = 0; i < k; i++) {
    const w = tapered ? Math.sin((Math.PI * (i + 0.5)) / k) ** 2 : 1;
    sw += w;
    s += w * x[i]!;
  }
  return s / sw;
}
