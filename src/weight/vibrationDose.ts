import { StretchMeanSquares } from "../estimate/statistics/stretchMeanSquares.js";

/**
 * Evaluation quantities of a frequency-weighted acceleration a_w(t), in one pass (ISO 2631-1:1997
 * clause 6; forms in docs/REFERENCES.md sec. 8):
 *
 *   a_w  = sqrt((1/T) sum a_w^2 dt)                      weighted r.m.s. (6.1)
 *   CF   = max |a_w(t)| / a_w                            crest factor (6.2)
 *   VDV  = (sum a_w^4 dt)^(1/4), in m/s^1.75              vibration dose value, fourth power (6.3.2)
 *   a_w(t0) = sqrt((1/tau) sum_{t0-tau}^{t0} a_w^2 dt)   running r.m.s., linear integration (6.3.1)
 *   MTVV = max over t0 of a_w(t0)                        maximum transient vibration value
 *
 * with dt = 1/fs. The running r.m.s. is the linear (rectangular) form over the last tau seconds, tau = 1 s
 * by default as the standard recommends for MTVV (integration time 1 s: docs/REFERENCES.md sec. 8, from memory;
 * the standard also allows exponential averaging, not used here). It is evaluated at every sample once a
 * full tau has passed, from a running sum of squares over a ring of tau * fs values that is summed afresh
 * at each wrap, so rounding cannot drift over an hour. Memory: the ring (tau * fs values) and one mean
 * square per stretch (for the stationarity test and the running-r.m.s. trace).
 */
export interface VibrationDose {
  samples: number;
  durationS: number;
  /** Weighted r.m.s. a_w. */
  rms: number;
  /** max |a_w(t)|. */
  peak: number;
  crestFactor: number;
  /** (sum a^4 / fs)^(1/4). */
  vdv: number;
  /** Largest running r.m.s.; NaN when the record is shorter than one integration time. */
  mtvv: number;
  /** End time of the running-r.m.s. window that gave MTVV, from the first sample. */
  mtvvAtS: number;
  runningRmsS: number;
  stretchS: number;
  /** Mean square (about the stretch mean) of each complete stretch, for the stationarity test. */
  stretchMeanSquares: Float64Array;
  /** r.m.s. about zero of each complete stretch (the running r.m.s. trace at the stretch ends, when stretch = tau). */
  stretchRms: Float64Array;
}

export interface VibrationDoseOptions {
  /** Integration time of the running r.m.s., s (default 1). */
  runningRmsS?: number | undefined;
  /** Stretch length for the stationarity test, s (default: the running-r.m.s. time). */
  stretchS?: number | undefined;
}

export class VibrationDoseAccumulator {
  private readonly ring: Float64Array;
  private readonly len: number;
  private readonly stretchLen: number;
  private readonly stretches: StretchMeanSquares;
  private readonly stretchSquares: number[] = [];
  private pos = 0;
  private windowSum = 0;
  private n = 0;
  private sum2 = 0;
  private sum4 = 0;
  private peak = 0;
  private best = -Infinity;
  private bestAt = -1;
  private stretchSum = 0;
  private stretchFill = 0;
  readonly runningRmsS: number;
  readonly stretchS: number;

  constructor(
    readonly designRateHz: number,
    options: VibrationDoseOptions = {},
  ) {
    this.runningRmsS = options.runningRmsS ?? 1;
    this.len = Math.max(1, Math.round(this.runningRmsS * designRateHz));
    this.ring = new Float64Array(this.len);
    this.stretchS = options.stretchS ?? this.runningRmsS;
    this.stretchLen = Math.max(2, Math.round(this.stretchS * designRateHz));
    this.stretches = new StretchMeanSquares(this.stretchLen);
  }

  /** Weighted samples a_w[0..frames). Non-finite values are the caller's to prevent (the filter holds them). */
  push(a: Float64Array, frames: number): void {
    this.stretches.push(a, frames);
    const ring = this.ring;
    const len = this.len;
    let pos = this.pos;
    let ws = this.windowSum;
    let n = this.n;
    let s2 = this.sum2;
    let s4 = this.sum4;
    let peak = this.peak;
    let best = this.best;
    let bestAt = this.bestAt;
    let ss = this.stretchSum;
    let sf = this.stretchFill;
    for (let i = 0; i < frames; i++) {
      const v = a[i]!;
      const q = v * v;
      s2 += q;
      s4 += q * q;
      const m = v < 0 ? -v : v;
      if (m > peak) peak = m;
      ws += q - ring[pos]!;
      ring[pos] = q;
      pos++;
      n++;
      if (pos === len) {
        pos = 0;
        ws = 0;
        for (let j = 0; j < len; j++) ws += ring[j]!;
      }
      if (n >= len && ws > best) {
        best = ws;
        bestAt = n;
      }
      ss += q;
      if (++sf === this.stretchLen) {
        this.stretchSquares.push(ss / sf);
        ss = 0;
        sf = 0;
      }
    }
    this.pos = pos;
    this.windowSum = ws;
    this.n = n;
    this.sum2 = s2;
    this.sum4 = s4;
    this.peak = peak;
    this.best = best;
    this.bestAt = bestAt;
    this.stretchSum = ss;
    this.stretchFill = sf;
  }

  /** The quantities at the record's final rate (sums over samples become integrals with dt = 1/fs). */
  finish(sampleRateHz: number): VibrationDose {
    const n = this.n;
    const rms = n > 0 ? Math.sqrt(this.sum2 / n) : NaN;
    const mtvv = this.bestAt > 0 ? Math.sqrt(Math.max(0, this.best) / this.len) : NaN;
    return {
      samples: n,
      durationS: n / sampleRateHz,
      rms,
      peak: this.peak,
      crestFactor: rms > 0 ? this.peak / rms : NaN,
      vdv: Math.pow(this.sum4 / sampleRateHz, 0.25),
      mtvv,
      mtvvAtS: this.bestAt > 0 ? this.bestAt / sampleRateHz : NaN,
      runningRmsS: this.runningRmsS,
      stretchS: this.stretchS,
      stretchMeanSquares: this.stretches.result(),
      stretchRms: Float64Array.from(this.stretchSquares, Math.sqrt),
    };
  }
}

/** The same quantities for a whole signal held in memory (tests, small records). */
export function vibrationDose(
  a: Float64Array,
  sampleRateHz: number,
  options: VibrationDoseOptions = {},
): VibrationDose {
  const acc = new VibrationDoseAccumulator(sampleRateHz, options);
  acc.push(a, a.length);
  return acc.finish(sampleRateHz);
}
