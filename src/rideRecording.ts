import { selectChannels } from "./resolveAnalysis.js";
import { analyzeSource, type AnalysisOptions, type PassAccumulator, type RecordingAnalysis } from "./analyzeRecording.js";
import {
  axisRules, basicMethodCheck, comfortReactions, dailyExposure, seatTransmissibility, vibrationTotalValue, ISO_2631_HEALTH_ZONE, type HealthZone,
  type Axis, type AxisRule, type BasicMethodCheck, type DailyExposure, type Posture,
} from "./compare/wholeBodyExposure.js";
import { InputError, quoted } from "./errors.js";
import { stationarityFinding, type StationarityFinding } from "./estimate/stationarityTests.js";
import { normalizeWelchOptions } from "./estimate/welchOptions.js";
import { WelchWeightedMeanSquare } from "./estimate/welchTimeWeights.js";
import { BandSpectrogramAccumulator, thirdOctaveBands, type BandSpectrogram } from "./estimate/bandSpectrogram.js";
import { SegmentPower } from "./estimate/segmentPower.js";
import { spectralWindow } from "./estimate/windows.js";
import { openTimeHistory } from "./read/openTimeHistory.js";
import type { TimeHistorySource } from "./read/timeHistory.js";
import type { BiquadCascade } from "./weight/bilinearBiquads.js";
import { THIRD_OCTAVE_CENTRES_HZ, weightingPowerGains, type WeightingName } from "./weight/isoWeightings.js";
import { VibrationDoseAccumulator, type VibrationDose } from "./weight/vibrationDose.js";
import { designWeightingFilter, MIN_WEIGHTING_RATE_HZ, weightingCascade, type WeightingFilterDesign } from "./weight/weightingFilter.js";

/**
 * A ride recording judged for whole-body vibration (ISO 2631-1:1997, Directive 2002/44/EC): one pass
 * gives the unweighted PSD of every axis (the psd machinery) and, through an extra accumulator, the
 * time-domain weighted signal's a_w, crest factor, VDV, running r.m.s. and MTVV. a_w also comes from the
 * PSD, sum |W(f)|^2 P(f) df, and the two routes are compared.
 */
export interface RideOptions extends Omit<AnalysisOptions, "channels" | "resultUnits" | "accumulators" | "spectrum" | "histogram"> {
  /** Channel (name or 1-based position) of each measured axis; at least one. */
  axes: Partial<Record<Axis, string>>;
  posture: Posture;
  /** Stated daily exposure the recording stands for, s. */
  exposureS: number;
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
  filter: { maxErrorPct: number; maxErrorAtHz: number; heldSamples: number };
  /** Unweighted one-third-octave spectrogram, when asked for. */
  spectrogram?: BandSpectrogram | undefined;
}

export interface RideResult {
  analysis: RecordingAnalysis;
  posture: Posture;
  axes: RideAxis[];
  /** Vibration total values: with the health factors and with the comfort factors. */
  totalValue: { health: number; comfort: number };
  comfort: { reactions: string[] };
  exposure: DailyExposure;
  /** The caution zone the exposure was placed in, and where its values came from. */
  healthZone: HealthZone & { from: "default" | "given" };
  seat?: { floorChannel: string; awFloor: number; awFloorFromPsd: number; awFloorWelchWeighted: number; awSeat: number; seat: number } | undefined;
  notes: string[];
  doubts: string[];
}

/** Largest allowed difference between the two routes to a_w before the result carries a doubt. */
export const ROUTE_TOLERANCE = 0.01;

/** The extra accumulator: weights each listed channel in the time domain and feeds its dose figures. */
class WeightedDoses implements PassAccumulator<{ dose: VibrationDose; design: WeightingFilterDesign; heldSamples: number; welchMeanSquare: number; spectrogram?: BandSpectrogram | undefined }[]> {
  private filters: BiquadCascade[] = [];
  private spectrograms: (BandSpectrogramAccumulator | undefined)[] = [];
  private welch: WelchWeightedMeanSquare[] = [];
  private designs: WeightingFilterDesign[] = [];
  private doses: VibrationDoseAccumulator[] = [];
  private scratch = new Float64Array(0);

  constructor(
    private readonly file: string, private readonly plan: { index: number; weighting: WeightingName }[], private readonly runningRmsS: number,
    private readonly welchGeometry: { window: Float64Array; hop: number; detrend: "none" | "mean" | "linear"; spectrogram: boolean },
  ) {}

  start(designRateHz: number): void {
    if (!(designRateHz >= MIN_WEIGHTING_RATE_HZ)) {
      // A rate the reader could not settle (a degenerate CSV) is left to the read's own error.
      if (!Number.isFinite(designRateHz)) return;
      throw new InputError("RIDE_RATE_TOO_LOW", {
        file: this.file, expected: `a sample rate of at least ${MIN_WEIGHTING_RATE_HZ} Hz (the ISO 2631-1 weightings run to 100 Hz)`, received: `${designRateHz} Hz`,
      });
    }
    this.designs = this.plan.map((p) => designWeightingFilter(p.weighting, designRateHz));
    this.filters = this.designs.map(weightingCascade);
    this.doses = this.plan.map(() => new VibrationDoseAccumulator(designRateHz, { runningRmsS: this.runningRmsS }));
    this.welch = this.plan.map(() => new WelchWeightedMeanSquare(this.welchGeometry.window, this.welchGeometry.hop));
    const g = this.welchGeometry;
    const n = g.window.length;
    const power = new SegmentPower(n);
    const bands = thirdOctaveBands(THIRD_OCTAVE_CENTRES_HZ.filter((c) => c * 2 ** (1 / 6) < designRateHz / 2));
    this.spectrograms = this.plan.map(() => (g.spectrogram ? new BandSpectrogramAccumulator({ segmentLength: n, hop: g.hop, window: g.window, detrend: g.detrend }, power, 2 * n, bands, designRateHz) : undefined));
  }

  push(blocks: Float64Array[], frames: number): void {
    if (this.scratch.length < frames) this.scratch = new Float64Array(frames);
    const y = this.scratch;
    for (let i = 0; i < this.plan.length; i++) {
      this.spectrograms[i]?.push(blocks[this.plan[i]!.index]!, frames);
      this.filters[i]!.process(blocks[this.plan[i]!.index]!, y, frames);
      this.doses[i]!.push(y, frames);
      this.welch[i]!.push(y, frames);
    }
  }

  finish(sampleRateHz: number) {
    return this.plan.map((_, i) => ({ dose: this.doses[i]!.finish(sampleRateHz), design: this.designs[i]!, heldSamples: this.filters[i]!.heldSamples, welchMeanSquare: this.welch[i]!.finish().meanSquare, spectrogram: this.spectrograms[i]?.finish(sampleRateHz) }));
  }
}

/** a_w from a one-sided PSD: sqrt(sum_k |W(f_k)|^2 P_k df), the DC line included at its own weight (zero). */
export function weightedRmsFromPsd(psd: Float64Array, frequencyHz: Float64Array, lineSpacingHz: number, weighting: WeightingName): number {
  const g = weightingPowerGains(weighting, frequencyHz);
  let s = 0;
  for (let k = 0; k < psd.length; k++) s += g[k]! * psd[k]!;
  return Math.sqrt(s * lineSpacingHz);
}

export async function rideRecording(file: string, options: RideOptions): Promise<RideResult> {
  const source = await openTimeHistory(file, { ...options.csv, sampleRateHz: options.csv?.sampleRateHz });
  return rideSource(source, options);
}

export async function rideSource(source: TimeHistorySource, options: RideOptions): Promise<RideResult> {
  const { info } = source;
  const axes = (["x", "y", "z"] as const).filter((a) => options.axes[a] !== undefined);
  if (axes.length === 0) throw new InputError("OPTION_INVALID", { option: "axes", expected: "at least one of x=CH, y=CH, z=CH", received: "none" });
  if (!(options.exposureS > 0 && options.exposureS <= 86400)) {
    throw new InputError("OPTION_INVALID", { option: "exposureS", expected: "a daily exposure above 0 and at most 24 h", received: String(options.exposureS) });
  }
  const names = axes.map((a) => options.axes[a]!);
  if (options.floor !== undefined) names.push(options.floor);
  const indexes = names.map((n, i) => {
    try {
      return selectChannels(info, [n])[0]!;
    } catch (e) {
      if (e instanceof InputError) {
        throw new InputError("CHANNEL_NOT_FOUND", { ...e.details, option: i < axes.length ? "axes" : "floor" });
      }
      throw e;
    }
  });
  const dup = indexes.findIndex((v, i) => indexes.indexOf(v) !== i);
  if (dup >= 0) throw new InputError("OPTION_INVALID", { option: dup < axes.length ? "axes" : "floor", expected: "a different channel for each axis and the floor", received: quoted(names[dup]!) });
  const rules = axisRules(options.posture);
  const plan = names.map((_, i) => ({ index: i, weighting: i < axes.length ? rules[axes[i]!].weighting : ("Wk" as WeightingName) }));
  const runningRmsS = options.runningRmsS ?? 1;
  if (!(runningRmsS > 0 && runningRmsS <= 60)) throw new InputError("OPTION_INVALID", { option: "runningRmsS", expected: "an integration time in s, 0 < t <= 60", received: String(runningRmsS) });
  // Ride defaults: lines of 0.125 Hz or finer, so the 0.4 Hz band limit and the Wd plateau near 1 Hz are
  // resolved (common practice), and 75 % overlap, where a Hann window's w^2 adds up to a constant, so
  // every sample inside the record counts alike in the PSD (a pothole weighs the same wherever it falls).
  const welch = {
    ...(options.segmentLength === undefined && options.resolutionHz === undefined ? { resolutionHz: 0.125 } : {}),
    overlap: options.overlap ?? 0.75,
  };
  const geometry = normalizeWelchOptions({ ...options, ...welch }, info.sampleRateHz);
  const weighted = new WeightedDoses(info.file, plan, runningRmsS, { window: spectralWindow(geometry.window, geometry.segmentLength), hop: geometry.hop, detrend: geometry.detrend, spectrogram: options.spectrogram === true });
  const analysis = await analyzeSource(source, {
    ...options, ...welch, channels: indexes.map((i) => String(i + 1)), resultUnits: "m/s2", accumulators: [weighted], stretchS: options.stretchS ?? runningRmsS,
  });
  const results = analysis.extras[0] as ReturnType<WeightedDoses["finish"]>;
  const notes: string[] = [];
  const doubts: string[] = [...analysis.passDoubts];
  const fs = analysis.input.sampleRateHz;
  const fromPsd = (c: number, w: WeightingName) => {
    const p = analysis.channels[c]!.psd;
    return weightedRmsFromPsd(p.psd, p.frequencyHz, p.lineSpacingHz, w);
  };
  const rideAxes: RideAxis[] = axes.map((axis, c) => {
    const r = results[c]!;
    const ch = analysis.channels[c]!;
    const weighting = plan[c]!.weighting;
    const awFromPsd = fromPsd(c, weighting);
    const d = r.dose;
    const stationarity = stationarityFinding(d.stretchMeanSquares, d.stretchS, analysis.window.fromS);
    const awWelchWeighted = Math.sqrt(r.welchMeanSquare);
    const routeRatio = awFromPsd / awWelchWeighted;
    const noPsd = ch.psd.averages === 0;
    if (noPsd) notes.push(`${axis}: the window holds no whole Welch segment of ${analysis.settings.segmentLength} samples, so there is no a_w from the PSD to check against (a coarser resolution or a shorter segment gives one)`);
    else if (!(Math.abs(routeRatio - 1) <= ROUTE_TOLERANCE)) doubts.push(`${axis} (${ch.name}): a_w from the PSD is ${((routeRatio - 1) * 100).toFixed(2)} % off a_w in time over the same samples (allowed ±${100 * ROUTE_TOLERANCE} %)`);
    const plain = awFromPsd / d.rms;
    if (!noPsd && Math.abs(plain - 1) > ROUTE_TOLERANCE) notes.push(`${axis}: a_w from the PSD is ${((plain - 1) * 100).toFixed(2)} % off the plain time average because Welch tapers the record's ends and drops its last partial segment, which matters on a non-stationary record; a_w is the time-domain value`);
    if (r.heldSamples > 0) doubts.push(`${axis} (${ch.name}): ${r.heldSamples} non-finite sample(s) were held at the last finite value before weighting`);
    if (r.design.maxErrorPct > 2) notes.push(`${axis}: at ${fs} Hz the time-domain ${weighting} is up to ${r.design.maxErrorPct.toFixed(1)} % off the analog weighting (at ${r.design.maxErrorAtHz} Hz); VDV, MTVV and crest factor carry that error, a_w from the PSD does not`);
    if (stationarity.tested && !stationarity.stationary) {
      const t = stationarity.reverseArrangements!;
      const dep = stationarity.departing[0];
      notes.push(`${axis}: weighted level not stationary (reverse arrangements A = ${t.statistic} outside ${t.acceptAbove} < A <= ${t.acceptAtMost}, ${t.n} values)${dep ? `; most departing ${dep.fromS.toFixed(0)}-${dep.toS.toFixed(0)} s at ${dep.levelDb >= 0 ? "+" : ""}${dep.levelDb.toFixed(1)} dB` : ""}: a_w averages unlike stretches, and A(8) assumes the recording stands for the whole exposure`);
    }
    for (const f of ch.doubtFindings) if (f.code !== "TOO_SHORT") doubts.push(`${axis} (${ch.name}): ${f.text}`);
    const basicMethod = basicMethodCheck(d.rms, d.crestFactor, d.mtvv, d.vdv, d.durationS);
    if (!basicMethod.adequate) notes.push(`${axis}: the basic r.m.s. method may underestimate (${basicMethod.exceeded.join(", ")}): judge by VDV and MTVV as well (ISO 2631-1 6.3)`);
    return {
      axis, channel: ch.name, weighting, rule: rules[axis], dose: d, awFromPsd, awWelchWeighted, routeRatio, basicMethod, stationarity,
      filter: { maxErrorPct: r.design.maxErrorPct, maxErrorAtHz: r.design.maxErrorAtHz, heldSamples: r.heldSamples },
      spectrogram: r.spectrogram,
    };
  });
  const figures = rideAxes.map((a) => ({ axis: a.axis, aw: a.dose.rms, vdv: a.dose.vdv, durationS: a.dose.durationS }));
  const exposure = dailyExposure(figures, rules, options.exposureS, options.healthZone ?? ISO_2631_HEALTH_ZONE);
  const healthZone = { ...(options.healthZone ?? ISO_2631_HEALTH_ZONE), from: options.healthZone ? "given" as const : "default" as const };
  const totalValue = {
    health: vibrationTotalValue(figures, (a) => rules[a].healthK),
    comfort: vibrationTotalValue(figures, (a) => rules[a].comfortK),
  };
  if (axes.length < 3) notes.push(`only ${axes.join(", ")} measured: the vibration total value and the daily exposure leave out the other axes`);
  if (options.posture === "recumbent") notes.push("recumbent: Directive 2002/44/EC states its axis factors for seated or standing workers and ISO 2631-1 Annex B guides seated exposure; the seated factors were used");
  if (options.posture !== "seated") notes.push(`${options.posture}: ISO 2631-1 Annex B health guidance is written for seated persons; the zone is shown for reference`);
  let seat: RideResult["seat"];
  if (options.floor !== undefined) {
    const c = axes.length;
    const floorDose = results[c]!.dose;
    const zAxis = rideAxes.find((a) => a.axis === "z");
    if (zAxis === undefined) notes.push("a floor channel needs z on the seat for the seat's transmissibility (vertical, Wk on both)");
    else seat = { floorChannel: analysis.channels[c]!.name, awFloor: floorDose.rms, awFloorFromPsd: fromPsd(c, "Wk"), awFloorWelchWeighted: Math.sqrt(results[c]!.welchMeanSquare), awSeat: zAxis.dose.rms, seat: seatTransmissibility(zAxis.dose.rms, floorDose.rms) };
  }
  return { analysis, posture: options.posture, axes: rideAxes, totalValue, comfort: { reactions: comfortReactions(totalValue.comfort) }, exposure, healthZone, seat, notes, doubts };
}
