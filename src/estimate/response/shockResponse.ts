import { InputError } from "../../errors.js";

/**
 * Shock response spectra by ramp-invariant recursive filters (Smallwood, D. O., "An improved recursive
 * formula for calculating shock response spectra", Shock and Vibration Bulletin 51, 1981, venue from memory; the method
 * ISO 18431-4:2007 specifies, from memory). Each SDOF (natural frequency f_n, Q = 1 / (2 zeta)) is a
 * second-order recursion whose output equals, at every sample, the exact response of the continuous SDOF
 * to the input joined by straight lines between the samples (the input "ramps" from sample to sample).
 *
 *   T = 1 / fs, w_n = 2 pi f_n, w_d = w_n sqrt(1 - zeta^2), E = exp(-zeta w_n T), K = w_d T,
 *   C = E cos K, S = E sin K, S' = S / K;  y[n] = b0 x[n] + b1 x[n-1] + b2 x[n-2] + 2C y[n-1] - E^2 y[n-2]
 *
 * Absolute acceleration of the mass, (2 zeta w_n s + w_n^2) / (s^2 + 2 zeta w_n s + w_n^2):
 *   b0 = 1 - S', b1 = 2 (S' - C), b2 = E^2 - S'  (Smallwood 1981; its DC gain is exactly 1).
 * Relative displacement z = x_mass - x_base, -1 / (s^2 + 2 zeta w_n s + w_n^2): derived here, not copied.
 * A ramp-invariant filter's impulse response is the second difference of the continuous ramp response
 * r(t) over T: h[k] = (r((k+1)T) - 2 r(kT) + r((k-1)T)) / T with r(t <= 0) = 0, and
 * r(t) = (1 / w_n^2) [t - 2 zeta / w_n + e^(-zeta w_n t) ((2 zeta / w_n) cos w_d t + ((2 zeta^2 - 1) / w_d) sin w_d t)]
 * (the response of 1 / (s^2 + 2 zeta w_n s + w_n^2) to u = t; r(0) = r'(0) = r''(0) = 0). With the poles' recursion, b0
 * = h[0], b1 = h[1] - 2C h[0], b2 = h[2] - 2C h[1] + E^2 h[0]; the sign of z is dropped (only |z| is used).
 *
 * Sample-rate requirement. The recursion is exact at the samples for a piecewise-linear input, but the
 * spectrum takes the largest response *sample*: between samples the continuous response can rise further,
 * by up to 1 - cos(pi f_n / fs) for a response ringing at f_n (common practice: at least 10 samples per
 * period of the highest natural frequency, fs >= 10 f_n, where that bound is 4.9 %). `srsRateLimit` says
 * what a grid asks of a rate. A recorded input is band-limited, not straight between samples: read as straight lines,
 * its amplitude at f_n loses the triangle's sinc^2(f_n / fs) besides (3.3 % at fs/10, 19 % at fs/4), so on a record
 * the shortfall can reach 1 - sinc^2(f_n / fs) cos(pi f_n / fs): 8.0 % at fs/10, 43 % at fs/4 (`srsShortfallBound`;
 * measured against an exact simulation in tests/estimate/response/shockResponse.test.ts). The spectrum keeps the
 * published filter; respond's time route equalises its input instead (timeResponse.ts).
 */

export interface SdofFilter {
  b0: number;
  b1: number;
  b2: number;
  /** y[n] = ... + a1 y[n-1] + a2 y[n-2] (a1 = 2C, a2 = -E^2). */
  a1: number;
  a2: number;
}

function poles(fnHz: number, q: number, sampleRateHz: number) {
  const zeta = 1 / (2 * q);
  const T = 1 / sampleRateHz;
  const wn = 2 * Math.PI * fnHz;
  const wd = wn * Math.sqrt(1 - zeta * zeta);
  const E = Math.exp(-zeta * wn * T);
  const K = wd * T;
  return { zeta, T, wn, wd, E, K, C: E * Math.cos(K), S: E * Math.sin(K) };
}

/** Smallwood's ramp-invariant filter for the absolute acceleration of the mass (unit gain at DC). */
export function absoluteAccelerationFilter(fnHz: number, q: number, sampleRateHz: number): SdofFilter {
  const { E, K, C, S } = poles(fnHz, q, sampleRateHz);
  const Sp = S / K;
  return { b0: 1 - Sp, b1: 2 * (Sp - C), b2: E * E - Sp, a1: 2 * C, a2: -E * E };
}

/** The ramp-invariant filter for the relative displacement |z| (input units x s^2), derived in the header. */
export function relativeDisplacementFilter(fnHz: number, q: number, sampleRateHz: number): SdofFilter {
  const { zeta, T, wn, wd, E, C } = poles(fnHz, q, sampleRateHz);
  // Near t = 0 the closed form cancels (r ~ t^3 / 6 beside terms of 2 zeta / w_n^3): below w_n t = 1 the
  // power series instead. The impulse response h = e^(-zeta w_n t) sin(w_d t) / w_d solves h'' + 2 zeta w_n h' + w_n^2
  // h = 0, h(0) = 0, h'(0) = 1, so h = sum c_k t^k with c_(k+2) = -(2 zeta w_n (k+1) c_(k+1) + w_n^2 c_k) /
  // ((k+2)(k+1)), and r(t) = (h * t)(t) = sum c_k t^(k+2) k! / (k+2)! (two integrations).
  const series = (t: number): number => {
    let cPrev = 0;
    let c = 1;
    let sum = 0;
    let tk = t; // t^k for k = 1
    for (let k = 1; k < 60; k++) {
      const term = (c * tk * t * t) / ((k + 1) * (k + 2));
      sum += term;
      if (k > 4 && Math.abs(term) <= 1e-18 * Math.abs(sum)) break;
      const next = -(2 * zeta * wn * k * c + wn * wn * cPrev) / ((k + 1) * k); // c_(k+1) from c_k, c_(k-1)
      cPrev = c;
      c = next;
      tk *= t;
    }
    return sum;
  };
  const r = (t: number): number => {
    if (t <= 0) return 0;
    if (wn * t < 1) return series(t);
    const e = Math.exp(-zeta * wn * t);
    return (
      (t -
        (2 * zeta) / wn +
        e * (((2 * zeta) / wn) * Math.cos(wd * t) + ((2 * zeta * zeta - 1) / wd) * Math.sin(wd * t))) /
      (wn * wn)
    );
  };
  const h = (k: number) => (r((k + 1) * T) - 2 * r(k * T) + r((k - 1) * T)) / T;
  const h0 = h(0);
  const h1 = h(1);
  const h2 = h(2);
  return { b0: h0, b1: h1 - 2 * C * h0, b2: h2 - 2 * C * h1 + E * E * h0, a1: 2 * C, a2: -E * E };
}

/** One SRS: for each natural frequency the largest positive and negative absolute acceleration and the PVSS. */
export interface ShockSpectrum {
  fnHz: Float64Array;
  q: number;
  /** max |absolute acceleration| (input units). */
  maximax: Float64Array;
  /** Largest positive absolute acceleration (0 when it never goes above 0). */
  positive: Float64Array;
  /** Largest negative absolute acceleration, as a magnitude (0 when it never goes below 0). */
  negative: Float64Array;
  /** Pseudo-velocity w_n max |z| (input units x s: multiply by 9.80665 for m/s when the input is in g). */
  pseudoVelocity: Float64Array;
}

/**
 * What a grid asks of the rate: the highest natural frequency per sample rate and the bound on the sample-peak
 * shortfall.
 */
export function srsRateLimit(
  fnHz: Float64Array,
  sampleRateHz: number,
): { highestFnHz: number; samplesPerPeriod: number; peakShortfallBound: number } {
  let hi = 0;
  for (let i = 0; i < fnHz.length; i++) hi = Math.max(hi, fnHz[i]!);
  const spp = sampleRateHz / hi;
  return { highestFnHz: hi, samplesPerPeriod: spp, peakShortfallBound: spp > 2 ? 1 - Math.cos(Math.PI / spp) : 1 };
}

/**
 * How far a spectrum value can fall short of the continuous response's peak at this many samples per period: for an
 * input straight between samples (the sample peak alone, 1 - cos(pi / spp), what `srsRateLimit` records) and for a
 * band-limited one, a recording's, also the straight-line reading's sinc^2 (1 - sinc^2(1 / spp) cos(pi / spp)).
 */
export function srsShortfallBound(samplesPerPeriod: number): { samplePeak: number; bandLimited: number } {
  if (!(samplesPerPeriod > 2)) return { samplePeak: 1, bandLimited: 1 };
  const x = Math.PI / samplesPerPeriod;
  const sinc = Math.sin(x) / x;
  return { samplePeak: 1 - Math.cos(x), bandLimited: 1 - sinc * sinc * Math.cos(x) };
}

/** Common practice: at least 10 samples per period of the highest natural frequency. */
export const SRS_SAMPLES_PER_PERIOD = 10;
/** Below this many samples per period the sample-peak shortfall can exceed 29 %: refused. */
export const SRS_MIN_SAMPLES_PER_PERIOD = 4;

/** Checks a grid and Q once, at the entry (the accumulator's constructor). */
export function checkSrsGrid(fnHz: Float64Array, q: number, sampleRateHz: number, file?: string): void {
  if (!(q > 0.5 && q <= 1000))
    throw new InputError("OPTION_INVALID", {
      option: "q",
      expected: "a quality factor Q above 0.5 and at most 1000 (Q = 1 / (2 zeta))",
      received: String(q),
    });
  if (fnHz.length === 0)
    throw new InputError("OPTION_INVALID", {
      option: "fn",
      expected: "at least one natural frequency",
      received: "none",
    });
  const { highestFnHz, samplesPerPeriod } = srsRateLimit(fnHz, sampleRateHz);
  if (!(samplesPerPeriod >= SRS_MIN_SAMPLES_PER_PERIOD)) {
    throw new InputError("SRS_RATE_TOO_LOW", {
      ...(file !== undefined ? { file } : {}),
      option: "fn",
      expected: `natural frequencies at most fs/${SRS_MIN_SAMPLES_PER_PERIOD} = ${sampleRateHz / SRS_MIN_SAMPLES_PER_PERIOD} Hz at ${sampleRateHz} Hz (fs/${SRS_SAMPLES_PER_PERIOD} for a peak within 4.9 %, 8.0 % on a recorded, band-limited input)`,
      received: `${highestFnHz} Hz`,
    });
  }
}

/**
 * Streaming SRS over one channel: the filters' states and running extremes for every natural frequency.
 * push() in blocks of any length; memory is a few numbers per natural frequency.
 */
export class ShockSpectrumAccumulator {
  private readonly n: number;
  private readonly coef: Float64Array;
  /** Per f_n: x[n-1], x[n-2] are shared; y1, y2 of acceleration, z1, z2 of displacement. */
  private readonly state: Float64Array;
  private readonly maxA: Float64Array;
  private readonly minA: Float64Array;
  private readonly maxZ: Float64Array;
  private x1 = 0;
  private x2 = 0;
  private count = 0;

  constructor(
    readonly fnHz: Float64Array,
    readonly q: number,
    readonly sampleRateHz: number,
  ) {
    checkSrsGrid(fnHz, q, sampleRateHz);
    this.n = fnHz.length;
    this.coef = new Float64Array(10 * this.n);
    for (let i = 0; i < this.n; i++) {
      const a = absoluteAccelerationFilter(fnHz[i]!, q, sampleRateHz);
      const z = relativeDisplacementFilter(fnHz[i]!, q, sampleRateHz);
      this.coef.set([a.b0, a.b1, a.b2, a.a1, a.a2, z.b0, z.b1, z.b2, z.a1, z.a2], 10 * i);
    }
    this.state = new Float64Array(4 * this.n);
    this.maxA = new Float64Array(this.n);
    this.minA = new Float64Array(this.n);
    this.maxZ = new Float64Array(this.n);
  }

  /** Samples x[from..to); the filters start at rest on the first sample ever pushed. Non-finite samples count as 0. */
  push(x: Float64Array, to = x.length, from = 0): void {
    if (to <= from) return;
    const c = this.coef;
    const st = this.state;
    for (let i = 0; i < this.n; i++) {
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
      let hiA = this.maxA[i]!,
        loA = this.minA[i]!,
        hiZ = this.maxZ[i]!;
      let xm1 = this.x1,
        xm2 = this.x2;
      for (let j = from; j < to; j++) {
        let v = x[j]!;
        if (!(v === v && v !== Infinity && v !== -Infinity)) v = 0;
        const y = ab0 * v + ab1 * xm1 + ab2 * xm2 + aa1 * y1 + aa2 * y2;
        const z = zb0 * v + zb1 * xm1 + zb2 * xm2 + za1 * z1 + za2 * z2;
        if (y > hiA) hiA = y;
        if (y < loA) loA = y;
        const az = z < 0 ? -z : z;
        if (az > hiZ) hiZ = az;
        y2 = y1;
        y1 = y;
        z2 = z1;
        z1 = z;
        xm2 = xm1;
        xm1 = v;
      }
      st[4 * i] = y1;
      st[4 * i + 1] = y2;
      st[4 * i + 2] = z1;
      st[4 * i + 3] = z2;
      this.maxA[i] = hiA;
      this.minA[i] = loA;
      this.maxZ[i] = hiZ;
    }
    // The shared input history.
    const m = to - from;
    const last = (j: number) => {
      const v = x[j]!;
      return Number.isFinite(v) ? v : 0;
    };
    if (m >= 2) {
      this.x2 = last(to - 2);
      this.x1 = last(to - 1);
    } else {
      this.x2 = this.x1;
      this.x1 = last(to - 1);
    }
    this.count += m;
  }

  /** Samples pushed so far. */
  get samples(): number {
    return this.count;
  }

  /**
   * The spectrum so far, then the extremes start again from here while the filters run on: called at the end
   * of a pulse it splits the primary spectrum (during the pulse) from the residual one (after it).
   */
  split(): ShockSpectrum {
    const s = this.finish();
    this.maxA.fill(0);
    this.minA.fill(0);
    this.maxZ.fill(0);
    return s;
  }

  finish(): ShockSpectrum {
    const maximax = new Float64Array(this.n);
    const pv = new Float64Array(this.n);
    for (let i = 0; i < this.n; i++) {
      maximax[i] = Math.max(this.maxA[i]!, -this.minA[i]!);
      pv[i] = 2 * Math.PI * this.fnHz[i]! * this.maxZ[i]!;
    }
    return {
      fnHz: Float64Array.from(this.fnHz),
      q: this.q,
      maximax,
      positive: Float64Array.from(this.maxA),
      negative: this.minA.map((v) => -v),
      pseudoVelocity: pv,
    };
  }
}

/** The SRS of a whole array (tests, events held in memory). */
export function shockSpectrum(x: Float64Array, fnHz: Float64Array, q: number, sampleRateHz: number): ShockSpectrum {
  const a = new ShockSpectrumAccumulator(fnHz, q, sampleRateHz);
  a.push(x);
  return a.finish();
}
