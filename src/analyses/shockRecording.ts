import {
  analyzeSource,
  type AnalysisOptions,
  type PassAccumulator,
  type RecordingAnalysis,
} from "../pass/analyzeRecording.js";
import { InputError } from "../errors.js";
import {
  BASELINE_STRETCH_S,
  BaselineStretches,
  backgroundRms,
  EventFinder,
  gaussianFalseEventRate,
  type ShockEvent,
} from "../estimate/response/eventFinder.js";
import {
  checkSrsGrid,
  ShockSpectrumAccumulator,
  srsRateLimit,
  SRS_SAMPLES_PER_PERIOD,
  type ShockSpectrum,
} from "../estimate/response/shockResponse.js";
import { StretchMeanSquares } from "../estimate/statistics/stretchMeanSquares.js";
import { openTimeHistory } from "../read/openTimeHistory.js";
import { accelFactor, type AccelUnit } from "../units.js";
import type { Finding } from "../findings.js";

/**
 * `psdgate shock`: the events of a recording and their shock response spectra, in two reads of the file.
 * Read 1 (the one pass, with the PSD) gives each channel's mean, its background level (the median of
 * 1 s stretch r.m.s. values, each about its own mean) and its zero up-crossing rate from the PSD.
 * Read 2 removes the mean, finds the events at the threshold (given, or a multiple of the background),
 * and runs the SDOF filters over each event's window and over the whole record. Memory stays flat in the
 * record's length: a few numbers per natural frequency and channel, plus the events found.
 */
export interface ShockOptions extends Omit<AnalysisOptions, "accumulators" | "spectrum" | "histogram"> {
  /** Natural frequencies, Hz (an array as well: a record's re-run options are JSON). */
  fnHz: Float64Array | readonly number[];
  q: number;
  /** Threshold on |x - mean| in the result unit; default: `thresholdFactor` x the background r.m.s. */
  threshold?: number | undefined;
  /** Default 6 (see DEFAULT_THRESHOLD_FACTOR). */
  thresholdFactor?: number | undefined;
  /** Exceedances closer than this belong to one event, s; default 0.05. */
  holdS?: number | undefined;
  /** The event's SRS window starts this long before its first exceedance, s; default the hold time. */
  preS?: number | undefined;
  /**
   * ... and ends this long after its last, s; default the larger of the hold time and one period of the lowest natural
   * frequency.
   */
  postS?: number | undefined;
  maxEvents?: number | undefined;
  /** Also give each event's primary (to its last exceedance) and residual (after it) spectra. */
  primaryResidual?: boolean | undefined;
}

/**
 * 6 background r.m.s.: on a Gaussian background with a zero up-crossing rate of 100 Hz this expects one false
 * event in about 3.8 days (1 / (2 nu0 exp(-18)) = 3.3e5 s, Rice 1944-45); at 1 kHz in about 9.1 h.
 */
export const DEFAULT_THRESHOLD_FACTOR = 6;
export const DEFAULT_HOLD_S = 0.05;
/** Below this many whole 1 s stretches, the background is the median of the 0.1 s stretches' r.m.s. values. */
export const SHORT_RECORD_STRETCHES = 3;

export interface ShockEventResult {
  /** Time of the peak, s from the first sample of the file (the --from window included). */
  timeS: number;
  peak: number;
  /** First to last sample at or above the threshold, plus one sample step, s. */
  durationS: number;
  srs: ShockSpectrum;
  /**
   * Primary (to the event's last exceedance, the pre window included) and residual (after it) spectra, when asked for.
   */
  primary?: ShockSpectrum | undefined;
  residual?: ShockSpectrum | undefined;
  /** The SRS window ended with the record. */
  truncated: boolean;
}

export interface ShockChannel {
  name: string;
  units: AccelUnit;
  /**
   * The baseline removed before events and spectra (gravity on an axis, offsets): the mean without the 0.1 s stretches
   * that reach the threshold (BaselineStretches), the plain mean when none does.
   */
  mean: number;
  backgroundRms: number;
  threshold: number;
  /** Threshold over the background r.m.s. */
  thresholdFactor: number;
  /** sqrt(m2 / m0) of the record's PSD. */
  zeroUpcrossingRateHz: number;
  /** On a stationary Gaussian background of this r.m.s. and rate: expected false events over the record (Rice). */
  expectedFalseEvents: number;
  /** Largest |peak| first. */
  events: ShockEventResult[];
  /** The whole record's SRS. */
  srs: ShockSpectrum;
  /** Pseudo-velocity in m/s (the spectra's pseudoVelocity is in the channel's unit x s). */
  pvssMPerS: Float64Array;
}

export interface ShockResult {
  analysis: RecordingAnalysis;
  settings: {
    fnHz: Float64Array;
    q: number;
    holdS: number;
    preS: number;
    postS: number;
    thresholdGiven?: number | undefined;
    thresholdFactor?: number | undefined;
    primaryResidual: boolean;
  };
  rate: { sampleRateHz: number; highestFnHz: number; samplesPerPeriod: number; peakShortfallBound: number };
  channels: ShockChannel[];
  /** What the analysis notes and doubts, as findings (report/findingTexts.ts says them). */
  notes: Finding[];
  doubts: Finding[];
}

class Background
  implements PassAccumulator<{ meanSquares: number[][]; means: number[][]; baselines: BaselineStretches[] }>
{
  private s: StretchMeanSquares[] = [];
  private b: BaselineStretches[] = [];
  private length = 2;
  start(designRateHz: number): void {
    this.length = Number.isFinite(designRateHz) && designRateHz > 0 ? Math.max(2, Math.round(designRateHz)) : 2;
  }
  push(blocks: Float64Array[], frames: number): void {
    while (this.s.length < blocks.length) this.s.push(new StretchMeanSquares(this.length));
    while (this.b.length < blocks.length) this.b.push(new BaselineStretches(this.length * BASELINE_STRETCH_S));
    for (let c = 0; c < blocks.length; c++) {
      this.s[c]!.push(blocks[c]!, frames);
      this.b[c]!.push(blocks[c]!, frames);
    }
  }
  finish(): { meanSquares: number[][]; means: number[][]; baselines: BaselineStretches[] } {
    return {
      meanSquares: this.s.map((s) => [...s.result()]),
      means: this.s.map((s) => [...s.means()]),
      baselines: this.b,
    };
  }
}

class Events
  implements PassAccumulator<{ events: ShockEvent[]; srs: ShockSpectrum; exceedanceSums: number[]; finite: number[] }[]>
{
  private finders: EventFinder[] = [];
  private whole: ShockSpectrumAccumulator[] = [];
  private scratch = new Float64Array(0);
  /** Per channel and 1 s stretch (Background's): the sum of the centred samples at or above the threshold, and the
   * finite samples, for BASELINE_DRIFT. */
  private exceed: number[][] = [];
  private finite: number[][] = [];
  private stretch = 2;
  private seen = 0;
  constructor(
    private readonly o: {
      means: number[];
      thresholds: number[];
      holdS: number;
      preS: number;
      postS: number;
      fnHz: Float64Array;
      q: number;
      maxEvents?: number | undefined;
      file: string;
    },
  ) {}
  start(designRateHz: number): void {
    if (!(Number.isFinite(designRateHz) && designRateHz > 0)) return;
    checkSrsGrid(this.o.fnHz, this.o.q, designRateHz, this.o.file);
    const toSamples = (s: number) => Math.max(1, Math.round(s * designRateHz));
    this.finders = this.o.thresholds.map(
      (threshold) =>
        new EventFinder({
          threshold,
          holdSamples: toSamples(this.o.holdS),
          maxEvents: this.o.maxEvents,
          srs: {
            fnHz: this.o.fnHz,
            q: this.o.q,
            sampleRateHz: designRateHz,
            preSamples: toSamples(this.o.preS),
            postSamples: toSamples(this.o.postS),
          },
        }),
    );
    this.whole = this.o.thresholds.map(() => new ShockSpectrumAccumulator(this.o.fnHz, this.o.q, designRateHz));
    this.stretch = Math.max(2, Math.round(designRateHz));
    this.exceed = this.o.thresholds.map(() => []);
    this.finite = this.o.thresholds.map(() => []);
  }
  push(blocks: Float64Array[], frames: number): void {
    if (this.scratch.length < frames) this.scratch = new Float64Array(frames);
    const y = this.scratch;
    for (let c = 0; c < blocks.length; c++) {
      const x = blocks[c]!;
      const m = this.o.means[c]!;
      for (let i = 0; i < frames; i++) y[i] = x[i]! - m;
      this.finders[c]!.push(y, frames);
      this.whole[c]!.push(y, frames);
      const thr = this.o.thresholds[c]!;
      const ex = this.exceed[c]!;
      const fin = this.finite[c]!;
      for (let i = 0; i < frames; ) {
        const j = Math.floor((this.seen + i) / this.stretch);
        const end = Math.min(frames, (j + 1) * this.stretch - this.seen);
        let e = 0;
        let n = 0;
        for (; i < end; i++) {
          const v = y[i]!;
          if (v - v === 0) n++;
          if (v >= thr || v <= -thr) e += v;
        }
        ex[j] = (ex[j] ?? 0) + e;
        fin[j] = (fin[j] ?? 0) + n;
      }
    }
    this.seen += frames;
  }
  finish() {
    return this.finders.map((f, c) => ({
      events: f.finish(),
      srs: this.whole[c]!.finish(),
      exceedanceSums: this.exceed[c] ?? [],
      finite: this.finite[c] ?? [],
    }));
  }
}

function zeroUpcrossingRate(psd: Float64Array, f: Float64Array): number {
  let m0 = 0;
  let m2 = 0;
  for (let k = 1; k < psd.length; k++) {
    m0 += psd[k]!;
    m2 += f[k]! * f[k]! * psd[k]!;
  }
  return m0 > 0 ? Math.sqrt(m2 / m0) : NaN;
}

/**
 * shock's settings with their defaults, each checked in turn: Q, the hold, the threshold or its factor, the event
 * window.
 */
function shockSettings(options: ShockOptions) {
  const q = options.q;
  const fnHz = Float64Array.from(options.fnHz);
  if (!(q > 0.5 && q <= 1000))
    throw new InputError("OPTION_INVALID", {
      option: "q",
      expected: "a quality factor Q above 0.5 and at most 1000 (Q = 1 / (2 zeta))",
      received: String(q),
    });
  const holdS = options.holdS ?? DEFAULT_HOLD_S;
  if (!(holdS > 0 && holdS <= 60))
    throw new InputError("OPTION_INVALID", {
      option: "holdS",
      expected: "a hold time in s, 0 < t <= 60",
      received: String(holdS),
    });
  const factor = options.thresholdFactor ?? DEFAULT_THRESHOLD_FACTOR;
  if (options.threshold !== undefined && options.thresholdFactor !== undefined)
    throw new InputError("OPTION_CONFLICT", {
      option: "threshold",
      expected: "a threshold in units or a factor on the background, not both",
      received: "both",
    });
  if (!(factor > 0 && factor <= 1000))
    throw new InputError("OPTION_INVALID", {
      option: "thresholdFactor",
      expected: "a factor above 0 and at most 1000",
      received: String(factor),
    });
  if (options.threshold !== undefined && !(options.threshold > 0 && Number.isFinite(options.threshold)))
    throw new InputError("OPTION_INVALID", {
      option: "threshold",
      expected: "a threshold above 0",
      received: String(options.threshold),
    });
  let fnMin = Infinity;
  for (const f of fnHz) fnMin = Math.min(fnMin, f);
  const preS = options.preS ?? holdS;
  const postS = options.postS ?? Math.max(holdS, 1 / fnMin);
  for (const [k, v] of [
    ["preS", preS],
    ["postS", postS],
  ] as const)
    if (!(v >= 0 && v <= 600))
      throw new InputError("OPTION_INVALID", { option: k, expected: "a time in s from 0 to 600", received: String(v) });
  return { q, fnHz, holdS, factor, preS, postS };
}

/**
 * BASELINE_DRIFT: the channel's 1 s means (less the shocks shorter than a stretch) move away from their average (on a
 * record without shocks, the one mean read 2 removes) by more than a quarter of the
 * threshold (a sensor that tilts through gravity, an offset that creeps). Where the drift is largest the threshold
 * is that much nearer the background, so events there may be the drift and the noise, not shocks, and their SRS
 * take the drift in. A quarter: the largest of the stretch means of a stationary record stays within a few
 * sigma / sqrt(samples a second) of its mean, far below it (common practice, a heuristic; chosen here).
 */
function baselineDrift(
  means: readonly number[],
  p: ChannelLevels,
  found: { events: readonly ShockEvent[]; exceedanceSums: readonly number[]; finite: readonly number[] },
  sampleRateHz: number,
): Finding | undefined {
  // A shock shorter than a stretch moves its stretch's mean by its own area (a 50 g, 11 ms half-sine by 0.35 g in
  // its second) without any drift: such a stretch's mean is taken with its samples beyond the threshold at the mean removed. A
  // stretch that an event as long as a stretch touches keeps them (a tilt past the threshold is the drift itself),
  // and a drift's few noise peaks past the threshold hardly move a mean.
  const length = Number.isFinite(sampleRateHz) && sampleRateHz > 0 ? Math.max(2, Math.round(sampleRateHz)) : 2;
  const long = new Set<number>();
  for (const e of found.events) {
    if (e.lastIndex - e.firstIndex + 1 < length) continue;
    for (let j = Math.floor(e.firstIndex / length); j <= Math.floor(e.lastIndex / length); j++) long.add(j);
  }
  const finite = means
    .map((m, j) => {
      const n = found.finite[j] ?? 0;
      return long.has(j) || !(n > 0) ? m : m - (found.exceedanceSums[j] ?? 0) / n;
    })
    .filter((m) => Number.isFinite(m));
  if (finite.length < 2) return undefined;
  const lowest = Math.min(...finite);
  const highest = Math.max(...finite);
  // About the kept stretches' own average: the one mean removed also holds the shocks' area over the record's length
  // (a 50 g, 11 ms half-sine in 4 s: 0.09 g), which is no drift of the baseline.
  let centre = 0;
  for (const m of finite) centre += m / finite.length;
  const largest = Math.max(Math.abs(highest - centre), Math.abs(lowest - centre));
  if (!(largest > 0.25 * p.threshold)) return undefined;
  return {
    code: "BASELINE_DRIFT",
    values: { lowest, highest, largest, thresholdPercent: (100 * largest) / p.threshold },
  };
}

/** What read 1 gives each channel for read 2: its mean, background r.m.s., threshold and zero up-crossing rate. */
interface ChannelLevels {
  mean: number;
  background: number;
  threshold: number;
  nu0: number;
}

/**
 * Each channel's levels from read 1: the threshold given, or the factor times the background (none:
 * SHOCK_NO_BACKGROUND).
 */
function channelLevels(
  file: string,
  analysis: RecordingAnalysis,
  stretches: number[][],
  baselines: BaselineStretches[],
  threshold: number | undefined,
  factor: number,
): ChannelLevels[] {
  return analysis.channels.map((ch, c) => {
    // A shock's stretch is one of the few 1 s stretches of a short record, and their median is no longer free of it:
    // below 3 of them, the median of the 0.1 s stretches (a 1 s drop record's one stretch made a 50 g shock's r.m.s.,
    // 3.7 g, the background, and the threshold 22 g).
    const few = (stretches[c]?.length ?? 0) < SHORT_RECORD_STRETCHES;
    const b = backgroundRms(few ? (baselines[c]?.meanSquares() ?? []) : (stretches[c] ?? []));
    const t = threshold ?? factor * b;
    if (!(t > 0)) {
      throw new InputError("SHOCK_NO_BACKGROUND", {
        file,
        option: "threshold",
        expected: `a background level to set the threshold from (${ch.name} has ${stretches[c]?.length ?? 0} whole 1 s stretches${few ? ` and ${baselines[c]?.meanSquares().length ?? 0} whole 0.1 s stretches` : ""}, r.m.s. ${b}); give \`threshold\` in units`,
        received: String(b),
      });
    }
    return {
      mean: baselines[c]?.baseline(t, ch.stats.mean) ?? ch.stats.mean,
      background: b,
      threshold: t,
      nu0: zeroUpcrossingRate(ch.psd.psd, ch.psd.frequencyHz),
    };
  });
}

/**
 * One channel's result from both reads: its events (largest |peak| first), whole-record SRS and PVSS, and its notes.
 */
function shockChannel(
  ch: RecordingAnalysis["channels"][number],
  p: ChannelLevels,
  found: ReturnType<Events["finish"]>[number],
  g: { analysis: RecordingAnalysis; primaryResidual: boolean | undefined; postS: number },
  notes: Finding[],
): ShockChannel {
  const { analysis, postS } = g;
  const fs = analysis.input.sampleRateHz;
  const k = p.threshold / p.background;
  const expectedFalseEvents = (gaussianFalseEventRate(k, p.nu0) * analysis.window.frames) / fs;
  const events = found.events
    .map((e) => ({
      timeS: analysis.window.fromS + e.peakIndex / fs,
      peak: e.peak,
      durationS: (e.lastIndex - e.firstIndex + 1) / fs,
      srs: e.srs!,
      truncated: e.truncated,
      ...(g.primaryResidual ? { primary: e.primary, residual: e.residual } : {}),
    }))
    .sort((a, b) => Math.abs(b.peak) - Math.abs(a.peak) || a.timeS - b.timeS);
  const srs = found.srs;
  const toMs = accelFactor(ch.units, "m/s2");
  if (!(k >= 4.5))
    notes.push({
      code: "THRESHOLD_LOW",
      values: { thresholdFactor: k, expectedFalseEvents },
      about: { channel: ch.name },
    });
  if (events.some((e) => e.truncated))
    notes.push({ code: "EVENT_CUT_SHORT", values: { postS }, about: { channel: ch.name } });
  return {
    name: ch.name,
    units: ch.units,
    mean: p.mean,
    backgroundRms: p.background,
    threshold: p.threshold,
    thresholdFactor: k,
    zeroUpcrossingRateHz: p.nu0,
    expectedFalseEvents,
    events,
    srs,
    pvssMPerS: srs.pseudoVelocity.map((v) => v * toMs),
  };
}

/** The events and shock response spectra of a recording, in two reads of the file (see ShockOptions). */
export async function shockRecording(file: string, options: ShockOptions): Promise<ShockResult> {
  const { q, fnHz, holdS, factor, preS, postS } = shockSettings(options);
  const base: AnalysisOptions = { ...options };
  delete (base as Partial<ShockOptions>).fnHz;
  const open = () => openTimeHistory(file, { ...options.csv, sampleRateHz: options.csv?.sampleRateHz });
  // Read 1: mean, background, PSD.
  const src1 = await open();
  if (Number.isFinite(src1.info.sampleRateHz)) checkSrsGrid(fnHz, q, src1.info.sampleRateHz, file);
  const bg = new Background();
  const progress = options.onProgress;
  const analysis = await analyzeSource(src1, {
    ...base,
    accumulators: [bg],
    onProgress: progress && ((d, t) => progress(d / 2, t)),
  });
  const {
    meanSquares: stretches,
    means: stretchMeans,
    baselines,
  } = analysis.extras[0] as ReturnType<Background["finish"]>;
  const fs = analysis.input.sampleRateHz;
  const notes: Finding[] = [];
  const doubts: Finding[] = [...analysis.passDoubts];
  // The read's own doubts (non-finite samples, a clipped or saturated signal, held samples) carry over: a clipped
  // shock's peak and SRS are too low.
  for (const ch of analysis.channels)
    for (const d of ch.doubts) doubts.push({ ...d, about: { ...d.about, channel: ch.name } });
  const per = channelLevels(file, analysis, stretches, baselines, options.threshold, factor);
  // Read 2: events and spectra.
  const ev = new Events({
    means: per.map((p) => p.mean),
    thresholds: per.map((p) => p.threshold),
    holdS,
    preS,
    postS,
    fnHz,
    q,
    maxEvents: options.maxEvents,
    file,
  });
  const pass2 = await analyzeSource(await open(), {
    ...base,
    spectrum: false,
    accumulators: [ev],
    onProgress: progress && ((d, t) => progress(t / 2 + d / 2, t)),
  });
  if (pass2.input.sha256 !== analysis.input.sha256)
    throw new InputError("RECORDING_CHANGED", {
      file,
      expected: "the same file on both reads",
      received: "a different SHA-256 on the second read",
    });
  const found = pass2.extras[0] as ReturnType<Events["finish"]>;
  for (const [c, ch] of analysis.channels.entries()) {
    const drift = baselineDrift(stretchMeans[c] ?? [], per[c]!, found[c]!, fs);
    if (drift) doubts.push({ ...drift, about: { channel: ch.name } });
  }
  const rate = { sampleRateHz: fs, ...srsRateLimit(fnHz, fs) };
  if (rate.samplesPerPeriod < SRS_SAMPLES_PER_PERIOD) {
    notes.push({
      code: "SRS_FEW_SAMPLES",
      values: {
        highestFnHz: rate.highestFnHz,
        samplesPerPeriod: rate.samplesPerPeriod,
        minimum: SRS_SAMPLES_PER_PERIOD,
        shortfallPercent: 100 * rate.peakShortfallBound,
      },
    });
  }
  const g = { analysis, primaryResidual: options.primaryResidual, postS };
  const channels = analysis.channels.map((ch, c) => shockChannel(ch, per[c]!, found[c]!, g, notes));
  return {
    analysis,
    settings: {
      fnHz,
      q,
      holdS,
      preS,
      postS,
      thresholdGiven: options.threshold,
      thresholdFactor: options.threshold === undefined ? factor : undefined,
      primaryResidual: options.primaryResidual === true,
    },
    rate,
    channels,
    notes,
    doubts,
  };
}
