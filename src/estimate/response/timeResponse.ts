import { RainflowCounter } from "./rainflow.js";
import { absoluteAccelerationFilter, relativeDisplacementFilter } from "./shockResponse.js";

/**
 * The SDOF responses to a recording itself, in the time domain, for a grid of natural frequencies: each
 * sample goes through the ramp-invariant filters (Smallwood 1981, see shockResponse.ts) for the absolute
 * acceleration and the relative displacement. The acceleration's largest and smallest values are kept;
 * the relative displacement's cycles are counted by rainflow (ASTM E1049-85, rainflow.ts) into
 * sum(count x (range / 2)^b), the damage of Miner's rule before the S-N curve's constants.
 *
 * Offsets: both filters start in their steady state for the mean of the first block's first 1024 samples (as the
 * weighting filters do), so gravity on the axis starts no transient. The acceleration's DC gain is 1, so the largest
 * |response - mean| is max(max - mean, mean - min) with the record's mean, known at the end; rainflow ranges do not see
 * an offset at all. A non-finite sample is held at the last finite value. O(n) per natural frequency; memory: a block
 * of scratch and each counter's unclosed residue.
 */
export interface TimeResponse {
  fnHz: Float64Array;
  q: number;
  basquinB: number;
  /** Largest and smallest absolute-acceleration response (input units), the mean included. */
  maxAccel: Float64Array;
  minAccel: Float64Array;
  /** sum(count x (range/2)^b) of the relative displacement in input units x s^2. */
  rainflowSum: Float64Array;
  samples: number;
  heldSamples: number;
}

/**
 * Samples whose mean sets the filters' starting state (the pool's slots are longer, so threads and one thread agree).
 */
export const START_SAMPLES = 1024;

export class TimeResponseAccumulator {
  private readonly coef: Float64Array;
  private readonly state: Float64Array;
  private readonly maxA: Float64Array;
  private readonly minA: Float64Array;
  private readonly counters: RainflowCounter[];
  private readonly dcZ: Float64Array;
  private scratch = new Float64Array(0);
  private x1 = 0;
  private x2 = 0;
  private started = false;
  private last = 0;
  private count = 0;
  private held = 0;

  constructor(
    readonly fnHz: Float64Array,
    readonly q: number,
    readonly sampleRateHz: number,
    readonly basquinB: number,
  ) {
    const n = fnHz.length;
    this.coef = new Float64Array(10 * n);
    this.dcZ = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const a = absoluteAccelerationFilter(fnHz[i]!, q, sampleRateHz);
      const z = relativeDisplacementFilter(fnHz[i]!, q, sampleRateHz);
      this.coef.set([a.b0, a.b1, a.b2, a.a1, a.a2, z.b0, z.b1, z.b2, z.a1, z.a2], 10 * i);
      this.dcZ[i] = (z.b0 + z.b1 + z.b2) / (1 - z.a1 - z.a2);
    }
    this.state = new Float64Array(4 * n);
    this.maxA = new Float64Array(n).fill(-Infinity);
    this.minA = new Float64Array(n).fill(Infinity);
    this.counters = Array.from({ length: n }, () => new RainflowCounter(basquinB));
  }

  push(x: Float64Array, frames: number): void {
    if (frames <= 0) return;
    if (this.scratch.length < 2 * frames) this.scratch = new Float64Array(2 * frames);
    // The input with non-finite samples held, in the first half of the scratch.
    const v = this.scratch;
    let last = this.last;
    let started = this.started;
    if (!started) {
      let s = 0;
      let m = 0;
      // The first START_SAMPLES of the first block only, so the start does not depend on how the record is cut into
      // blocks.
      for (let j = 0; j < Math.min(frames, START_SAMPLES); j++)
        if (Number.isFinite(x[j]!)) {
          s += x[j]!;
          m++;
        }
      if (m > 0) {
        const mean = s / m;
        last = mean;
        this.x1 = mean;
        this.x2 = mean;
        for (let i = 0; i < this.fnHz.length; i++) {
          this.state[4 * i] = mean;
          this.state[4 * i + 1] = mean;
          this.state[4 * i + 2] = mean * this.dcZ[i]!;
          this.state[4 * i + 3] = mean * this.dcZ[i]!;
        }
        started = true;
      }
    }
    for (let j = 0; j < frames; j++) {
      const s = x[j]!;
      if (s - s === 0) last = s;
      else this.held++;
      v[j] = last;
    }
    this.last = last;
    this.started = started;
    const z = this.scratch.subarray(frames, 2 * frames);
    const c = this.coef;
    const st = this.state;
    for (let i = 0; i < this.fnHz.length; i++) {
      const k = 10 * i;
      const ab0 = c[k]!,
        ab1 = c[k + 1]!,
        ab2 = c[k + 2]!,
        aa1 = c[k + 3]!,
        aa2 = c[k + 4]!;
      const zb0 = c[k + 5]!,
        zb1 = c[k + 6]!,
        zb2 = c[k + 7]!,
        za1 = c[k + 8]!,
        za2 = c[k + 9]!;
      let y1 = st[4 * i]!,
        y2 = st[4 * i + 1]!,
        z1 = st[4 * i + 2]!,
        z2 = st[4 * i + 3]!;
      let hi = this.maxA[i]!,
        lo = this.minA[i]!;
      let xm1 = this.x1,
        xm2 = this.x2;
      for (let j = 0; j < frames; j++) {
        const u = v[j]!;
        const y = ab0 * u + ab1 * xm1 + ab2 * xm2 + aa1 * y1 + aa2 * y2;
        const w = zb0 * u + zb1 * xm1 + zb2 * xm2 + za1 * z1 + za2 * z2;
        if (y > hi) hi = y;
        if (y < lo) lo = y;
        z[j] = w;
        y2 = y1;
        y1 = y;
        z2 = z1;
        z1 = w;
        xm2 = xm1;
        xm1 = u;
      }
      st[4 * i] = y1;
      st[4 * i + 1] = y2;
      st[4 * i + 2] = z1;
      st[4 * i + 3] = z2;
      this.maxA[i] = hi;
      this.minA[i] = lo;
      this.counters[i]!.push(z, frames);
    }
    if (frames >= 2) {
      this.x2 = v[frames - 2]!;
      this.x1 = v[frames - 1]!;
    } else {
      this.x2 = this.x1;
      this.x1 = v[0]!;
    }
    this.count += frames;
  }

  finish(): TimeResponse {
    return {
      fnHz: Float64Array.from(this.fnHz),
      q: this.q,
      basquinB: this.basquinB,
      maxAccel: Float64Array.from(this.maxA),
      minAccel: Float64Array.from(this.minA),
      rainflowSum: Float64Array.from(this.counters, (c) => c.finish()),
      samples: this.count,
      heldSamples: this.held,
    };
  }
}
