import { RainflowCounter } from "./rainflow.js";
import { absoluteAccelerationFilter, relativeDisplacementFilter } from "./shockResponse.js";

/**
 * The SDOF responses to a recording itself, in the time domain, for a grid of natural frequencies: each
 * sample goes through the ramp-invariant filters (Smallwood 1981, see shockResponse.ts) for the absolute
 * acceleration and the relative displacement. The acceleration's largest and smallest values are kept;
 * the relative displacement's cycles are counted by rainflow (ASTM E1049-85, rainflow.ts) into
 * sum(count x (range / 2)^b), the damage of Miner's rule before the S-N curve's constants.
 *
 * The input is band-limited, not straight between samples: a recorder's anti-alias filter made it so. Read as
 * straight lines, its amplitude at f loses the triangle's sinc^2(f / fs) (3.3 % at fs/10, 19 % at fs/4), the response
 * at f_n with it, and the damage, a b-th power, far more (b 8: 0.77 of the exact damage at fs/10, 0.19 at fs/4). So
 * the samples first pass a 7-tap symmetric FIR that undoes sinc^2 up to fs/4 (`SINC2_EQUALISER`, unit gain at DC);
 * the filters then follow the band-limited input: the relative displacement's RMS on a white input to fs/2 within
 * 0.11 % of the exact transfer function's at Q 10 (0.3 % at Q 2), from f_n = fs/500 to fs/4. The FIR delays the
 * response by 3 samples; the record's last 3 samples stay in its history.
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

/**
 * h_3, h_2, h_1, h_0 of the symmetric FIR h_0 + 2 sum_k h_k cos(2 pi k f / fs) that undoes the straight-line reading's
 * sinc^2(f / fs) up to fs/4: least squares of E(x) sinc^2(x) - 1 at 400 points x = f / fs evenly over (0, 0.25], with
 * h_0 = 1 - 2 (h_1 + h_2 + h_3) (unit gain at DC), by numpy.linalg.lstsq (numpy 2; held to it in
 * tests/estimate/response/timeResponse.test.ts). The error left: E sinc^2 within 0.2 % of 1 below fs/5.
 */
export const SINC2_EQUALISER = [
  -0.003936047144058912, 0.031943513330574505, -0.17660747722961892, 1.2972000220862066,
] as const;
const EQ_DELAY = SINC2_EQUALISER.length - 1;

export class TimeResponseAccumulator {
  private readonly coef: Float64Array;
  private readonly state: Float64Array;
  private readonly maxA: Float64Array;
  private readonly minA: Float64Array;
  private readonly counters: RainflowCounter[];
  private readonly dcZ: Float64Array;
  private scratch = new Float64Array(0);
  /** The equaliser's last 2 x EQ_DELAY inputs, oldest first. */
  private readonly history = new Float64Array(2 * EQ_DELAY);
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
    if (this.scratch.length < 3 * frames) this.scratch = new Float64Array(3 * frames);
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
        this.history.fill(mean);
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
    const u = this.equalise(v, frames);
    const z = this.scratch.subarray(2 * frames, 3 * frames);
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
        const e = u[j]!;
        const y = ab0 * e + ab1 * xm1 + ab2 * xm2 + aa1 * y1 + aa2 * y2;
        const w = zb0 * e + zb1 * xm1 + zb2 * xm2 + za1 * z1 + za2 * z2;
        if (y > hi) hi = y;
        if (y < lo) lo = y;
        z[j] = w;
        y2 = y1;
        y1 = y;
        z2 = z1;
        z1 = w;
        xm2 = xm1;
        xm1 = e;
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
      this.x2 = u[frames - 2]!;
      this.x1 = u[frames - 1]!;
    } else {
      this.x2 = this.x1;
      this.x1 = u[0]!;
    }
    this.count += frames;
  }

  /**
   * The held input v[0..frames) through SINC2_EQUALISER, into the scratch's second third: output j is centred on input
   * j - EQ_DELAY (the history holds the inputs before this block).
   */
  private equalise(v: Float64Array, frames: number): Float64Array {
    const out = this.scratch.subarray(frames, 2 * frames);
    const h = this.history;
    const L = h.length;
    const [c3, c2, c1, c0] = SINC2_EQUALISER;
    // Input k of the stream seen from this block: history for k < 0.
    const at = (k: number): number => (k < 0 ? h[L + k]! : v[k]!);
    const edge = Math.min(frames, L);
    for (let j = 0; j < edge; j++)
      out[j] = c0 * at(j - 3) + c1 * (at(j - 2) + at(j - 4)) + c2 * (at(j - 1) + at(j - 5)) + c3 * (at(j) + at(j - 6));
    for (let j = edge; j < frames; j++)
      out[j] = c0 * v[j - 3]! + c1 * (v[j - 2]! + v[j - 4]!) + c2 * (v[j - 1]! + v[j - 5]!) + c3 * (v[j]! + v[j - 6]!);
    // The history: the last L inputs of the stream.
    if (frames >= L) h.set(v.subarray(frames - L, frames));
    else {
      h.copyWithin(0, frames);
      h.set(v.subarray(0, frames), L - frames);
    }
    return out;
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
