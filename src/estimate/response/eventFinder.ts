import { InputError } from "../../errors.js";
import { ShockSpectrumAccumulator, type ShockSpectrum } from "./shockResponse.js";

/**
 * Events in a record: a run of samples whose |x| reaches a threshold, where exceedances closer than a
 * hold time belong to one event. Each event has its peak (the sample of largest |x|, signed), its time
 * and its duration (first to last sample at or above the threshold, plus one sample step), and, when
 * natural frequencies are given, its own shock response spectrum: the SDOF filters start at rest
 * `preSamples` before the first exceedance and run to `postSamples` after the last (the residual
 * response of the lowest natural frequency peaks within one of its periods after the pulse ends, so a
 * post window of 1 / f_n,min catches it; common practice).
 *
 * The samples pushed are centred by the caller (the record's mean removed, so gravity on an axis is no event).
 * Memory: the pre window, the filter banks of the events whose windows are still open, and the events found.
 */
export interface ShockEvent {
  /** Sample index (from the first pushed) of the peak, of the first and of the last exceedance. */
  peakIndex: number;
  firstIndex: number;
  lastIndex: number;
  /** Signed peak: the sample of largest |x|. */
  peak: number;
  /** SRS of the event window, when natural frequencies were given. */
  srs?: ShockSpectrum | undefined;
  /**
   * The same window split at the event's end (its last exceedance): primary, from the window's start to there (the pre
   * window included), and residual, after it. `srs` is their envelope.
   */
  primary?: ShockSpectrum | undefined;
  residual?: ShockSpectrum | undefined;
  /** The window ended with the record before the post window was complete. */
  truncated: boolean;
}

export interface EventFinderOptions {
  threshold: number;
  holdSamples: number;
  /** SRS per event: the grid, Q and rate; and the pre and post windows in samples. */
  srs?: { fnHz: Float64Array; q: number; sampleRateHz: number; preSamples: number; postSamples: number } | undefined;
  /** Refuse past this many events (a threshold inside the background); default 5000. */
  maxEvents?: number | undefined;
}

interface Bank {
  event: ShockEvent;
  acc: ShockSpectrumAccumulator;
  /** Absolute index of the next sample to feed. */
  next: number;
  /** Feed up to (exclusive) this absolute index; Infinity while the event is open. */
  until: number;
  /**
   * The primary part ends before this absolute index (the event's last exceedance + 1); Infinity while the event is
   * open.
   */
  split: number;
  primary?: ShockSpectrum | undefined;
  /**
   * While the event is open: the samples after its latest exceedance, not yet fed (they are primary if another
   * exceedance comes, else residual). At most the hold time.
   */
  pending: Float64Array;
  pendingLength: number;
}

export class EventFinder {
  private readonly events: ShockEvent[] = [];
  private open: ShockEvent | undefined;
  private openBank: Bank | undefined;
  private banks: Bank[] = [];
  private seen = 0;
  /** The last `pre` samples before the current block (a ring, oldest first after `ringStart`). */
  private readonly ring: Float64Array;
  private ringFill = 0;
  private ringStart = 0;
  private readonly maxEvents: number;

  constructor(private readonly o: EventFinderOptions) {
    if (!(o.threshold > 0 && Number.isFinite(o.threshold)))
      throw new InputError("OPTION_INVALID", {
        option: "threshold",
        expected: "a threshold above 0",
        received: String(o.threshold),
      });
    if (!(Number.isInteger(o.holdSamples) && o.holdSamples >= 1))
      throw new InputError("OPTION_INVALID", {
        option: "holdS",
        expected: "a hold time of at least one sample step",
        received: `${o.holdSamples} samples`,
      });
    this.ring = new Float64Array(Math.max(1, o.srs?.preSamples ?? 0));
    this.maxEvents = o.maxEvents ?? 5000;
  }

  /** Centred samples x[0..frames). */
  push(x: Float64Array, frames: number): void {
    const base = this.seen;
    const thr = this.o.threshold;
    const hold = this.o.holdSamples;
    for (let j = 0; j < frames; j++) {
      const v = x[j]!;
      const a = v < 0 ? -v : v;
      const i = base + j;
      const ev = this.open;
      if (ev !== undefined && i - ev.lastIndex > hold) this.close();
      if (!(a >= thr)) continue; // NaN never opens or extends an event
      const cur = this.open;
      if (cur !== undefined) {
        cur.lastIndex = i;
        if (a > Math.abs(cur.peak)) {
          cur.peak = v;
          cur.peakIndex = i;
        }
      } else this.start(i, v, base);
    }
    this.feed(x, frames, base);
    this.remember(x, frames);
    this.seen += frames;
  }

  private start(i: number, v: number, base: number): void {
    if (this.events.length >= this.maxEvents) {
      throw new InputError("SHOCK_TOO_MANY_EVENTS", {
        option: "threshold",
        expected: `at most ${this.maxEvents} events (a threshold above the background: raise \`threshold\` or \`thresholdFactor\`)`,
        received: `more than ${this.maxEvents} at ${this.o.threshold}`,
      });
    }
    const ev: ShockEvent = { peakIndex: i, firstIndex: i, lastIndex: i, peak: v, truncated: false };
    this.events.push(ev);
    this.open = ev;
    const s = this.o.srs;
    if (s === undefined) return;
    const acc = new ShockSpectrumAccumulator(s.fnHz, s.q, s.sampleRateHz);
    // The pre window: what the ring holds from before this block, then this block up to i.
    const from = Math.max(0, i - s.preSamples);
    const fromRing = Math.max(0, base - from);
    const have = Math.min(fromRing, this.ringFill);
    if (have > 0) {
      const pre = new Float64Array(have);
      for (let k = 0; k < have; k++)
        pre[k] = this.ring[(this.ringStart + this.ringFill - have + k) % this.ring.length]!;
      acc.push(pre);
    }
    const bank: Bank = {
      event: ev,
      acc,
      next: Math.max(from, base),
      until: Infinity,
      split: Infinity,
      pending: new Float64Array(this.o.holdSamples + 1),
      pendingLength: 0,
    };
    this.banks.push(bank);
    this.openBank = bank;
  }

  private close(): void {
    const ev = this.open!;
    this.open = undefined;
    const s = this.o.srs;
    if (s !== undefined && this.openBank !== undefined) {
      this.openBank.until = ev.lastIndex + 1 + s.postSamples;
      this.openBank.split = ev.lastIndex + 1;
    }
    this.openBank = undefined;
  }

  private feed(x: Float64Array, frames: number, base: number): void {
    if (this.banks.length === 0) return;
    const keep: Bank[] = [];
    for (const b of this.banks) {
      const open = b.until === Infinity;
      // The primary part may reach the latest exceedance (open) or ends at the split (closed).
      const primaryEnd = open ? b.event.lastIndex + 1 : b.split;
      this.feedTo(b, Math.min(primaryEnd, base + frames), x, base);
      if (!open && b.primary === undefined && b.next === b.split) b.primary = b.acc.split();
      if (open) {
        // Keep what lies after the latest exceedance until the event decides (at most the hold time of samples).
        for (let i = Math.max(b.next + b.pendingLength, base); i < base + frames; i++) {
          if (b.pendingLength === b.pending.length) {
            const grown = new Float64Array(b.pending.length * 2);
            grown.set(b.pending);
            b.pending = grown;
          }
          b.pending[b.pendingLength++] = x[i - base]!;
        }
        keep.push(b);
        continue;
      }
      this.feedTo(b, Math.min(b.until, base + frames), x, base);
      if (b.next >= b.until) this.close1(b);
      else keep.push(b);
    }
    this.banks = keep;
  }

  /** Feeds a bank from its pending samples, then the block, up to (not including) absolute index `to`. */
  private feedTo(b: Bank, to: number, x: Float64Array, base: number): void {
    if (to <= b.next) return;
    if (b.pendingLength > 0) {
      const m = Math.min(b.pendingLength, to - b.next);
      b.acc.push(b.pending, m, 0);
      b.pending.copyWithin(0, m, b.pendingLength);
      b.pendingLength -= m;
      b.next += m;
      if (b.next >= to) return;
    }
    b.acc.push(x, to - base, b.next - base);
    b.next = to;
  }

  /** A bank's window is complete: its primary and residual spectra, and their envelope. */
  private close1(b: Bank): void {
    const residual = b.acc.finish();
    const primary = b.primary ?? residual;
    b.event.primary = primary;
    b.event.residual = b.primary ? residual : undefined;
    b.event.srs = b.primary ? envelope(primary, residual) : residual;
  }

  private remember(x: Float64Array, frames: number): void {
    const L = this.ring.length;
    const start = Math.max(0, frames - L);
    for (let j = start; j < frames; j++) {
      if (this.ringFill < L) this.ring[(this.ringStart + this.ringFill++) % L] = x[j]!;
      else {
        this.ring[this.ringStart] = x[j]!;
        this.ringStart = (this.ringStart + 1) % L;
      }
    }
  }

  /** Closes the record: an open event ends here, and open SRS windows end with the record (marked truncated). */
  finish(): ShockEvent[] {
    if (this.open !== undefined) this.close();
    for (const b of this.banks) {
      // The record ends: what is pending after the latest exceedance is residual.
      if (b.primary === undefined) {
        if (b.until === Infinity) {
          b.split = b.event.lastIndex + 1;
        }
        if (b.next === b.split) b.primary = b.acc.split();
      }
      if (b.pendingLength > 0) {
        b.acc.push(b.pending, b.pendingLength, 0);
        b.next += b.pendingLength;
        b.pendingLength = 0;
      }
      this.close1(b);
      b.event.truncated = true;
    }
    this.banks = [];
    return this.events;
  }
}

/** The larger of two spectra on one grid, value by value. */
function envelope(a: ShockSpectrum, b: ShockSpectrum): ShockSpectrum {
  const mx = (p: Float64Array, q: Float64Array) => p.map((v, i) => Math.max(v, q[i]!));
  return {
    fnHz: a.fnHz,
    q: a.q,
    maximax: mx(a.maximax, b.maximax),
    positive: mx(a.positive, b.positive),
    negative: mx(a.negative, b.negative),
    pseudoVelocity: mx(a.pseudoVelocity, b.pseudoVelocity),
  };
}

/**
 * The record's stationary background level: the median of its stretches' r.m.s. values (each about the
 * stretch's own mean). The median is left alone by the few stretches that hold shocks, where the overall
 * r.m.s. is not. NaN when there is no stretch.
 */
export function backgroundRms(stretchMeanSquares: ArrayLike<number>): number {
  const v = Array.from(stretchMeanSquares)
    .filter((x) => Number.isFinite(x))
    .sort((a, b) => a - b);
  if (v.length === 0) return NaN;
  const m = v.length >> 1;
  return Math.sqrt(v.length % 2 ? v[m]! : (v[m - 1]! + v[m]!) / 2);
}

/**
 * Expected false events per second on a stationary Gaussian background of r.m.s. sigma at a threshold of
 * k sigma on |x|: the rate of up-crossings of +k sigma plus down-crossings of -k sigma, 2 nu0 exp(-k^2 / 2)
 * (Rice, S. O., "Mathematical analysis of random noise", Bell System Technical Journal 23-24, 1944-45; from memory),
 * nu0 the zero up-crossing rate sqrt(m2 / m0). Merging within a hold time can only lower the count.
 */
export function gaussianFalseEventRate(k: number, zeroUpcrossingRateHz: number): number {
  return 2 * zeroUpcrossingRateHz * Math.exp((-k * k) / 2);
}

/** Length of the stretches a shock record's baseline is taken over, s (BaselineStretches). */
export const BASELINE_STRETCH_S = 0.1;
/** Stretches kept before neighbours are pooled in pairs (1 MB a channel; 55 min of 0.1 s stretches before pooling). */
const BASELINE_STRETCHES_MAX = 1 << 15;

/**
 * A shock record's baseline (gravity on the axis, an offset): the mean of the record without the stretches that hold
 * its shocks. The plain mean also holds each shock's area over the record's length: a 50 g, 11 ms half-sine moves a
 * 1 s record's mean by 0.35 g, and the record centred on it sits 0.35 g off its baseline, a step that the SDOF filters
 * feel as much as the shock at low natural frequencies (its whole-record SRS at 1 Hz was 0.83 of the pulse's). So the
 * record is cut into short stretches (BASELINE_STRETCH_S), each keeping its sum, count and extremes, in flat memory
 * (pooled in pairs past BASELINE_STRETCHES_MAX), and `baseline`, from the median of the stretch means, leaves out
 * every stretch that reaches the threshold from the baseline and averages the rest, repeated until the stretches left
 * out settle. When nothing is left out the plain mean is the
 * baseline, bit for bit; when half the record or more would be left out, the level itself moves (a tilt, a drift:
 * BASELINE_DRIFT), and the plain mean is kept.
 */
export class BaselineStretches {
  private readonly sum = new Float64Array(BASELINE_STRETCHES_MAX);
  private readonly count = new Float64Array(BASELINE_STRETCHES_MAX);
  private readonly squares = new Float64Array(BASELINE_STRETCHES_MAX);
  private readonly lo = new Float64Array(BASELINE_STRETCHES_MAX).fill(Infinity);
  private readonly hi = new Float64Array(BASELINE_STRETCHES_MAX).fill(-Infinity);
  /** Whole stretches so far; the current one is index `whole`. */
  private whole = 0;
  private inCurrent = 0;
  private length: number;

  constructor(samplesPerStretch: number) {
    this.length = Math.max(2, Math.round(samplesPerStretch));
  }

  push(x: Float64Array, frames: number): void {
    let k = this.whole;
    let inCur = this.inCurrent;
    let s = this.sum[k]!;
    let c = this.count[k]!;
    let q = this.squares[k]!;
    let lo = this.lo[k]!;
    let hi = this.hi[k]!;
    for (let j = 0; j < frames; j++) {
      const v = x[j]!;
      if (v - v === 0) {
        s += v;
        q += v * v;
        c++;
        if (v < lo) lo = v;
        if (v > hi) hi = v;
      }
      if (++inCur === this.length) {
        this.sum[k] = s;
        this.count[k] = c;
        this.squares[k] = q;
        this.lo[k] = lo;
        this.hi[k] = hi;
        inCur = 0;
        k++;
        if (k === BASELINE_STRETCHES_MAX) k = this.pool();
        s = this.sum[k]!;
        c = this.count[k]!;
        q = this.squares[k]!;
        lo = this.lo[k]!;
        hi = this.hi[k]!;
      }
    }
    this.sum[k] = s;
    this.count[k] = c;
    this.squares[k] = q;
    this.lo[k] = lo;
    this.hi[k] = hi;
    this.whole = k;
    this.inCurrent = inCur;
  }

  /** Neighbours pooled in pairs, the stretch twice as long; returns the next free index. */
  private pool(): number {
    const half = BASELINE_STRETCHES_MAX / 2;
    for (let i = 0; i < half; i++) {
      this.sum[i] = this.sum[2 * i]! + this.sum[2 * i + 1]!;
      this.count[i] = this.count[2 * i]! + this.count[2 * i + 1]!;
      this.squares[i] = this.squares[2 * i]! + this.squares[2 * i + 1]!;
      this.lo[i] = Math.min(this.lo[2 * i]!, this.lo[2 * i + 1]!);
      this.hi[i] = Math.max(this.hi[2 * i]!, this.hi[2 * i + 1]!);
    }
    this.sum.fill(0, half);
    this.count.fill(0, half);
    this.squares.fill(0, half);
    this.lo.fill(Infinity, half);
    this.hi.fill(-Infinity, half);
    this.length *= 2;
    return half;
  }

  /**
   * The mean squares of the whole stretches, each about its own mean (for `backgroundRms` where a record has too few
   * 1 s stretches for their median to leave a shock's out).
   */
  meanSquares(): number[] {
    const out: number[] = [];
    for (let k = 0; k < this.whole; k++) {
      const c = this.count[k]!;
      if (c < 2) continue;
      const m = this.sum[k]! / c;
      out.push(Math.max(0, this.squares[k]! / c - m * m));
    }
    return out;
  }

  /** The baseline for a threshold on |x - baseline|, starting from the plain mean (see the class). */
  baseline(threshold: number, mean: number): number {
    const n = this.whole + (this.inCurrent > 0 ? 1 : 0);
    let total = 0;
    const means: number[] = [];
    for (let k = 0; k < n; k++) {
      total += this.count[k]!;
      if (this.count[k]! > 0) means.push(this.sum[k]! / this.count[k]!);
    }
    if (means.length === 0) return mean;
    // From the median of the stretch means: the plain mean can sit so far off (a short record) that every stretch
    // reaches the threshold from it.
    means.sort((p, q) => p - q);
    const h = means.length >> 1;
    let b = means.length % 2 ? means[h]! : (means[h - 1]! + means[h]!) / 2;
    let outBefore = -1;
    for (let round = 0; round < 5; round++) {
      let s = 0;
      let c = 0;
      let out = 0;
      for (let k = 0; k < n; k++) {
        if (this.count[k] === 0) continue;
        if (this.hi[k]! - b >= threshold || b - this.lo[k]! >= threshold) {
          out++;
          continue;
        }
        s += this.sum[k]!;
        c += this.count[k]!;
      }
      if (out === 0 && round === 0) return mean;
      if (!(c > total / 2)) return mean;
      b = s / c;
      if (out === outBefore) break;
      outBefore = out;
    }
    return b;
  }
}
