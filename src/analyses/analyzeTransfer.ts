import { clockWindow, frameWindow, selectChannels } from "../pass/resolveAnalysis.js";
import { MAX_SPECTRUM_SAMPLES } from "../read/analysisLimits.js";
import { channelConditionings, scaleSamples, type ChannelReading, type ChannelSetting } from "../condition/scaleSamples.js";
import { InputError } from "../errors.js";
import { normalQuantile } from "../estimate/statistics/chiSquare.js";
import { CrossSpectrumAccumulator } from "../estimate/spectral/crossSpectrum.js";
import { findResonances, frequencyResponse, type FrequencyResponse, type Resonance } from "../estimate/spectral/frequencyResponse.js";
import { frequencyAxis } from "../estimate/spectral/psdEstimate.js";
import { welchDof } from "../estimate/spectral/welchDof.js";
import { normalizeWelchOptions, type ResolvedWelchOptions, type WelchOptions } from "../estimate/spectral/welchOptions.js";
import { spectralWindow } from "../estimate/spectral/windows.js";
import type { CsvReadOptions } from "../read/csvTimeHistory.js";
import { openTimeHistory } from "../read/openTimeHistory.js";
import type { TimeHistorySource } from "../read/timeHistory.js";
import type { AccelUnit } from "../units.js";
import type { Finding } from "../findings.js";

/**
 * Frequency response from one input channel to one or more output channels of a recording, in one
 * pass of the samples through a cross-spectral Welch accumulator (estimate/spectral/crossSpectrum.ts): H1, H2,
 * coherence, their random errors, the output spectrum the input predicts, and the resonances of H1.
 */
export interface TransferOptions extends WelchOptions {
  csv?: CsvReadOptions | undefined;
  /** Input (reference) channel: name or 1-based position. */
  inputChannel: string;
  /** Output channels: names or 1-based positions (default: every channel but the input). */
  outputChannels?: string[] | undefined;
  /** Unit of the samples where the file does not say (any spelling parseUnitSpec knows; default g). */
  inputUnits?: string | undefined;
  /** Unit every channel is converted to (default the input channel's), so H is dimensionless. */
  resultUnits?: AccelUnit | undefined;
  scale?: number | undefined;
  channelScales?: ChannelSetting<number>[] | undefined;
  sensitivities?: ChannelSetting<string>[] | undefined;
  /** Coherence at or above which a line counts as well explained by the input (default 0.9). */
  goodCoherence?: number | undefined;
  onProgress?: ((bytesDone: number, bytesTotal: number) => void) | undefined;
  /** Start of the analysed window, s from the first sample (default 0); the whole file is still read and hashed. */
  fromS?: number | undefined;
  /** End of the analysed window, s from the first sample (default: the end). */
  toS?: number | undefined;
  /** --from/--to as clock times (records with date-time stamps). */
  fromClock?: string | undefined;
  toClock?: string | undefined;
}

export interface TransferOutput extends FrequencyResponse {
  name: string;
  position: number;
  /** |H1| (1 -+ z eps), z the normal quantile of the confidence (normal approximation of the error). */
  h1Lower: Float64Array;
  h1Upper: Float64Array;
  measuredOutputPsd: Float64Array;
  /** sqrt(sum P df) of each, over all lines. */
  predictedRms: number;
  measuredRms: number;
  /** Lines with coherence >= goodCoherence: their share of all lines and of the measured mean square, and predicted / measured mean square over them. */
  wellExplained: { lineFraction: number; powerFraction: number; meanSquareRatio: number };
  /** Contiguous ranges where the coherence is below 0.5 and the output carries at least 1 % of its mean square. */
  lowCoherenceBands: { fromHz: number; toHz: number; powerFraction: number }[];
  resonances: Resonance[];
}

export interface TransferAnalysis {
  input: { file: string; format: "csv" | "wav"; layout: string; sha256: string; bytes: number; sampleRateHz: number; samples: number; durationS: number };
  /** The analysed window (--from/--to), s from the first sample, and its frames; the whole record without them. */
  window: { fromS: number; toS: number; durationS: number; frames: number; fromClock?: string | undefined; toClock?: string | undefined };
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
}

export async function analyzeTransfer(file: string, options: TransferOptions): Promise<TransferAnalysis> {
  const source = await openTimeHistory(file, { ...options.csv });
  try {
    return await analyzeTransferSource(source, options);
  } finally {
    await source.close?.();
  }
}

export async function analyzeTransferSource(source: TimeHistorySource, options: TransferOptions): Promise<TransferAnalysis> {
  const { info } = source;
  const pick = (option: string, wanted: string[]) => {
    try {
      return selectChannels(info, wanted);
    } catch (e) {
      if (e instanceof InputError) throw new InputError(e.code, { ...e.details, option });
      throw e;
    }
  };
  const [inIdx] = pick("inputChannel", [options.inputChannel]);
  const outIdx = options.outputChannels !== undefined && options.outputChannels.length > 0
    ? pick("outputChannels", options.outputChannels)
    : info.channels.map((_, i) => i).filter((i) => i !== inIdx);
  if (outIdx.length === 0) throw new InputError("OPTION_MISSING", { file: info.file, option: "outputChannels", expected: "an output channel besides the input (the file has only one channel)", received: "none" });
  for (const [k, o] of outIdx.entries()) {
    if (o === inIdx) throw new InputError("OPTION_INVALID", { option: "outputChannels", expected: "an output channel other than the input", received: JSON.stringify(options.outputChannels?.[k]) });
    if (outIdx.indexOf(o) !== k) throw new InputError("OPTION_INVALID", { option: "outputChannels", expected: "each output channel once", received: JSON.stringify(options.outputChannels?.[k]) });
  }
  const select = [inIdx!, ...outIdx];
  const refCond = channelConditionings(info.file, info.channels, [inIdx!], options)[0]!;
  const common = options.resultUnits ?? refCond.resultUnit;
  const conditioning = channelConditionings(info.file, info.channels, select, { ...options, resultUnits: common });
  const good = options.goodCoherence ?? 0.9;
  if (!(good > 0 && good < 1)) throw new InputError("OPTION_INVALID", { option: "goodCoherence", expected: "a coherence between 0 and 1", received: String(good) });
  const settings = normalizeWelchOptions(options, info.sampleRateHz);
  // Memory is bounded before it is taken, as in every pass (read/analysisLimits.ts): the cross-spectral
  // accumulator holds an auto spectrum per channel and a complex cross spectrum per output, so it counts
  // channels + outputs segment lengths.
  const held = (2 * select.length - 1) * settings.segmentLength;
  if (held > MAX_SPECTRUM_SAMPLES) {
    throw new InputError("ANALYSIS_TOO_LARGE", {
      file: info.file, expected: `(channels + outputs) x segment length at most ${MAX_SPECTRUM_SAMPLES}`,
      received: `${2 * select.length - 1} spectra x ${settings.segmentLength}`, hint: "name fewer `outputChannels`, or use a shorter `segmentLength` or a coarser `resolutionHz`",
    });
  }
  // The frame window [first, end) of --from/--to at the announced rate, cut inside the pass (resolveAnalysis.ts).
  const asked = clockWindow(options, info);
  const { first, end } = frameWindow(asked, info.sampleRateHz);
  const window = spectralWindow(settings.window, settings.segmentLength);
  const acc = new CrossSpectrumAccumulator({ segmentLength: settings.segmentLength, hop: settings.hop, window, detrend: settings.detrend }, select.length, 0);
  const views: Float64Array[] = select.map(() => new Float64Array(0));
  let offset = 0;
  let taken = 0;
  const summary = await source.read(
    select,
    (blocks, frames) => {
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
      }
      acc.push(views, n);
    },
    options.onProgress ? (b) => options.onProgress!(b, info.bytes) : undefined,
  );
  const fs = summary.sampleRateHz;
  if (taken === 0 && (asked.fromS !== undefined || asked.toS !== undefined)) {
    throw new InputError("WINDOW_EMPTY", {
      file: info.file, option: asked.fromS !== undefined ? "fromS" : "toS",
      expected: `a window inside the record (0 to ${Number((summary.frames / fs).toPrecision(5))} s)`, received: `${asked.fromS ?? 0} s to ${asked.toS ?? "the end"}`,
    });
  }
  const sums = acc.finish(fs);
  if (sums.segments === 0) {
    throw new InputError("RECORD_TOO_SHORT", {
      file: info.file, expected: `at least one segment of ${settings.segmentLength} samples with finite values in every channel`, received: `${taken} samples${taken !== summary.frames ? " in the window" : ""}, ${sums.skippedSegments} segment(s) left out`,
      hint: "use a shorter `segmentLength` or a coarser `resolutionHz`",
    });
  }
  const frequencyHz = frequencyAxis(settings.segmentLength, fs);
  const df = fs / settings.segmentLength;
  const dof = welchDof(window, settings.hop, sums.segments);
  const nd = dof / 2;
  const z = normalQuantile(0.5 + settings.confidence / 2);
  const rmsOf = (p: Float64Array) => {
    let s = 0;
    for (let k = 0; k < p.length; k++) s += p[k]!;
    return Math.sqrt(s * df);
  };
  const gxx = sums.auto[0]!;
  const warnings: Finding[] = [];
  if (sums.skippedSegments > 0) warnings.push({ code: "SEGMENTS_LEFT_OUT", values: { segments: sums.skippedSegments } });
  if (sums.segments < 8) warnings.push({ code: "FEW_AVERAGES_COHERENCE", values: { averages: sums.segments, coherenceBias: 1 / Math.max(1, nd) } });
  const outputs = outIdx.map((idx, j): TransferOutput => {
    const c = j + 1;
    const gyy = sums.auto[c]!;
    const r = frequencyResponse(gxx, gyy, sums.crossRe[c]!, sums.crossIm[c]!, nd);
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
      if (p >= 0.01 * total) lowCoherenceBands.push({ fromHz: frequencyHz[k]!, toHz: frequencyHz[e - 1]!, powerFraction: p / total });
      k = e;
    }
    lowCoherenceBands.sort((a, b) => b.powerFraction - a.powerFraction);
    return {
      name: info.channels[idx]!.name,
      position: idx + 1,
      h1Magnitude: r.h1Magnitude, h1Lower: lower, h1Upper: upper, h2Magnitude: r.h2Magnitude, phaseDeg: r.phaseDeg, coherence: r.coherence,
      magnitudeError: r.magnitudeError, phaseErrorDeg: r.phaseErrorDeg, coherenceError: r.coherenceError,
      predictedOutputPsd: r.predictedOutputPsd, measuredOutputPsd: gyy,
      predictedRms: rmsOf(r.predictedOutputPsd), measuredRms: rmsOf(gyy),
      wellExplained: { lineFraction: goodLines / (gyy.length - 1), powerFraction: total > 0 ? goodMeasured / total : NaN, meanSquareRatio: goodMeasured > 0 ? goodPredicted / goodMeasured : NaN },
      lowCoherenceBands: lowCoherenceBands.slice(0, 6).sort((a, b) => a.fromHz - b.fromHz),
      resonances: findResonances(frequencyHz, r.h1Magnitude, r.coherence),
    };
  });
  return {
    input: { file: info.file, format: info.format, layout: info.layout, sha256: summary.sha256, bytes: summary.bytes, sampleRateHz: fs, samples: summary.frames, durationS: summary.frames / fs },
    window: {
      fromS: Math.min(first, summary.frames) / fs, toS: Math.min(end, summary.frames) / fs, durationS: taken / fs, frames: taken,
      ...(options.fromClock !== undefined ? { fromClock: options.fromClock } : {}), ...(options.toClock !== undefined ? { toClock: options.toClock } : {}),
    },
    settings: { ...settings, resolutionHz: df, scale: options.scale ?? options.channelScales?.find((k) => k.channel === undefined)?.value ?? 1, goodCoherence: good },
    averages: sums.segments,
    skippedSegments: sums.skippedSegments,
    dof,
    disjointAverages: nd,
    units: common,
    frequencyHz,
    reference: { name: info.channels[inIdx!]!.name, position: inIdx! + 1, psd: gxx, rms: rmsOf(gxx) },
    channels: select.map((idx, c) => ({ name: info.channels[idx]!.name, position: idx + 1, reading: conditioning[c]!.reading })),
    outputs,
    warnings,
  };
}
