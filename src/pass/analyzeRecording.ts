import { scaleSamples, type ChannelReading } from "../condition/scaleSamples.js";
import { amplitudeGates, offsetLines } from "../compare/amplitudeGates.js";
import { normalSurvival } from "../estimate/statistics/distributions.js";
import { parsevalCheck, type ParsevalCheck } from "../estimate/spectral/parsevalCheck.js";
import type { Finding } from "../findings.js";
import { InputError } from "../errors.js";
import {
  bandRms,
  completePsd,
  strongestPeaks,
  type PsdEstimate,
  type SpectralPeak,
} from "../estimate/spectral/psdEstimate.js";
import { HistogramAccumulator, type AmplitudeHistogram } from "../estimate/statistics/amplitudeHistogram.js";
import { PeakHoldPsdAccumulator, type PeakHoldPsd } from "../estimate/spectral/peakHoldPsd.js";
import { SegmentPower } from "../estimate/spectral/segmentPower.js";
import { RunningMoments, type SampleStatistics } from "../estimate/statistics/runningMoments.js";
import { SampleHoldAccumulator, type SampleHold } from "../estimate/statistics/sampleHold.js";
import { stationarityFinding, type StationarityFinding } from "../estimate/statistics/stationarityTests.js";
import { StretchMeanSquares } from "../estimate/statistics/stretchMeanSquares.js";
import { spectralKernel } from "../estimate/spectral/spectralKernel.js";
import { spectralTones, type SpectralTone } from "../estimate/spectral/toneEstimate.js";
import type { ResolvedWelchOptions } from "../estimate/spectral/welchOptions.js";
import { WelchAccumulator } from "../estimate/spectral/welchPsd.js";
import { spectralWindow } from "../estimate/spectral/windows.js";
import { openTimeHistory } from "../read/openTimeHistory.js";
import type { TimeHistorySource } from "../read/timeHistory.js";
import { atFinalRate, resolveAnalysis, type AnalysisPlan, type ResolvedAnalysis } from "./resolveAnalysis.js";
import type { AccelUnit } from "../units.js";

export type { AnalysisOptions, PassAccumulator } from "./analysisOptions.js";
import type { AnalysisOptions, PassAccumulator } from "./analysisOptions.js";

/**
 * The one pass: read blocks, condition them, feed every channel's statistics and Welch accumulators,
 * then finish into plain result objects. Memory: a few segments per channel, whatever the length.
 */

/** What listens to one channel's conditioned samples in the pass (the built-in accumulators). */
interface SampleListener {
  push(x: Float64Array, n: number): void;
}

/** The analysed window, in s from the first sample at the final rate, and its length in frames. */
export interface FrameWindow {
  fromS: number;
  toS: number;
  frames: number;
  /** The --to asked for, when it lay past the end (toS is then the end). */
  requestedToS?: number | undefined;
  /** --from/--to as the clock times given, when they were. */
  fromClock?: string | undefined;
  toClock?: string | undefined;
}

export interface ChannelAnalysis {
  name: string;
  /** 1-based position among the file's channels. */
  position: number;
  units: AccelUnit;
  /** How the file's numbers became accelerations: the file's unit, calibration, sensitivity, factor. */
  reading: ChannelReading;
  stats: SampleStatistics;
  psd: PsdEstimate;
  parseval: ParsevalCheck;
  band?: { fminHz: number; fmaxHz: number; rms: number } | undefined;
  peaks: SpectralPeak[];
  /**
   * Lines standing far above their neighbours: candidate sine tones, with their amplitude (toneEstimate.ts
   * spectralTones).
   */
  tones: SpectralTone[];
  /** Amplitude histogram, when asked for (the review report shows it). */
  histogram?: AmplitudeHistogram | undefined;
  /** Peak-hold spectrum, when asked for (`peakHoldS`). */
  peakHold?: PeakHoldPsd | undefined;
  /** Reverse-arrangements test on the stretch mean squares (Bendat & Piersol 2010, sec. 10.3). */
  stationarity: StationarityFinding;
  /** The stretch mean squares the stationarity test looked at (one per stretchS; for check's level gate). */
  stretchMeanSquares?: Float64Array | undefined;
  /** Runs of repeated values: is the record a slower sensor's readings held to the file's rate? */
  hold?: SampleHold | undefined;
  /** Findings that weaken trust in the result; each names what was seen (rendered by report/findingTexts.ts). */
  notes: Finding[];
  /** Reasons this channel cannot support a verdict (clipping hint, non-finite samples, …). */
  doubts: Finding[];
}

export interface RecordingAnalysis {
  input: {
    file: string;
    format: "csv" | "wav";
    layout: string;
    sha256: string;
    bytes: number;
    sampleRateHz: number;
    samples: number;
    durationS: number;
    /** ISO 8601 time of the first sample, when the file has date-time stamps. */
    startTime?: string | undefined;
    /** Lines before a CSV header (a logger's metadata), as text. */
    preamble?: string[] | undefined;
  };
  settings: ResolvedWelchOptions & { scale: number };
  window: FrameWindow;
  /** The options and the reader's findings as resolved: everything needed to reproduce this result. */
  analysis: ResolvedAnalysis;
  channels: ChannelAnalysis[];
  /** Results of `options.accumulators`, in order. */
  extras: unknown[];
  /** Doubts about the whole pass (the rate contract). */
  passDoubts: Finding[];
}

export async function analyzeRecording(file: string, options: AnalysisOptions = {}): Promise<RecordingAnalysis> {
  const source = await openTimeHistory(file, { ...options.csv, sampleRateHz: options.csv?.sampleRateHz });
  return analyzeSource(source, options);
}

export async function analyzeSource(
  source: TimeHistorySource,
  options: AnalysisOptions = {},
): Promise<RecordingAnalysis> {
  const { info } = source;
  let plan: AnalysisPlan;
  const extras = options.accumulators ?? [];
  try {
    plan = resolveAnalysis(options, info);
    for (const e of extras) e.start(info.sampleRateHz, plan.analysis);
  } catch (e) {
    // A read that will not come releases what the source holds (a large CSV's waiting worker).
    await source.close?.();
    throw e;
  }
  const built = builtInListeners(plan, info.sampleRateHz);
  const { summary, taken } = await readWindow(source, plan, built.perChannel, extras, options.onProgress);
  const fs = summary.sampleRateHz;
  const { windowInfo, passDoubts } = passWindow(plan, info, summary, taken, extras.length > 0);
  const extraResults = extras.map((e) => e.finish(fs));
  const analysis = atFinalRate(plan.analysis, fs, options);
  const channels = plan.select.map((idx, c) =>
    channelResult(c, idx, plan, analysis, built, windowInfo, summary.frames, fs, info),
  );
  return {
    input: {
      file: info.file,
      format: info.format,
      layout: info.layout,
      sha256: summary.sha256,
      bytes: summary.bytes,
      sampleRateHz: fs,
      samples: summary.frames,
      durationS: summary.frames / fs,
      startTime: summary.startTime,
      preamble: info.preamble,
    },
    settings: {
      ...analysis.welch,
      scale: options.scale ?? options.channelScales?.find((k) => k.channel === undefined)?.value ?? 1,
    },
    window: windowInfo,
    analysis,
    channels,
    extras: extraResults,
    passDoubts,
  };
}

/** The built-in listeners of each channel, from the resolved analysis. */
interface BuiltIn {
  window: Float64Array;
  welch: (WelchAccumulator | undefined)[];
  moments: RunningMoments[];
  histograms: HistogramAccumulator[] | undefined;
  peakHolds: PeakHoldPsdAccumulator[] | undefined;
  stretchLength: number;
  stretches: StretchMeanSquares[];
  holds: SampleHoldAccumulator[];
  /** Each channel's listeners, in the order they hear a block. */
  perChannel: SampleListener[][];
}

/**
 * The built-in listeners of each channel, chosen from the resolved analysis: the moments, the runs of
 * repeated values (sample-and-hold) and the stationarity stretches always, Welch when a spectrum is asked
 * for, the histogram for a report, the peak-hold spectrum when asked for.
 */
function builtInListeners(plan: AnalysisPlan, designFs: number): BuiltIn {
  const { select, analysis: a } = plan;
  const settings = a.welch;
  const window = spectralWindow(settings.window, settings.segmentLength);
  const power = new SegmentPower(settings.segmentLength);
  const geometry = { segmentLength: settings.segmentLength, hop: settings.hop, window, detrend: settings.detrend };
  const welch = select.map(() => (a.spectrum ? new WelchAccumulator(geometry, power) : undefined));
  const moments = select.map(() => new RunningMoments());
  const histograms = a.histogram ? select.map(() => new HistogramAccumulator()) : undefined;
  const holdS = a.peakHoldS;
  const rateKnown = Number.isFinite(designFs) && designFs > 0;
  const peakHolds =
    a.spectrum && holdS !== undefined && rateKnown
      ? select.map(
          () =>
            new PeakHoldPsdAccumulator(
              geometry,
              power,
              Math.max(settings.segmentLength, Math.round(holdS * designFs)),
              designFs,
            ),
        )
      : undefined;
  // A degenerate CSV can announce no usable rate; its read then fails with the reader's own error.
  const stretchLength = rateKnown ? Math.max(2, Math.round(a.stretchS * designFs)) : 2;
  const stretches = select.map(() => new StretchMeanSquares(stretchLength));
  const holds = select.map(() => new SampleHoldAccumulator());
  // Without the statistics (a.statistics false, no spectrum) the moments, runs and stretches stay unfed: empty.
  const stats = a.statistics !== false;
  const perChannel = select.map((_, c) =>
    (
      [
        stats ? moments[c] : undefined,
        stats ? holds[c] : undefined,
        histograms?.[c],
        welch[c],
        stats ? stretches[c] : undefined,
        peakHolds?.[c],
      ] as (SampleListener | undefined)[]
    ).filter((l): l is SampleListener => l !== undefined),
  );
  return { window, welch, moments, histograms, peakHolds, stretchLength, stretches, holds, perChannel };
}

/**
 * The read: each block's frame window [first, end) cut once, conditioned in place, heard by each channel's
 * built-in listeners and then by the pass's listeners (all channels at once).
 */
async function readWindow(
  source: TimeHistorySource,
  plan: AnalysisPlan,
  perChannel: SampleListener[][],
  extras: PassAccumulator[],
  onProgress: AnalysisOptions["onProgress"],
) {
  const { select, conditioning, first, end } = plan;
  const views: Float64Array[] = select.map(() => new Float64Array(0));
  let offset = 0;
  let taken = 0;
  const summary = await source.read(
    select,
    (blocks, frames) => {
      // The frame window [first, end) cut out of this block: [a, b).
      const a = Math.max(0, first - offset);
      const b = Math.min(frames, end - offset);
      offset += frames;
      if (b <= a) return;
      const n = b - a;
      taken += n;
      for (let c = 0; c < blocks.length; c++) {
        const x = a === 0 ? blocks[c]! : blocks[c]!.subarray(a, b);
        views[c] = x;
        scaleSamples(x, n, conditioning[c]!.factor);
        for (const l of perChannel[c]!) l.push(x, n);
      }
      for (const e of extras) e.push(views, n);
    },
    onProgress ? (b) => onProgress(b, source.info.bytes) : undefined,
  );
  return { summary, taken };
}

/**
 * The analysed window at the final rate, the pass's errors (no samples, an empty window) and its doubts (the rate
 * contract).
 */
function passWindow(
  plan: AnalysisPlan,
  info: TimeHistorySource["info"],
  summary: { frames: number; sampleRateHz: number },
  taken: number,
  listeners: boolean,
) {
  const { first, end } = plan;
  const asked = plan.analysis.window;
  if (summary.frames === 0) {
    throw new InputError("RECORD_TOO_SHORT", {
      file: info.file,
      expected: "at least one sample",
      received: "0 samples",
      hint: "the recording holds no data",
    });
  }
  const fs = summary.sampleRateHz;
  const designFs = info.sampleRateHz;
  const passDoubts: Finding[] = [];
  if (Math.abs(fs - designFs) > 1e-6 * designFs && (listeners || first > 0 || end < Infinity)) {
    passDoubts.push({ code: "RATE_MOVED", values: { sampleRateHz: fs, designRateHz: designFs } });
  }
  if (taken === 0 && (asked.fromS !== undefined || asked.toS !== undefined)) {
    throw new InputError("WINDOW_EMPTY", {
      file: info.file,
      option: asked.fromS !== undefined ? "fromS" : "toS",
      expected: `a window inside the record (0 to ${fmt(summary.frames / fs)} s)`,
      received: `${asked.fromS ?? 0} s to ${asked.toS ?? "the end"}`,
    });
  }
  const windowInfo: FrameWindow = {
    fromS: Math.min(first, summary.frames) / fs,
    toS: Math.min(end, summary.frames) / fs,
    frames: taken,
  };
  if (asked.toS !== undefined && end > summary.frames) windowInfo.requestedToS = asked.toS;
  if (asked.fromClock !== undefined) windowInfo.fromClock = asked.fromClock;
  if (asked.toClock !== undefined) windowInfo.toClock = asked.toClock;
  return { windowInfo, passDoubts };
}

/** One channel's figures from its built-in listeners, at the final rate. */
function channelResult(
  c: number,
  idx: number,
  plan: AnalysisPlan,
  analysis: ResolvedAnalysis,
  b: BuiltIn,
  windowInfo: FrameWindow,
  frames: number,
  fs: number,
  info: TimeHistorySource["info"],
): ChannelAnalysis {
  const settings = analysis.welch;
  const taken = windowInfo.frames;
  const conditioning = plan.conditioning[c]!;
  const stats = b.moments[c]!.result();
  const sums = b.welch[c]?.finish(fs) ?? {
    segments: 0,
    skippedSegments: 0,
    samples: frames,
    psd: new Float64Array(settings.segmentLength / 2 + 1),
    windowedMeanSquare: NaN,
    segmentMeanSquare: NaN,
    expectedGap: NaN,
    meanSquareGapError: NaN,
    meanSquareGapBatches: 0,
    slowGapError: NaN,
    detrendedKurtosis: NaN,
    detrendedCrestFactor: NaN,
  };
  const psd = completePsd(sums, b.window, settings, fs);
  const rmsTime = Math.sqrt(b.moments[c]!.residualMeanSquare(settings.detrend));
  const parseval = parsevalCheck(rmsTime, psd, settings.window);
  const band = analysis.band
    ? { ...analysis.band, rms: bandRms(psd, analysis.band.fminHz, analysis.band.fmaxHz) }
    : undefined;
  const stretchMs = b.stretches[c]!.result();
  const stationarity = stationarityFinding(stretchMs, b.stretchLength / fs, windowInfo.fromS);
  const hold = b.holds[c]!.result(fs);
  const spectrum = analysis.spectrum;
  const tones =
    spectrum && psd.dof > 0
      ? spectralTones(psd, b.window, spectralKernel(settings.window, b.window, settings.detrend).halfWidthBins, {
          max: 8,
        })
      : [];
  const { notes, doubts } = _channelFindings(
    stats,
    psd,
    parseval,
    taken,
    settings.segmentLength,
    spectrum,
    taken / fs,
    hold,
    settings.detrend === "none" ? offsetLines(b.window) : 0,
    (info.channels[idx]!.quantum ?? 0) * Math.abs(conditioning.reading.factor),
    tones.map((t) => (t.peak * t.peak) / 2),
  );
  const note = stationarityNote(stationarity);
  if (note !== undefined) notes.push(note);
  const gravity = gravityInMs2(stats.mean, conditioning.reading);
  if (gravity) doubts.push(gravity);
  const recordEndS = frames / fs;
  if (windowInfo.requestedToS !== undefined)
    notes.push({ code: "WINDOW_PAST_END", values: { requestedToS: windowInfo.requestedToS, recordEndS } });
  return {
    name: info.channels[idx]!.name,
    position: idx + 1,
    units: conditioning.resultUnit,
    reading: conditioning.reading,
    stats,
    psd,
    parseval,
    band,
    peaks: strongestPeaks(psd, 5),
    tones,
    histogram: b.histograms ? b.histograms[c]!.densityAround(stats.mean, stats.std) : undefined,
    peakHold: b.peakHolds ? b.peakHolds[c]!.finish(fs) : undefined,
    stationarity,
    stretchMeanSquares: stretchMs,
    hold,
    notes,
    doubts,
  };
}

/**
 * A record too short for one Welch segment in some channel has no PSD: an input error (RECORD_TOO_SHORT),
 * not a result. The analysis itself returns, so a batch can still print the recording's other figures
 * beside the error; every command that needs a spectrum raises this.
 */
export function recordTooShort(a: RecordingAnalysis): InputError | undefined {
  if (!a.channels.some((c) => c.psd.averages === 0)) return undefined;
  const frames = a.window.frames;
  if (frames >= a.settings.segmentLength) {
    // Long enough, but every segment holds a NaN or an infinite sample: say that, not a length it has.
    const bad = a.channels.find((c) => c.psd.averages === 0);
    const nonFinite = bad?.stats.nonFinite ?? 0;
    return new InputError("RECORD_TOO_SHORT", {
      file: a.input.file,
      field: bad?.name,
      expected: `at least one segment of ${a.settings.segmentLength} samples free of NaN and infinite values`,
      received: `${frames} samples, ${nonFinite} of them NaN or infinite, in every segment`,
      hint: "check the recording (or its `scale`) for the non-finite values",
    });
  }
  return new InputError("RECORD_TOO_SHORT", {
    file: a.input.file,
    expected: `at least one segment of ${a.settings.segmentLength} samples`,
    received: `${frames} samples${frames !== a.input.samples ? ` in the window (${a.input.samples} in the file)` : ""}`,
    hint: "use a shorter `segmentLength` or a coarser `resolutionHz`",
  });
}

/**
 * The note `psd` and `check` give when a record fails the stationarity test (NOT_STATIONARY, with the numbers it rests
 * on).
 */
export function stationarityNote(f: StationarityFinding): Finding | undefined {
  if (!f.tested || f.stationary || f.reverseArrangements === undefined) return undefined;
  const t = f.reverseArrangements;
  const d = f.departing[0];
  return {
    code: "NOT_STATIONARY",
    values: {
      statistic: t.statistic,
      acceptAbove: t.acceptAbove,
      acceptAtMost: t.acceptAtMost,
      values: t.n,
      testPercent: 100 * t.alpha,
      stretches: f.stretches,
      stretchS: f.stretchS,
      ...(f.pooled > 1 ? { pooled: f.pooled } : {}),
      ...(d ? { departingFromS: d.fromS, departingToS: d.toS, departingDb: d.levelDb } : {}),
    },
  };
}

/**
 * Clipping hint: more samples at the exact record maximum or minimum than chance explains, at least 3
 * and at least 2e-5 of the record (common practice, a heuristic). A Gaussian record quantised at
 * 0.5 sigma per code hits its top code about 7 times per million samples by chance; one clipped at
 * 4 sigma puts about 63 per million on the rail (Gaussian tail 6.3e-5, docs/REFERENCES.md sec. 10).
 */
export function clippingHintCount(samples: number): number {
  return Math.max(3, Math.ceil(2e-5 * samples));
}

/**
 * A channel read as g only because nothing said its unit (no header unit, units row or option), whose mean in the
 * file is 9.3 to 10.3: that is 1 g of gravity written in m/s², and read as g every level is 9.81 times too high (in
 * mean squares 96 times). A g channel carrying a steady 9.8 g is not what an accelerometer on a vehicle, machine
 * or shaker shows (common practice). Said as a doubt, with the option that settles it.
 */
export function gravityInMs2(mean: number, reading: ChannelReading): Finding | undefined {
  if (reading.unitFrom !== "default" || reading.fileUnit !== "g") return undefined;
  const fileMean = mean / reading.factor;
  if (!(Math.abs(fileMean) >= 9.3 && Math.abs(fileMean) <= 10.3)) return undefined;
  return { code: "GRAVITY_AS_G", values: { mean: fileMean } };
}

/**
 * A spread within this many quantisation steps: the samples are whole codes a few steps apart, not Gaussian by
 * construction. A Gaussian rounded to whole codes has kurtosis 10.5 at sigma 0.3 step, 4.8 at 0.4 and 3.0 from about
 * 0.6 step up (the codes' exact probabilities, scipy.stats.norm.cdf over bins of one step, mean on a code), and a
 * top code far out in sigma; 2 steps leaves a margin over that.
 */
const QUANTISED_STEPS = 2;

/**
 * Near the quantisation step a kurtosis or crest factor above a Gaussian's is the rounding's doing as much as any
 * shock's: those notes name the step (KURTOSIS_QUANTISED, CREST_QUANTISED) instead of shocks.
 */
function nearStep(std: number, quantum: number): (f: Finding) => Finding {
  return (f) =>
    f.code === "KURTOSIS_HIGH"
      ? { code: "KURTOSIS_QUANTISED", values: { ...f.values, std, quantum } }
      : f.code === "CREST_HIGH"
        ? { code: "CREST_QUANTISED", values: { ...f.values, std, quantum } }
        : f;
}

/**
 * The notes and doubts of one channel. @internal (exported for tests/findings.test.ts, which holds their values to
 * their texts)
 */
export function _channelFindings(
  s: SampleStatistics,
  p: PsdEstimate,
  pv: ParsevalCheck,
  frames: number,
  segment: number,
  spectrum: boolean,
  durationS: number,
  hold?: SampleHold,
  gateSkipLines = 0,
  quantum = 0,
  tonePowers: readonly number[] = [],
) {
  const notes: Finding[] = [];
  const doubts: Finding[] = [];
  if (s.nonFinite > 0) {
    doubts.push({ code: "NON_FINITE", values: { samples: s.nonFinite, segmentsLeftOut: p.skippedSegments } });
  }
  // A channel whose every finite sample holds one value (a dead or disconnected sensor, a channel never wired) has
  // no motion to judge: one doubt says so, in place of clipping at that value and a Parseval ratio of 0 / 0.
  if (s.count > 0 && s.min === s.max) {
    doubts.push({ code: "NO_SIGNAL", values: { samples: s.count, value: s.min } });
    return { notes, doubts };
  }
  const held = hold?.held === true ? hold : undefined;
  if (held) {
    const fs = held.updateRateHz * held.meanRun; // the file's rate
    notes.push({
      code: "HELD_SAMPLES",
      values: {
        meanRun: held.meanRun,
        heldPercent: 100 * held.heldShare,
        updateRateHz: held.updateRateHz,
        sampleRateHz: fs,
        nyquistHz: held.updateRateHz / 2,
      },
    });
  }
  // A held extreme is one reading: count runs at the extremes, not samples, when the record is held.
  const atMax = held ? held.runsAtMax : s.atMax;
  const atMin = held ? held.runsAtMin : s.atMin;
  const clip = clippingHintCount(held ? held.runs : s.count);
  // On integer codes the extreme code is a bin of one step q: a Gaussian record puts n (Q((d - q/2)/sigma) -
  // Q((d + q/2)/sigma)) samples there (d its distance from the mean). A quiet record a few steps tall fills its top
  // code so by itself (sigma 0.4 LSB: 45 of 512000 at 2 LSB); more than that by over 4 Poisson sigma is the clipping
  // hint (common practice). Continuous values (q = 0) expect none there.
  const binExpected = (extreme: number) => {
    if (!(quantum > 0 && s.std > 0)) return 0;
    const d = Math.abs(extreme - s.mean);
    const n = held ? held.runs : s.count;
    return n * (normalSurvival((d - quantum / 2) / s.std) - normalSurvival((d + quantum / 2) / s.std));
  };
  const beyond = (count: number, extreme: number) => {
    const e = binExpected(extreme);
    return count >= clip && count > e + 4 * Math.sqrt(e);
  };
  if (beyond(atMax, s.max) || beyond(atMin, s.min)) {
    doubts.push({
      code: "CLIPPING",
      values: { atMax, max: s.max, atMin, min: s.min },
      ...(held ? { about: { held: true } } : {}),
    });
  }
  // Without a spectrum (inspect) there are no segment, Parseval or amplitude-gate findings.
  if (spectrum && p.averages === 0)
    doubts.push({ code: "TOO_SHORT", values: { samples: frames, segmentLength: segment } });
  else if (spectrum && p.averages < 8)
    notes.push({ code: "FEW_AVERAGES", values: { averages: p.averages, lineErrorPercent: 100 * p.randomError } });
  if (s.std > 0 && Math.abs(s.mean) > 0.1 * s.std)
    notes.push({ code: "DC_OFFSET", values: { mean: s.mean, meanPercentOfStd: 100 * Math.abs(s.mean / s.std) } });
  if (spectrum && p.averages > 0) {
    if (!pv.ok) {
      doubts.push({
        code: "PARSEVAL_MISMATCH",
        values: { offPercent: 100 * (pv.ratio - 1), allowedPercent: 100 * pv.tolerance },
        ...(pv.toleranceFrom === "record" ? { about: { toleranceFrom: "record" } } : {}),
      });
    }
    if (pv.belowFirstLineShare > 0.01) {
      notes.push({ code: "BELOW_FIRST_LINE", values: { sharePercent: 100 * pv.belowFirstLineShare } });
    }
    if (s.count > 0 && s.std > 0) {
      // Held readings are not independent samples: the gates count readings (updates), not samples.
      const g = amplitudeGates(
        held ? { ...s, count: Math.max(1, Math.round(s.count / held.meanRun)) } : s,
        p,
        durationS,
        gateSkipLines,
        tonePowers,
      );
      doubts.push(...g.doubts);
      notes.push(
        ...(quantum > 0 && s.std < QUANTISED_STEPS * quantum ? g.notes.map(nearStep(s.std, quantum)) : g.notes),
      );
    }
  }
  return { notes, doubts };
}

function fmt(x: number): string {
  return Number(x.toPrecision(5)).toString();
}
