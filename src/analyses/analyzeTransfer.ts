import { analyzeSource, type RecordingAnalysis } from "../pass/analyzeRecording.js";
import type { RecordingOptions, ResolvedAnalysis } from "../pass/analysisOptions.js";
import { channelConditionings, type ChannelReading } from "../condition/scaleSamples.js";
import { InputError } from "../errors.js";
import { CrossSpectrumListener, type CrossSpectrumSums } from "../estimate/spectral/crossSpectrum.js";
import {
  findResonances,
  frequencyResponse,
  magnitudeBoundFactor,
  type FrequencyResponse,
  type Resonance,
} from "../estimate/spectral/frequencyResponse.js";
import { frequencyAxis } from "../estimate/spectral/psdEstimate.js";
import { welchDof } from "../estimate/spectral/welchDof.js";
import type { ResolvedWelchOptions } from "../estimate/spectral/welchOptions.js";
import { channelIndex, type ChannelName } from "../read/channelChoice.js";
import { openTimeHistory } from "../read/openTimeHistory.js";
import type { RecordingInfo, TimeHistorySource } from "../read/timeHistory.js";
import type { AccelUnit } from "../units.js";
import type { Finding } from "../findings.js";

/**
 * Frequency response from one input channel to one or more output channels of a recording: the one pass
 * (pass/analyzeRecording.ts) with a cross-spectrum listener (estimate/spectral/crossSpectrum.ts) that hears
 * the conditioned, window-cut blocks; from its sums H1, H2, coherence, their random errors, the output
 * spectrum the input predicts, and the resonances of H1. The reading, conditioning, Welch and window
 * options are the family's (RecordingOptions); transfer adds which channels are input and outputs.
 */
export interface TransferOptions extends RecordingOptions {
  /** Input (reference) channel: name or 1-based position. */
  inputChannel: ChannelName;
  /** Output channels: names or 1-based positions (default: every channel but the input). */
  outputChannels?: ChannelName[] | undefined;
  /** Coherence at or above which a line counts as well explained by the input (default 0.9). */
  goodCoherence?: number | undefined;
}

export interface TransferOutput extends FrequencyResponse {
  name: string;
  position: number;
  /** |H1| (1 -+ z eps), z = magnitudeBoundFactor: Student t on 2 n_d - 2 DOF (the normal quantile from one segment). */
  h1Lower: Float64Array;
  h1Upper: Float64Array;
  measuredOutputPsd: Float64Array;
  /** sqrt(sum P df) of each, over all lines. */
  predictedRms: number;
  measuredRms: number;
  /**
   * Lines with coherence >= goodCoherence: their share of all lines and of the measured mean square, and predicted /
   * measured mean square over them.
   */
  wellExplained: { lineFraction: number; powerFraction: number; meanSquareRatio: number };
  /** Contiguous ranges where the coherence is below 0.5 and the output carries at least 1 % of its mean square. */
  lowCoherenceBands: { fromHz: number; toHz: number; powerFraction: number }[];
  resonances: Resonance[];
}

export interface TransferAnalysis {
  input: {
    file: string;
    format: "csv" | "wav";
    layout: string;
    sha256: string;
    bytes: number;
    sampleRateHz: number;
    samples: number;
    durationS: number;
  };
  /** The analysed window (--from/--to), s from the first sample, and its frames; the whole record without them. */
  window: {
    fromS: number;
    toS: number;
    durationS: number;
    frames: number;
    fromClock?: string | undefined;
    toClock?: string | undefined;
  };
  settings: ResolvedWelchOptions & { scale: number; goodCoherence: number };
  averages: number;
  skippedSegments: number;
  /** Welch equivalent DOF of an auto spectrum, and n_d = DOF / 2 used in the random errors. */
  dof: number;
  disjointAverages: number;
  units: AccelUnit;
  frequencyHz: Float64Array;
  reference: { name: string; position: number; psd: Float64Array; rms: number };
  /** How each channel's numbers became accelerations (input first, then the outputs). */
  channels: { name: string; position: number; reading: ChannelReading }[];
  outputs: TransferOutput[];
  /** What weakens the spectra, as findings (report/findingTexts.ts says them). */
  warnings: Finding[];
  /** The options and the reader's findings as resolved by the pass: everything needed to reproduce this result. */
  analysis: ResolvedAnalysis;
}

export async function analyzeTransfer(file: string, options: TransferOptions): Promise<TransferAnalysis> {
  const source = await openTimeHistory(file, { ...options.csv });
  try {
    return await analyzeTransferSource(source, options);
  } finally {
    await source.close?.();
  }
}

/**
 * The input channel and the outputs (default: every other channel), picked the one way (read/channelChoice.ts) and
 * checked.
 */
function transferChannels(info: RecordingInfo, options: TransferOptions): { select: number[]; outIdx: number[] } {
  const at = (option: string) => ({ option, file: info.file });
  const inIdx = channelIndex(info.channels, options.inputChannel, at("inputChannel"));
  const outIdx =
    options.outputChannels !== undefined && options.outputChannels.length > 0
      ? options.outputChannels.map((w) => channelIndex(info.channels, w, at("outputChannels")))
      : info.channels.map((_, i) => i).filter((i) => i !== inIdx);
  if (outIdx.length === 0)
    throw new InputError("OPTION_MISSING", {
      file: info.file,
      option: "outputChannels",
      expected: "an output channel besides the input (the file has only one channel)",
      received: "none",
    });
  for (const [k, o] of outIdx.entries()) {
    if (o === inIdx)
      throw new InputError("OPTION_INVALID", {
        option: "outputChannels",
        expected: "an output channel other than the input",
        received: JSON.stringify(options.outputChannels?.[k]),
      });
    if (outIdx.indexOf(o) !== k)
      throw new InputError("OPTION_INVALID", {
        option: "outputChannels",
        expected: "each output channel once",
        received: JSON.stringify(options.outputChannels?.[k]),
      });
  }
  return { select: [inIdx, ...outIdx], outIdx };
}

export async function analyzeTransferSource(
  source: TimeHistorySource,
  options: TransferOptions,
): Promise<TransferAnalysis> {
  const { info } = source;
  let cross: CrossSpectrumListener;
  let select: number[];
  let common: AccelUnit;
  const good = options.goodCoherence ?? 0.9;
  try {
    select = transferChannels(info, options).select;
    if (!(good > 0 && good < 1))
      throw new InputError("OPTION_INVALID", {
        option: "goodCoherence",
        expected: "a coherence between 0 and 1",
        received: String(good),
      });
    // Every channel in the input channel's result unit, so H is dimensionless.
    common =
      options.resultUnits ?? channelConditionings(info.file, info.channels, [select[0]!], options)[0]!.resultUnit;
    cross = new CrossSpectrumListener(select.length, "outputChannels");
  } catch (e) {
    await source.close?.();
    throw e;
  }
  // The one pass: reading, conditioning, the window cut and the memory bound (the listener's 2k - 1
  // spectra, before a byte is read) are the pass's; its own Welch spectra are not needed (the cross
  // spectra hold the auto spectra), so `spectrum` is off, and so are the channels' statistics (nothing of
  // transfer's result comes from them; they cost a fifth of its time); the band, peak-hold, histogram unasked.
  const a = await analyzeSource(source, {
    ...options,
    channels: select.map((i) => i + 1),
    resultUnits: common,
    spectrum: false,
    statistics: false,
    histogram: false,
    forReport: undefined,
    fminHz: undefined,
    fmaxHz: undefined,
    peakHoldS: undefined,
    stretchS: undefined,
    accumulators: [cross],
  });
  const sums = a.extras[0] as ReturnType<CrossSpectrumListener["finish"]>;
  return transferResult(a, sums, common, good);
}

/** The transfer result from the pass and the cross-spectral sums at the final rate. */
function transferResult(
  a: RecordingAnalysis,
  sums: CrossSpectrumSums & { window: Float64Array },
  common: AccelUnit,
  good: number,
): TransferAnalysis {
  const settings = a.settings;
  const fs = a.input.sampleRateHz;
  const taken = a.window.frames;
  if (sums.segments === 0) {
    throw new InputError("RECORD_TOO_SHORT", {
      file: a.input.file,
      expected: `at least one segment of ${settings.segmentLength} samples with finite values in every channel`,
      received: `${taken} samples${taken !== a.input.samples ? " in the window" : ""}, ${sums.skippedSegments} segment(s) left out`,
      hint: "use a shorter `segmentLength` or a coarser `resolutionHz`",
    });
  }
  const frequencyHz = frequencyAxis(settings.segmentLength, fs);
  const df = fs / settings.segmentLength;
  const dof = welchDof(sums.window, settings.hop, sums.segments);
  const nd = dof / 2;
  const gxx = sums.auto[0]!;
  // No figures from no data (as derive): with an input of no vibration (a dead channel: all zero or constant) every H1
  // is 0 / 0; said as such, not printed as NaN.
  if (!gxx.some((g, k) => k > 0 && g > 0 && Number.isFinite(g)))
    throw new InputError("NO_VIBRATION", {
      file: a.input.file,
      expected: `vibration on the input channel "${a.channels[0]!.name}" to divide by`,
      received: "a PSD of zero at every line (a channel that is all zero or constant)",
    });
  // A dead output likewise: its share explained by the input is 0 / 0 (was printed as "NaN %").
  a.channels.slice(1).forEach((ch, j) => {
    if (!sums.auto[j + 1]!.some((g, k) => k > 0 && g > 0 && Number.isFinite(g)))
      throw new InputError("NO_VIBRATION", {
        file: a.input.file,
        expected: `vibration on the output channel "${ch.name}"`,
        received: "a PSD of zero at every line (a channel that is all zero or constant)",
        hint: "leave it out with `outputChannels`",
      });
  });
  const warnings: Finding[] = [];
  if (sums.skippedSegments > 0)
    warnings.push({ code: "SEGMENTS_LEFT_OUT", values: { segments: sums.skippedSegments } });
  if (sums.segments < 8)
    warnings.push({
      code: "FEW_AVERAGES_COHERENCE",
      values: { averages: sums.segments, coherenceBias: 1 / Math.max(1, nd) },
    });
  const outputs = a.channels
    .slice(1)
    .map((ch, j) =>
      transferOutput(ch, sums, j + 1, { frequencyHz, df, nd, good, z: magnitudeBoundFactor(nd, settings.confidence) }),
    );
  const ref = a.channels[0]!;
  const { startTime: _t, preamble: _p, ...input } = a.input;
  return {
    input,
    window: {
      fromS: a.window.fromS,
      toS: a.window.toS,
      durationS: taken / fs,
      frames: taken,
      ...(a.window.fromClock !== undefined ? { fromClock: a.window.fromClock } : {}),
      ...(a.window.toClock !== undefined ? { toClock: a.window.toClock } : {}),
    },
    settings: { ...settings, resolutionHz: df, goodCoherence: good },
    averages: sums.segments,
    skippedSegments: sums.skippedSegments,
    dof,
    disjointAverages: nd,
    units: common,
    frequencyHz,
    reference: { name: ref.name, position: ref.position, psd: gxx, rms: rmsOf(gxx, df) },
    channels: a.channels.map((c) => ({ name: c.name, position: c.position, reading: c.reading })),
    outputs,
    warnings,
    analysis: a.analysis,
  };
}

/** sqrt(sum P df) over all lines. */
function rmsOf(p: Float64Array, df: number): number {
  let s = 0;
  for (let k = 0; k < p.length; k++) s += p[k]!;
  return Math.sqrt(s * df);
}

/** One output's frequency response, its |H1| bounds, how well the input explains it, and its resonances. */
function transferOutput(
  ch: { name: string; position: number },
  sums: CrossSpectrumSums,
  c: number,
  g: { frequencyHz: Float64Array; df: number; nd: number; good: number; z: number },
): TransferOutput {
  const { frequencyHz, good, z } = g;
  const gxx = sums.auto[0]!;
  const gyy = sums.auto[c]!;
  const r = frequencyResponse(gxx, gyy, sums.crossRe[c]!, sums.crossIm[c]!, g.nd);
  const lower = new Float64Array(gxx.length);
  const upper = new Float64Array(gxx.length);
  for (let k = 0; k < gxx.length; k++) {
    lower[k] = r.h1Magnitude[k]! * Math.max(0, 1 - z * r.magnitudeError[k]!);
    upper[k] = r.h1Magnitude[k]! * (1 + z * r.magnitudeError[k]!);
  }
  let total = 0;
  let goodLines = 0;
  let goodMeasured = 0;
  let goodPredicted = 0;
  for (let k = 0; k < gyy.length; k++) total += gyy[k]!;
  for (let k = 1; k < gyy.length; k++) {
    if (r.coherence[k]! >= good) {
      goodLines++;
      goodMeasured += gyy[k]!;
      goodPredicted += r.predictedOutputPsd[k]!;
    }
  }
  const lowCoherenceBands: TransferOutput["lowCoherenceBands"] = [];
  for (let k = 1; k < gyy.length; ) {
    if (!(r.coherence[k]! < 0.5)) {
      k++;
      continue;
    }
    let e = k;
    let p = 0;
    while (e < gyy.length && r.coherence[e]! < 0.5) p += gyy[e++]!;
    if (p >= 0.01 * total)
      lowCoherenceBands.push({ fromHz: frequencyHz[k]!, toHz: frequencyHz[e - 1]!, powerFraction: p / total });
    k = e;
  }
  lowCoherenceBands.sort((a, b) => b.powerFraction - a.powerFraction);
  return {
    name: ch.name,
    position: ch.position,
    h1Magnitude: r.h1Magnitude,
    h1Lower: lower,
    h1Upper: upper,
    h2Magnitude: r.h2Magnitude,
    phaseDeg: r.phaseDeg,
    coherence: r.coherence,
    magnitudeError: r.magnitudeError,
    phaseErrorDeg: r.phaseErrorDeg,
    coherenceError: r.coherenceError,
    predictedOutputPsd: r.predictedOutputPsd,
    measuredOutputPsd: gyy,
    predictedRms: rmsOf(r.predictedOutputPsd, g.df),
    measuredRms: rmsOf(gyy, g.df),
    wellExplained: {
      lineFraction: goodLines / (gyy.length - 1),
      powerFraction: total > 0 ? goodMeasured / total : NaN,
      meanSquareRatio: goodMeasured > 0 ? goodPredicted / goodMeasured : NaN,
    },
    lowCoherenceBands: lowCoherenceBands.slice(0, 6).sort((a, b) => a.fromHz - b.fromHz),
    resonances: findResonances(frequencyHz, r.h1Magnitude, r.coherence),
  };
}
