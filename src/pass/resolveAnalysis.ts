import type { AnalysisOptions, RecordingOptions, ResolvedAnalysis } from "./analysisOptions.js";
import { channelConditionings, type ChannelConditioning } from "../condition/scaleSamples.js";
import { InputError, quoted } from "../errors.js";
import { normalizeWelchOptions, type ResolvedWelchOptions } from "../estimate/spectral/welchOptions.js";
import { channelIndices, type ChannelName } from "../read/channelChoice.js";
import type { CsvReadOptions } from "../read/csvTimeHistory.js";
import { MAX_REPORT_SAMPLES, MAX_SPECTRUM_SAMPLES } from "../read/analysisLimits.js";
import { isoDateTime, parseDateTimeText } from "../read/dateTimeStamp.js";
import type { RecordingInfo } from "../read/timeHistory.js";

export type { ResolvedAnalysis } from "./analysisOptions.js";

/**
 * What the pass needs beside the record: channel indices, conditioning factors and the frame window at the design rate.
 */
export interface AnalysisPlan {
  analysis: ResolvedAnalysis;
  select: number[];
  conditioning: ChannelConditioning[];
  /** First frame and end frame (exclusive) of the window at the design rate. */
  first: number;
  end: number;
}

/**
 * The indices of the channels `channels` names (read/channelChoice.ts, the one way a channel is picked); all when
 * empty.
 */
export function selectChannels(
  info: RecordingInfo,
  wanted: readonly ChannelName[] | undefined,
  option = "channels",
): number[] {
  return channelIndices(info.channels, wanted, { option, file: info.file });
}

/**
 * Turns options and the reader's findings into the one resolved analysis. The rules on the options every
 * pass shares (channels, window, band, stretches, memory bounds; the Welch ones through
 * normalizeWelchOptions) are checked here, once; an analysis checks only the options of its own (ride's
 * axes, respond's Q, ...). Errors name the library's keys (`segmentLength`); the CLI shows them as flags
 * (cli/optionFlags.ts).
 */
export function resolveAnalysis(options: AnalysisOptions, info: RecordingInfo): AnalysisPlan {
  const select = selectChannels(info, options.channels);
  const conditioning = channelConditionings(info.file, info.channels, select, options);
  for (const [key, v] of [
    ["fminHz", options.fminHz],
    ["fmaxHz", options.fmaxHz],
  ] as const) {
    if (v !== undefined && !(v >= 0 && Number.isFinite(v)))
      throw new InputError("OPTION_INVALID", { option: key, expected: "a frequency in Hz >= 0", received: String(v) });
  }
  if (options.fminHz !== undefined && options.fmaxHz !== undefined && !(options.fminHz < options.fmaxHz)) {
    throw new InputError("OPTION_INVALID", {
      option: "fminHz",
      expected: "`fminHz` below `fmaxHz`",
      received: `${options.fminHz} >= ${options.fmaxHz}`,
    });
  }
  const welch = normalizeWelchOptions(options, info.sampleRateHz);
  const spectrum = options.spectrum !== false;
  checkMemory(options, info, spectrum ? select.length : 0, welch);
  const stretchS = options.stretchS ?? 1;
  if (!(stretchS > 0 && Number.isFinite(stretchS)))
    throw new InputError("OPTION_INVALID", {
      option: "stretchS",
      expected: "a stretch length in s above 0",
      received: String(stretchS),
    });
  const peakHoldS = options.peakHoldS;
  if (peakHoldS !== undefined) {
    const segS = welch.segmentLength / info.sampleRateHz;
    if (!(peakHoldS >= segS && Number.isFinite(peakHoldS)))
      throw new InputError("OPTION_INVALID", {
        option: "peakHoldS",
        expected: `a peak-hold stretch of at least one segment (${segS} s)`,
        received: String(peakHoldS),
      });
  }
  const asked = clockWindow(options, info);
  const { first, end } = frameWindow(asked, info.sampleRateHz);
  const csvGiven = options.csv
    ? (JSON.parse(JSON.stringify({ ...options.csv, parseWorkers: undefined })) as Omit<CsvReadOptions, "parseWorkers">)
    : undefined;
  const analysis: ResolvedAnalysis = {
    file: info.file,
    reading: {
      format: info.format,
      layout: info.layout,
      designRateHz: info.sampleRateHz,
      dialect: info.dialect,
      csvGiven: csvGiven && Object.keys(csvGiven).length > 0 ? csvGiven : undefined,
    },
    channels: select.map((idx, c) => ({
      name: info.channels[idx]!.name,
      position: idx + 1,
      resultUnits: conditioning[c]!.resultUnit,
      reading: conditioning[c]!.reading,
    })),
    welch,
    band:
      options.fminHz !== undefined || options.fmaxHz !== undefined
        ? { fminHz: options.fminHz ?? 0, fmaxHz: options.fmaxHz ?? info.sampleRateHz / 2 }
        : undefined,
    window: { fromS: asked.fromS, toS: asked.toS, fromClock: options.fromClock, toClock: options.toClock },
    stretchS,
    spectrum,
    histogram: options.histogram === true,
    ...(options.statistics === false && !spectrum ? { statistics: false as const } : {}),
    peakHoldS,
  };
  return { analysis, select, conditioning, first, end };
}

/**
 * Memory is bounded before it is taken (read/analysisLimits.ts): the segment-length spectra the pass holds,
 * its own Welch spectrum per channel and those its listeners declare (transfer's cross spectra), times the
 * segment length; for an HTML record, the channels' spectra against the page's bound.
 */
function checkMemory(
  options: AnalysisOptions,
  info: RecordingInfo,
  spectrumChannels: number,
  welch: ResolvedWelchOptions,
): void {
  const { segmentLength } = welch;
  const listeners = (options.accumulators ?? []).flatMap((a) => (a.spectra ? [a.spectra] : []));
  const held = spectrumChannels + listeners.reduce((n, l) => n + l.count, 0);
  if (held * segmentLength > MAX_SPECTRUM_SAMPLES) {
    const fewer = listeners.length > 0 ? listeners.map((l) => `\`${l.option}\``).join(" or ") : "`channels`";
    throw new InputError("ANALYSIS_TOO_LARGE", {
      file: info.file,
      expected:
        listeners.length > 0
          ? `spectra held x segment length at most ${MAX_SPECTRUM_SAMPLES} (${Math.max(1, Math.floor(MAX_SPECTRUM_SAMPLES / segmentLength))} spectra at ${segmentLength} points)`
          : `channels x segment length at most ${MAX_SPECTRUM_SAMPLES} (${Math.max(1, Math.floor(MAX_SPECTRUM_SAMPLES / segmentLength))} channels at ${segmentLength} points)`,
      received:
        listeners.length > 0 ? `${held} spectra x ${segmentLength}` : `${spectrumChannels} channels x ${segmentLength}`,
      hint: `select fewer ${fewer}, or use a shorter \`segmentLength\` or a coarser \`resolutionHz\``,
    });
  }
  if (options.forReport === true && spectrumChannels * segmentLength > MAX_REPORT_SAMPLES) {
    throw new InputError("REPORT_TOO_LARGE", {
      file: info.file,
      expected: `for an HTML record, channels x segment length at most ${MAX_REPORT_SAMPLES} (${Math.max(1, Math.floor(MAX_REPORT_SAMPLES / segmentLength))} channels at ${segmentLength} points)`,
      received: `${spectrumChannels} channels x ${segmentLength} (${Number(welch.resolutionHz.toPrecision(4))} Hz lines)`,
      hint: "write the full data as CSV or JSON instead of an HTML record, or select fewer `channels`, or use a coarser `resolutionHz`",
    });
  }
}

/**
 * The resolved analysis at the record's final rate (a CSV time column is known only once fully read): the
 * line spacing follows it, the band's open top is its Nyquist frequency, and a band edge above that is an error.
 */
export function atFinalRate(
  a: ResolvedAnalysis,
  fs: number,
  asked: { fminHz?: number | undefined; fmaxHz?: number | undefined },
): ResolvedAnalysis {
  for (const [key, v] of [
    ["fminHz", asked.fminHz],
    ["fmaxHz", asked.fmaxHz],
  ] as const) {
    if (v !== undefined && v > fs / 2) {
      throw new InputError("OPTION_INVALID", {
        file: a.file,
        option: key,
        expected: `a frequency inside the record's 0–${fs / 2} Hz (half its ${fs} Hz sample rate)`,
        received: `${v} Hz`,
      });
    }
  }
  return {
    ...a,
    welch: { ...a.welch, resolutionHz: fs / a.welch.segmentLength },
    band: a.band ? { fminHz: a.band.fminHz, fmaxHz: asked.fmaxHz ?? fs / 2 } : undefined,
  };
}

/**
 * --from/--to given as clock times (`fromClock`, `toClock`: an ISO 8601 date-time, or a time of day on the
 * first stamp's day) turned into seconds from the first sample, for a record with date-time stamps.
 */
export function clockWindow<T extends RecordingOptions>(o: T, info: RecordingInfo): T {
  if (o.fromClock === undefined && o.toClock === undefined) return o;
  const stamp = info.firstStamp;
  const seconds = (text: string, option: string): number => {
    if (!stamp) {
      throw new InputError("OPTION_INVALID", {
        file: info.file,
        option,
        expected: "a time in s (a clock time needs a record with date-time stamps)",
        received: quoted(text),
      });
    }
    const day = isoDateTime(stamp.baseDays, 0, 0, false).slice(0, 10);
    // A time of day alone is on the first stamp's day; on stamps with a zone it is UTC, as the example says.
    const bare = /^\d{1,2}:\d{2}(:\d{2}(\.\d+)?)?$/.test(text.trim());
    const full = /^\d{1,2}:\d{2}/.test(text.trim())
      ? `${day} ${text.trim()}${bare && stamp.zoned ? "Z" : ""}`
      : text.trim();
    const scan = parseDateTimeText(full, stamp.baseDays);
    if (!scan || (scan.zone !== 0) !== stamp.zoned) {
      throw new InputError("OPTION_INVALID", {
        file: info.file,
        option,
        received: quoted(text),
        expected: `a clock time like the record's stamps (${stamp.zoned ? "with" : "without"} a zone), e.g. ${isoDateTime(stamp.baseDays, stamp.seconds, 0, stamp.zoned)} or ${isoDateTime(stamp.baseDays, stamp.seconds, 0, false).slice(11)}${stamp.zoned ? " (a time of day alone is UTC)" : ""}`,
      });
    }
    const s = scan.value - stamp.seconds;
    if (s < 0)
      throw new InputError("OPTION_INVALID", {
        file: info.file,
        option,
        expected: `a time at or after the first sample, ${isoDateTime(stamp.baseDays, stamp.seconds, 3, stamp.zoned)}`,
        received: quoted(text),
      });
    return s;
  };
  return {
    ...o,
    fromS: o.fromClock !== undefined ? seconds(o.fromClock, "fromClock") : o.fromS,
    toS: o.toClock !== undefined ? seconds(o.toClock, "toClock") : o.toS,
  };
}

/** First frame and end frame (exclusive) of --from/--to at the design rate: frames i with from <= i/fs < to. */
export function frameWindow(o: RecordingOptions, fs: number): { first: number; end: number } {
  for (const [name, v] of [
    ["fromS", o.fromS],
    ["toS", o.toS],
  ] as const) {
    if (v !== undefined && !(v >= 0 && Number.isFinite(v)))
      throw new InputError("OPTION_INVALID", {
        option: name,
        expected: "a time in s from the start of the record, >= 0",
        received: String(v),
      });
  }
  if (o.fromS !== undefined && o.toS !== undefined && !(o.fromS < o.toS)) {
    throw new InputError("OPTION_INVALID", {
      option: "fromS",
      expected: "`fromS` before `toS`",
      received: `${o.fromS} >= ${o.toS}`,
    });
  }
  const first = o.fromS === undefined ? 0 : Math.ceil(o.fromS * fs - 1e-9);
  const end = o.toS === undefined ? Infinity : Math.ceil(o.toS * fs - 1e-9);
  return { first, end };
}
