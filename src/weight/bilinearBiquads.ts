import type { AnalogSection } from "./isoWeightings.js";

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
 * State carries across blocks. Before the first sample the cascade settles on the record's own start
 * played backwards: the odd reflection of the first `settleSamples` samples about their mean
 * (scipy.signal.filtfilt pads with the odd reflection about x[0]; about the mean, one sample's noise does
 * not set the level), run from the steady state for that mean (scipy.signal.lfilter_zi times it), output
 * discarded. The state at x[0] is then that of a record that had been running at its start's level, with
 * its start's content, so neither gravity on an axis nor the gravity a tilting sensor starts with sets off
 * a transient, and no sample of the record is left out. (A straight-line fit in place of the mean was
 * tried: over 5 s it reads a 4 Hz sine as a slope of 0.02 /s and kicked the high-pass with it.) Starting at x[0]
 * instead (lfilter_zi * x[0]) kicks the 0.4 Hz high-pass with that sample's noise; starting at the mean of a long first
 * block kicks it with the difference between that mean and the start's level (a sensor that tilts during the ride).
 * Whatever the steady start leaves in the state decays through the reflection: exp(-zeta w1 K/fs) for the slowest
 * section (0.4 Hz, zeta 0.707: 1e-4 after 5 s). A non-finite input is replaced by the last finite one (counted in
 * `heldSamples`), so one NaN does not poison the recursion for the rest of the record.
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

  constructor(
    sections: readonly DigitalBiquad[],
    readonly gain: number,
    settleSamples = 0,
  ) {
    this.settleSamples = Math.max(0, Math.floor(settleSamples));
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
   * Settle on the start: the mean m of the first K = min(settleSamples, frames) finite samples, the steady
   * state for m, then the odd reflection of the start about m, x[-k] = 2 m - x[k] for k = K-1 ... 1, run
   * through the cascade with its output discarded. The reflection has the start's level and spectrum, and a
   * sine keeps its phase through it. settleSamples 0: the steady state for the block's mean only.
   */
  private settleOn(x: Float64Array, frames: number): void {
    const k = this.settleSamples > 0 ? Math.min(this.settleSamples, frames) : frames;
    let n = 0;
    let sum = 0;
    for (let i = 0; i < k; i++) {
      const v = x[i]!;
      if (v - v === 0) {
        n++;
        sum += v;
      }
    }
    const m = n > 0 ? sum / n : 0;
    this.startAt(m);
    if (this.settleSamples === 0 || k < 2) return;
    const r = new Float64Array(k - 1);
    for (let j = 0; j < k - 1; j++) {
      const v = x[k - 1 - j]!;
      r[j] = v - v === 0 ? 2 * m - v : m;
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
