import { longestDeadRun } from "../compare/levelGate.js";
import {
  analyzeSource,
  type AnalysisOptions,
  type PassAccumulator,
  type RecordingAnalysis,
} from "../pass/analyzeRecording.js";
import type { ResolvedAnalysis } from "../pass/analysisOptions.js";
import { channelIndex } from "../read/channelChoice.js";
import {
  axisRules,
  basicMethodCheck,
  comfortReactions,
  dailyExposure,
  seatTransmissibility,
  vibrationTotalValue,
  ISO_2631_HEALTH_ZONE,
  type HealthZone,
  type Axis,
  type AxisRule,
  type BasicMethodCheck,
  type DailyExposure,
  type Posture,
} from "../compare/wholeBodyExposure.js";
import { InputError, quoted } from "../errors.js";
import type { PeakHoldPsd } from "../estimate/spectral/peakHoldPsd.js";
import type { Finding } from "../findings.js";
import { stationarityFinding, type StationarityFinding } from "../estimate/statistics/stationarityTests.js";
import { WelchWeightedMeanSquare } from "../estimate/spectral/welchTimeWeights.js";
import {
  BandSpectrogramAccumulator,
  thirdOctaveBands,
  type BandSpectrogram,
} from "../estimate/spectral/bandSpectrogram.js";
import { SegmentPower } from "../estimate/spectral/segmentPower.js";
import { spectralWindow } from "../estimate/spectral/windows.js";
import { openTimeHistory } from "../read/openTimeHistory.js";
import type { TimeHistorySource } from "../read/timeHistory.js";
import type { BiquadCascade } from "../weight/bilinearBiquads.js";
import { THIRD_OCTAVE_CENTRES_HZ, weightingPowerGains, type WeightingName } from "../weight/isoWeightings.js";
import { VibrationDoseAccumulator, type VibrationDose } from "../weight/vibrationDose.js";
import {
  designWeightingFilter,
  MIN_WEIGHTING_RATE_HZ,
  SETTLE_S,
  spectrumErrorRatio,
  weightingCascade,
  type WeightingFilterDesign,
} from "../weight/weightingFilter.js";

/**
 * A ride recording judged for whole-body vibration (ISO 2631-1:1997, Directive 2002/44/EC): one pass
 * gives the unweighted PSD of every axis (the psd machinery) and, through an extra accumulator, the
 * time-domain weighted signal's a_w, crest factor, VDV, running r.m.s. and MTVV. a_w also comes from the
 * PSD, sum |W(f)|^2 P(f) df, and the two routes are compared.
 */
export interface RideOptions
  extends Omit<AnalysisOptions, "channels" | "resultUnits" | "accumulators" | "spectrum" | "histogram"> {
  /** Channel (name or 1-based position) of each measured axis; at least one. */
  axes: Partial<Record<Axis, string>>;
  posture: Posture;
  /**
   * Stated daily exposure the recording stands for, s. Without it there is no A(8), daily VDV or judgement against the
   * Directive (EXPOSURE_NOT_GIVEN).
   */
  exposureS?: number | undefined;
  /** Channel of the vertical floor acceleration beneath the seat, for the seat's transmissibility. */
  floor?: string | undefined;
  /** Integration time of the running r.m.s. (MTVV), s; default 1. */
  runningRmsS?: number | undefined;
  /** Also build a one-third-octave spectrogram of each axis (for the report): stretches of two segments. */
  spectrogram?: boolean | undefined;
  /** The ISO 2631-1 Annex B caution zone the lab confirmed (default ISO_2631_HEALTH_ZONE, psdgate's values). */
  healthZone?: HealthZone | undefined;
}

export interface RideAxis {
  axis: Axis;
  channel: string;
  weighting: WeightingName;
  rule: AxisRule;
  dose: VibrationDose;
  /** a_w from the unweighted PSD and |W(f)|^2. */
  awFromPsd: number;
  /** a_w in time with the weights Welch gives each sample (tapered ends, no trailing partial segment). */
  awWelchWeighted: number;
  /** a_w from the PSD over a_w in time with Welch's sample weights: the like-for-like check of the two routes. */
  routeRatio: number;
  basicMethod: BasicMethodCheck;
  /** Reverse-arrangements test on the weighted stretch mean squares. */
  stationarity: StationarityFinding;
  filter: {
    method: "bilinear" | "fitted";
    maxErrorPct: number;
    maxErrorAtHz: number;
    topCentreHz: number;
    heldSamples: number;
  };
  /** Unweighted one-third-octave spectrogram, when asked for. */
  spectrogram?: BandSpectrogram | undefined;
  /** Unweighted peak-hold spectrum (the largest stretch PSD at each line), when `peakHoldS` asks for one. */
  peakHold?: PeakHoldPsd | undefined;
}

export interface RideResult {
  analysis: RecordingAnalysis;
  posture: Posture;
  axes: RideAxis[];
  /** Vibration total values: with the health factors and with the comfort factors. */
  totalValue: { health: number; comfort: number };
  comfort: { reactions: string[] };
  /** The daily exposure, when one was stated. */
  exposure?: DailyExposure | undefined;
  /** The caution zone the exposure is placed in, and where its values came from. */
  healthZone: HealthZone & { from: "default" | "given" };
  seat?:
    | {
        floorChannel: string;
        awFloor: number;
        awFloorFromPsd: number;
        awFloorWelchWeighted: number;
        awSeat: number;
        seat: number;
      }
    | undefined;
  /** What the ride notes and doubts, as findings with their codes and numbers (report/findingTexts.ts says them). */
  notes: Finding[];
  doubts: Finding[];
}

/**
 * Largest allowed difference between the two routes to a_w before the result carries a doubt, beyond the weighting
 * filter's stated error at the rate.
 */
export const ROUTE_TOLERANCE = 0.01;

/**
 * How far, in percentage points, the realisation's error on a record's spectrum may exceed the error stated at the
 * centres before WEIGHTING_ERROR_ON_RECORD says it: at 1000 Hz the stated error is 0.002 % and strong content at
 * 250-350 Hz moves a_w by 0.04 % (scipy.signal.sosfreqz against freqs), which is not worth a note.
 */
export const RECORD_ERROR_MARGIN_PCT = 0.1;

/** The extra accumulator: weights each listed channel in the time domain and feeds its dose figures. */
class WeightedDoses
  implements
    PassAccumulator<
      {
        dose: VibrationDose;
        design: WeightingFilterDesign;
        heldSamples: number;
        welchMeanSquare: number;
        spectrogram?: BandSpectrogram | undefined;
      }[]
    >
{
  private filters: BiquadCascade[] = [];
  private spectrograms: (BandSpectrogramAccumulator | undefined)[] = [];
  private welch: WelchWeightedMeanSquare[] = [];
  private designs: WeightingFilterDesign[] = [];
  private doses: VibrationDoseAccumulator[] = [];
  private scratch = new Float64Array(0);
  /** The record's first samples per channel, held until the filters can settle on them (SETTLE_S). */
  private head: Float64Array[] = [];
  private headFill = 0;
  private settled = false;

  constructor(
    private readonly file: string,
    private readonly plan: { index: number; weighting: WeightingName }[],
    private readonly runningRmsS: number,
    private readonly spectrogram: boolean,
  ) {}

  /**
   * The filters at the announced rate; Welch's geometry (for the like-for-like mean square and the spectrogram) from
   * the pass's one resolved analysis.
   */
  start(designRateHz: number, analysis: ResolvedAnalysis): void {
    if (!(designRateHz >= MIN_WEIGHTING_RATE_HZ)) {
      // A rate the reader could not settle (a degenerate CSV) is left to the read's own error.
      if (!Number.isFinite(designRateHz)) return;
      throw new InputError("RIDE_RATE_TOO_LOW", {
        file: this.file,
        expected: `a sample rate of at least ${MIN_WEIGHTING_RATE_HZ} Hz (below it the record covers less than the ISO 2631-1 bands to 40 Hz)`,
        received: `${designRateHz} Hz`,
      });
    }
    this.designs = this.plan.map((p) => designWeightingFilter(p.weighting, designRateHz));
    this.filters = this.designs.map(weightingCascade);
    this.head = this.plan.map(() => new Float64Array(Math.round(SETTLE_S * designRateHz)));
    this.doses = this.plan.map(() => new VibrationDoseAccumulator(designRateHz, { runningRmsS: this.runningRmsS }));
    const g = analysis.welch;
    const n = g.segmentLength;
    const window = spectralWindow(g.window, n);
    this.welch = this.plan.map(() => new WelchWeightedMeanSquare(window, g.hop));
    const power = new SegmentPower(n);
    const bands = thirdOctaveBands(THIRD_OCTAVE_CENTRES_HZ.filter((c) => c * 2 ** (1 / 6) < designRateHz / 2));
    this.spectrograms = this.plan.map(() =>
      this.spectrogram
        ? new BandSpectrogramAccumulator(
            { segmentLength: n, hop: g.hop, window, detrend: g.detrend },
            power,
            2 * n,
            bands,
            designRateHz,
          )
        : undefined,
    );
  }

  push(blocks: Float64Array[], frames: number): void {
    for (let i = 0; i < this.plan.length; i++) this.spectrograms[i]?.push(blocks[this.plan[i]!.index]!, frames);
    let from = 0;
    if (!this.settled) {
      // Hold the first SETTLE_S seconds: the filters settle on them (played backwards) before the first sample.
      const len = this.head[0]?.length ?? 0;
      const take = Math.min(frames, len - this.headFill);
      for (let i = 0; i < this.plan.length; i++)
        this.head[i]!.set(blocks[this.plan[i]!.index]!.subarray(0, take), this.headFill);
      this.headFill += take;
      from = take;
      if (this.headFill < len) return;
      this.flushHead();
    }
    if (from < frames) this.weigh((i) => blocks[this.plan[i]!.index]!.subarray(from, frames), frames - from);
  }

  private flushHead(): void {
    this.settled = true;
    if (this.headFill > 0) this.weigh((i) => this.head[i]!, this.headFill);
  }

  private weigh(input: (i: number) => Float64Array, frames: number): void {
    if (this.scratch.length < frames) this.scratch = new Float64Array(frames);
    const y = this.scratch;
    for (let i = 0; i < this.plan.length; i++) {
      this.filters[i]!.process(input(i), y, frames);
      this.doses[i]!.push(y, frames);
      this.welch[i]!.push(y, frames);
    }
  }

  finish(sampleRateHz: number) {
    if (!this.settled) this.flushHead();
    return this.plan.map((_, i) => ({
      dose: this.doses[i]!.finish(sampleRateHz),
      design: this.designs[i]!,
      heldSamples: this.filters[i]!.heldSamples,
      welchMeanSquare: this.welch[i]!.finish().meanSquare,
      spectrogram: this.spectrograms[i]?.finish(sampleRateHz),
    }));
  }
}

/** a_w from a one-sided PSD: sqrt(sum_k |W(f_k)|^2 P_k df), the DC line included at its own weight (zero). */
export function weightedRmsFromPsd(
  psd: Float64Array,
  frequencyHz: Float64Array,
  lineSpacingHz: number,
  weighting: WeightingName,
): number {
  const g = weightingPowerGains(weighting, frequencyHz);
  let s = 0;
  for (let k = 0; k < psd.length; k++) s += g[k]! * psd[k]!;
  return Math.sqrt(s * lineSpacingHz);
}

export async function rideRecording(file: string, options: RideOptions): Promise<RideResult> {
  const source = await openTimeHistory(file, { ...options.csv, sampleRateHz: options.csv?.sampleRateHz });
  return rideSource(source, options);
}

/**
 * Ride's pass: the axes and the floor picked the one way (read/channelChoice.ts), checked, and the one pass
 * with the weighting listener, Welch resolved once with ride's defaults (in the pass's resolved analysis).
 */
async function ridePass(source: TimeHistorySource, options: RideOptions) {
  const { info } = source;
  const axes = (["x", "y", "z"] as const).filter((a) => options.axes[a] !== undefined);
  if (axes.length === 0)
    throw new InputError("OPTION_INVALID", {
      option: "axes",
      expected: "at least one of x=CH, y=CH, z=CH",
      received: "none",
    });
  if (options.exposureS !== undefined && !(options.exposureS > 0 && options.exposureS <= 86400)) {
    throw new InputError("OPTION_INVALID", {
      option: "exposureS",
      expected: "a daily exposure above 0 and at most 24 h",
      received: String(options.exposureS),
    });
  }
  const names = axes.map((a) => options.axes[a]!);
  if (options.floor !== undefined) names.push(options.floor);
  const indexes = names.map((n, i) =>
    channelIndex(info.channels, n, { option: i < axes.length ? "axes" : "floor", file: info.file }),
  );
  const dup = indexes.findIndex((v, i) => indexes.indexOf(v) !== i);
  if (dup >= 0)
    throw new InputError("OPTION_INVALID", {
      option: dup < axes.length ? "axes" : "floor",
      expected: "a different channel for each axis and the floor",
      received: quoted(names[dup]!),
    });
  const rules = axisRules(options.posture);
  const plan = names.map((_, i) => ({
    index: i,
    weighting: i < axes.length ? rules[axes[i]!].weighting : ("Wk" as WeightingName),
  }));
  const runningRmsS = options.runningRmsS ?? 1;
  if (!(runningRmsS > 0 && runningRmsS <= 60))
    throw new InputError("OPTION_INVALID", {
      option: "runningRmsS",
      expected: "an integration time in s, 0 < t <= 60",
      received: String(runningRmsS),
    });
  // Ride defaults: lines of 0.125 Hz or finer, so the 0.4 Hz band limit and the Wd plateau near 1 Hz are
  // resolved (common practice), and 75 % overlap, where a Hann window's w^2 adds up to a constant, so
  // every sample inside the record counts alike in the PSD (a pothole weighs the same wherever it falls).
  const welch = {
    ...(options.segmentLength === undefined && options.resolutionHz === undefined ? { resolutionHz: 0.125 } : {}),
    overlap: options.overlap ?? 0.75,
  };
  const weighted = new WeightedDoses(info.file, plan, runningRmsS, options.spectrogram === true);
  // One resolveAnalysis: the pass resolves Welch's settings with ride's defaults and hands them to the listener.
  const analysis = await analyzeSource(source, {
    ...options,
    ...welch,
    channels: indexes.map((i) => i + 1),
    resultUnits: "m/s2",
    accumulators: [weighted],
    stretchS: options.stretchS ?? runningRmsS,
  });
  const results = analysis.extras[0] as ReturnType<WeightedDoses["finish"]>;
  // No figures from no data: an axis whose every sample is NaN or infinite has no a_w, VDV or MTVV (the
  // filters hold the last finite value, and there is none), so it is refused rather than shown as 0.
  for (const ch of analysis.channels) {
    if (analysis.window.frames === 0 || ch.stats.nonFinite >= analysis.window.frames) {
      throw new InputError("RECORD_TOO_SHORT", {
        file: analysis.input.file,
        field: ch.name,
        expected: "finite samples to weight",
        received: `${analysis.window.frames} samples, ${analysis.window.frames === 0 ? "none" : "all"} of them NaN or infinite`,
      });
    }
  }
  refuseShortWindow(analysis, options, runningRmsS);
  return { axes, rules, plan, analysis, results };
}

/**
 * A window shorter than the weighting filters' settling (SETTLE_S: the 0.4 Hz band limit's start decays over it) or
 * than one running r.m.s. (no MTVV at all) is refused, not reported with a doubt: ride's figures feed an exposure
 * (A(8), the Directive's action and limit values), and a practitioner does not rate a day's exposure from a fraction
 * of a second, so a figure from such a window would only be quoted wrongly. The option that set the window is named.
 */
function refuseShortWindow(analysis: RecordingAnalysis, options: RideOptions, runningRmsS: number): void {
  const needS = Math.max(SETTLE_S, runningRmsS);
  const haveS = analysis.window.frames / analysis.input.sampleRateHz;
  if (haveS >= needS) return;
  const option =
    options.toS !== undefined
      ? "toS"
      : options.toClock !== undefined
        ? "toClock"
        : options.fromS !== undefined
          ? "fromS"
          : options.fromClock !== undefined
            ? "fromClock"
            : undefined;
  throw new InputError("RECORD_TOO_SHORT", {
    file: analysis.input.file,
    option,
    expected: `an analysed window of at least ${needS} s (the weighting filters settle over ${SETTLE_S} s; the running r.m.s. integrates over ${runningRmsS} s)`,
    received: `${Number(haveS.toPrecision(4))} s`,
    ...(runningRmsS > SETTLE_S ? { hint: "a shorter `runningRmsS`" } : {}),
  });
}

/** What ride's one pass gave: the axes, their rules and plan, the analysis and the weighting listener's results. */
type RidePass = Awaited<ReturnType<typeof ridePass>>;
type RideChannel = RecordingAnalysis["channels"][number];
type WeightedResult = RidePass["results"][number];

/** a_w of a channel from its unweighted PSD and a weighting. */
function awFromChannelPsd(analysis: RecordingAnalysis, c: number, w: WeightingName): number {
  const p = analysis.channels[c]!.psd;
  return weightedRmsFromPsd(p.psd, p.frequencyHz, p.lineSpacingHz, w);
}

/**
 * A level that changes along the record (stops, curves, a tilting sensor) is a property of the ride, not a
 * fault: where the weighted or the unweighted level failed the stationarity test, the two spectral checks
 * are notes that say so, with the test's result; on a stationary record they stay doubts.
 * The first failed test among the weighted and unweighted stretches: reverse arrangements (trends) or the
 * run test (clusters, such as a stop mid-record, which a trend test does not see), with its figures and words.
 */
function movingLevel(stationarity: StationarityFinding, ch: RideChannel) {
  const tests = [
    { t: stationarity.reverseArrangements, of: "weighted" },
    { t: stationarity.runs, of: "weighted" },
    { t: ch.stationarity.reverseArrangements, of: "unweighted" },
    { t: ch.stationarity.runs, of: "unweighted" },
  ];
  const moving = tests.find((x) => x.t !== undefined && !x.t.stationary);
  const movingValues: Record<string, number> = moving
    ? {
        statistic: moving.t!.statistic,
        acceptAbove: moving.t!.acceptAbove,
        acceptAtMost: moving.t!.acceptAtMost,
        values: moving.t!.n,
      }
    : {};
  // Which level failed which test: the sentence names them (report/findingTexts.ts).
  const movingAbout = moving
    ? { level: moving.of, test: moving.t!.test === "runs" ? "runs" : "reverse-arrangements" }
    : {};
  return { moving, movingValues, movingAbout };
}

/** The findings of an axis, in the order they are said. */
interface RideFindings {
  notes: Finding[];
  doubts: Finding[];
}

/**
 * An axis's two routes to a_w (PSD against time with Welch's weights) and the PSD against the plain r.m.s., and held
 * samples.
 */
function routeFindings(
  a: {
    axis: Axis;
    ch: RideChannel;
    r: WeightedResult;
    awFromPsd: number;
    routeRatio: number;
    /** The realisation's error on this record's spectrum (spectrumErrorRatio); NaN without a PSD. */
    recordRatio: number;
    moving: ReturnType<typeof movingLevel>;
  },
  segmentLength: number,
  out: RideFindings,
): void {
  const { axis, ch, r, awFromPsd, routeRatio, recordRatio } = a;
  const { moving, movingValues, movingAbout } = a.moving;
  const noPsd = ch.psd.averages === 0;
  const onAxis = { axis };
  const onChannel = { axis, channel: ch.name };
  // What the realisation does to this record's own spectrum, said when it exceeds the error stated at the centres
  // (content between the centres, in the top band or above it up to Nyquist), and taken out of the two checks below,
  // which would otherwise put it down to the ride or to Welch.
  const known = Number.isFinite(recordRatio) ? recordRatio : 1;
  if (Math.abs(known - 1) * 100 > r.design.maxErrorPct + RECORD_ERROR_MARGIN_PCT)
    out.notes.push({
      code: "WEIGHTING_ERROR_ON_RECORD",
      values: {
        offPercent: 100 * (known - 1),
        statedPercent: Number(r.design.maxErrorPct.toPrecision(2)),
        topCentreHz: r.design.topCentreHz,
        nyquistHz: r.design.sampleRateHz / 2,
      },
      about: onAxis,
    });
  if (noPsd) out.notes.push({ code: "NO_PSD_ROUTE", values: { segmentLength }, about: onAxis });
  // The two routes differ by the realisation's own error too (|W| is exact on the PSD route): its error on this record
  // is taken out, and 1 % plus the error stated at the centres allowed.
  else if (!(Math.abs(routeRatio * known - 1) <= ROUTE_TOLERANCE + r.design.maxErrorPct / 100)) {
    const values = {
      offPercent: 100 * (routeRatio - 1),
      allowedPercent: Number((100 * ROUTE_TOLERANCE + r.design.maxErrorPct).toPrecision(2)),
    };
    if (moving)
      out.notes.push({
        code: "ROUTES_DIFFER_NOT_STATIONARY",
        values: { ...values, ...movingValues },
        about: { ...onChannel, ...movingAbout },
      });
    else out.doubts.push({ code: "ROUTES_DIFFER", values, about: onChannel });
  }
  const plain = (awFromPsd * known) / r.dose.rms;
  if (!noPsd && Math.abs(plain - 1) > ROUTE_TOLERANCE)
    out.notes.push({ code: "PSD_VS_PLAIN", values: { offPercent: 100 * (plain - 1) }, about: onAxis });
  if (r.heldSamples > 0)
    out.doubts.push({ code: "NON_FINITE_HELD", values: { samples: r.heldSamples }, about: onChannel });
}

/** LEVEL_NOT_STATIONARY when the weighted level failed the reverse-arrangements test, with where it departed most. */
function levelNote(stationarity: StationarityFinding, axis: Axis, exposureGiven: boolean): Finding | undefined {
  if (!(stationarity.tested && !stationarity.stationary)) return undefined;
  const t = stationarity.reverseArrangements!;
  const dep = stationarity.departing[0];
  return {
    code: "LEVEL_NOT_STATIONARY",
    values: {
      statistic: t.statistic,
      acceptAbove: t.acceptAbove,
      acceptAtMost: t.acceptAtMost,
      values: t.n,
      ...(dep
        ? {
            departingFromS: Math.round(dep.fromS),
            departingToS: Math.round(dep.toS),
            departingDb: Math.round(10 * dep.levelDb) / 10,
          }
        : {}),
    },
    about: { axis, exposure: exposureGiven },
  };
}

/**
 * The read's doubts and held-sample notes of an axis's channel, carried over (Parseval's on a moving level as a note).
 */
function channelFindings(
  axis: Axis,
  ch: RideChannel,
  moving: ReturnType<typeof movingLevel>,
  out: RideFindings,
  fromS: number,
): void {
  const onChannel = { axis, channel: ch.name };
  // A stretch with no signal at all (a logger that froze or dropped out: one held value or zeros) counts in a_w, VDV
  // and A(8) as no vibration, which understates them; too short to fail the stationarity test, it is said here.
  const dead = ch.stretchMeanSquares ? longestDeadRun(ch.stretchMeanSquares) : undefined;
  if (dead) {
    const s = ch.stationarity.stretchS;
    out.doubts.push({
      code: "DEAD_STRETCH",
      values: { fromS: fromS + dead.from * s, toS: fromS + dead.to * s },
      about: onChannel,
    });
  }
  for (const f of ch.doubts) {
    if (f.code === "TOO_SHORT") continue;
    if (f.code === "PARSEVAL_MISMATCH" && moving.moving)
      out.notes.push({
        code: "PARSEVAL_NOT_STATIONARY",
        values: { ...f.values, ...moving.movingValues },
        about: { ...f.about, ...onChannel, ...moving.movingAbout },
      });
    else out.doubts.push({ ...f, about: { ...f.about, ...onChannel } });
  }
  for (const f of ch.notes)
    if (f.code === "HELD_SAMPLES") out.notes.push({ ...f, about: { ...f.about, ...onChannel } });
}

/** One axis's figures (a_w by both routes, the basic method's check, stationarity, the filter) and its findings. */
function rideAxis(pass: RidePass, c: number, options: RideOptions, out: RideFindings): RideAxis {
  const { analysis, plan, rules } = pass;
  const axis = pass.axes[c]!;
  const r = pass.results[c]!;
  const ch = analysis.channels[c]!;
  const weighting = plan[c]!.weighting;
  const awFromPsd = awFromChannelPsd(analysis, c, weighting);
  const d = r.dose;
  const stationarity = stationarityFinding(d.stretchMeanSquares, d.stretchS, analysis.window.fromS);
  const awWelchWeighted = Math.sqrt(r.welchMeanSquare);
  const routeRatio = awFromPsd / awWelchWeighted;
  const recordRatio = ch.psd.averages > 0 ? spectrumErrorRatio(r.design, ch.psd.psd, ch.psd.frequencyHz) : NaN;
  const moving = movingLevel(stationarity, ch);
  routeFindings({ axis, ch, r, awFromPsd, routeRatio, recordRatio, moving }, analysis.settings.segmentLength, out);
  const level = levelNote(stationarity, axis, options.exposureS !== undefined);
  if (level) out.notes.push(level);
  channelFindings(axis, ch, moving, out, analysis.window.fromS);
  const basicMethod = basicMethodCheck(d.rms, d.crestFactor, d.mtvv, d.vdv, d.durationS);
  if (!basicMethod.adequate) {
    out.notes.push({
      code: "BASIC_METHOD_EXCEEDED",
      values: {
        crestFactor: basicMethod.crestFactor,
        mtvvRatio: basicMethod.mtvvRatio,
        vdvRatio: basicMethod.vdvRatio,
      },
      about: { axis },
    });
  }
  return {
    axis,
    channel: ch.name,
    weighting,
    rule: rules[axis],
    dose: d,
    awFromPsd,
    awWelchWeighted,
    routeRatio,
    basicMethod,
    stationarity,
    filter: {
      method: r.design.method,
      maxErrorPct: r.design.maxErrorPct,
      maxErrorAtHz: r.design.maxErrorAtHz,
      topCentreHz: r.design.topCentreHz,
      heldSamples: r.heldSamples,
    },
    spectrogram: r.spectrogram,
    peakHold: ch.peakHold,
  };
}

/**
 * The realisation's error, in every result (first among the notes): which figures carry it and which do not; and a band
 * cut short by the rate.
 */
function weightingNotes(results: WeightedResult[], fs: number, options: RideOptions, notes: Finding[]): void {
  const worst = results.reduce((w, r) => (r.design.maxErrorPct > w.design.maxErrorPct ? r : w), results[0]!).design;
  notes.unshift({
    code: "WEIGHTING_ERROR",
    values: {
      rateHz: fs,
      maxErrorPercent: Number(worst.maxErrorPct.toPrecision(2)),
      atHz: worst.maxErrorAtHz,
      topCentreHz: worst.topCentreHz,
    },
    // Which figures carry the error: those of the exposure and the seat as well, when asked for.
    about: { filters: results.length, exposure: options.exposureS !== undefined, floor: options.floor !== undefined },
  });
  if (worst.topCentreHz < 80) {
    notes.splice(1, 0, {
      code: "BAND_SHORT",
      values: { nyquistHz: fs / 2, topCentreHz: worst.topCentreHz },
    });
  }
}

/**
 * The daily exposure (when one is stated), the caution zone, the vibration total values, and what the axes and posture
 * leave out.
 */
function exposureFigures(pass: RidePass, rideAxes: RideAxis[], options: RideOptions, notes: Finding[]) {
  const { axes, rules } = pass;
  const figures = rideAxes.map((a) => ({ axis: a.axis, aw: a.dose.rms, vdv: a.dose.vdv, durationS: a.dose.durationS }));
  const exposure =
    options.exposureS !== undefined
      ? dailyExposure(figures, rules, options.exposureS, options.healthZone ?? ISO_2631_HEALTH_ZONE)
      : undefined;
  const healthZone = {
    ...(options.healthZone ?? ISO_2631_HEALTH_ZONE),
    from: options.healthZone ? ("given" as const) : ("default" as const),
  };
  if (exposure === undefined) notes.push({ code: "EXPOSURE_NOT_GIVEN", values: {} });
  const totalValue = {
    health: vibrationTotalValue(figures, (a) => rules[a].healthK),
    comfort: vibrationTotalValue(figures, (a) => rules[a].comfortK),
  };
  if (axes.length < 3)
    notes.push({ code: "AXES_MISSING", values: {}, about: { axes: [...axes], exposure: exposure !== undefined } });
  if (options.posture === "recumbent") notes.push({ code: "POSTURE_RECUMBENT", values: {} });
  if (options.posture !== "seated")
    notes.push({ code: "POSTURE_NOT_SEATED", values: {}, about: { posture: options.posture } });
  return { exposure, healthZone, totalValue };
}

/** The seat's transmissibility from the floor channel (after the axes) and the seat's z, when a floor is given. */
function seatFigures(pass: RidePass, rideAxes: RideAxis[], options: RideOptions, notes: Finding[]): RideResult["seat"] {
  if (options.floor === undefined) return undefined;
  const { analysis, results } = pass;
  const c = pass.axes.length;
  const floorDose = results[c]!.dose;
  const zAxis = rideAxes.find((a) => a.axis === "z");
  if (zAxis === undefined) {
    notes.push({ code: "FLOOR_WITHOUT_Z", values: {} });
    return undefined;
  }
  return {
    floorChannel: analysis.channels[c]!.name,
    awFloor: floorDose.rms,
    awFloorFromPsd: awFromChannelPsd(analysis, c, "Wk"),
    awFloorWelchWeighted: Math.sqrt(results[c]!.welchMeanSquare),
    awSeat: zAxis.dose.rms,
    seat: seatTransmissibility(zAxis.dose.rms, floorDose.rms),
  };
}

/** A ride source's whole-body vibration: the pass, each axis's figures and findings, the exposure, the seat. */
export async function rideSource(source: TimeHistorySource, options: RideOptions): Promise<RideResult> {
  const pass = await ridePass(source, options);
  const { analysis, results } = pass;
  const findings: RideFindings = { notes: [], doubts: [...analysis.passDoubts] };
  const { notes, doubts } = findings;
  const rideAxes: RideAxis[] = pass.axes.map((_, c) => rideAxis(pass, c, options, findings));
  weightingNotes(results, analysis.input.sampleRateHz, options, notes);
  const { exposure, healthZone, totalValue } = exposureFigures(pass, rideAxes, options, notes);
  const seat = seatFigures(pass, rideAxes, options, notes);
  return {
    analysis,
    posture: options.posture,
    axes: rideAxes,
    totalValue,
    comfort: { reactions: comfortReactions(totalValue.comfort) },
    exposure,
    healthZone,
    seat,
    notes,
    doubts,
  };
}
