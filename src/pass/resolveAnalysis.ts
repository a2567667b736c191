import type { AnalysisOptions } from "./analysisOptions.js";
import { channelConditionings, type ChannelConditioning, type ChannelReading } from "../condition/scaleSamples.js";
import { InputError, quoted } from "../errors.js";
import { normalizeWelchOptions, type ResolvedWelchOptions } from "../estimate/spectral/welchOptions.js";
import type { CsvReadOptions } from "../read/csvTimeHistory.js";
import { MAX_REPORT_SAMPLES, MAX_SPECTRUM_SAMPLES } from "../read/analysisLimits.js";
import { isoDateTime, parseDateTimeText } from "../read/dateTimeStamp.js";
import type { CsvDialect, RecordingInfo } from "../read/timeHistory.js";
import type { AccelUnit } from "../units.js";

/**
 * One resolved analysis: the options a caller gave and what the reader found (format, CSV dialect, time
 * column, rate, channels and their units, calibration, sensitivity), turned once into the settings the
 * pass runs with. The rules on the options every pass shares (channels, window, band, stretches, memory
 * bounds; the Welch ones through normalizeWelchOptions) are checked here, once; an analysis checks only the
 * options of its own (ride's axes, respond's Q, ...). It is plain data and is recorded whole in every
 * result (`analysis` in the JSON and in the report's embedded result), so a result says exactly how to
 * reproduce it. Errors name the library's keys (`segmentLength`); the CLI shows them as flags
 * (cli/optionFlags.ts).
 */
export interface ResolvedAnalysis {
  file: string;
  reading: {
    format: "csv" | "wav";
    layout: string;
    /** The rate the reader announced before the read (a CSV's time column is final only at its end). */
    designRateHz: number;
    /** How a CSV was read (detected or as given). */
    dialect?: CsvDialect | undefined;
    /** The CSV options as given (undefined fields dropped). */
    csvGiven?: Omit<CsvReadOptions, "parseWorkers"> | undefined;
  };
  /** The channels analysed, in order, with how their numbers became accelerations. */
  channels: { name: string; position: number; resultUnits: AccelUnit; reading: ChannelReading }[];
  welch: ResolvedWelchOptions;
  /** The band of the band RMS, when one was asked for. */
  band?: { fminHz: number; fmaxHz: number } | undefined;
  /** The analysed window as asked (seconds from the first sample; clock times as given). */
  window: { fromS?: number | undefined; toS?: number | undefined; fromClock?: string | undefined; toClock?: string | undefined };
  /** Length of the stretches of the stationarity test, s. */
  stretchS: number;
  spectrum: boolean;
  histogram: boolean;
  /** Length of the peak-hold spectrum's stretches, s, when one is asked for. */
  peakHoldS?: number | undefined;
}

/** What the pass needs beside the record: channel indices, conditioning factors and the frame window at the design rate. */
export interface AnalysisPlan {
  analysis: ResolvedAnalysis;
  select: number[];
  conditioning: ChannelConditioning[];
  /** First frame and end frame (exclusive) of the window at the design rate. */
  first: number;
  end: number;
}

export function selectChannels(info: RecordingInfo, wanted: string[] | undefined): number[] {
  if (wanted === undefined || wanted.length === 0) return info.channels.map((_, i) => i);
  return wanted.map((w) => {
    const byName = info.channels.findIndex((c) => c.name.toLowerCase() === w.toLowerCase());
    if (byName >= 0) return byName;
    if (/^\d+$/.test(w) && Number(w) >= 1 && Number(w) <= info.channels.length) return Number(w) - 1;
    throw new InputError("CHANNEL_NOT_FOUND", {
      file: info.file, option: "channels", expected: `a channel name or position: ${info.channels.map((c, i) => `${i + 1}=${c.name}`).join(", ")}`, received: quoted(w),
    });
  });
}


/** Turns options and the reader's findings into the one resolved analysis; every option rule is checked here. */
export function resolveAnalysis(options: AnalysisOptions, info: RecordingInfo): AnalysisPlan {
  const select = selectChannels(info, options.channels);
  const conditioning = channelConditionings(info.file, info.channels, select, options);
  for (const [key, v] of [["fminHz", options.fminHz], ["fmaxHz", options.fmaxHz]] as const) {
    if (v !== undefined && !(v >= 0 && Number.isFinite(v))) throw new InputError("OPTION_INVALID", { option: key, expected: "a frequency in Hz >= 0", received: String(v) });
  }
  if (options.fminHz !== undefined && options.fmaxHz !== undefined && !(options.fminHz < options.fmaxHz)) {
    throw new InputError("OPTION_INVALID", { option: "fminHz", expected: "`fminHz` below `fmaxHz`", received: `${options.fminHz} >= ${options.fmaxHz}` });
  }
  const welch = normalizeWelchOptions(options, info.sampleRateHz);
  const spectrum = options.spectrum !== false;
  // Memory is bounded before it is taken: channels x segment length (read/analysisLimits.ts).
  const spectrumChannels = spectrum ? select.length : 0;
  if (spectrumChannels * welch.segmentLength > MAX_SPECTRUM_SAMPLES) {
    throw new InputError("ANALYSIS_TOO_LARGE", {
      file: info.file, expected: `channels x segment length at most ${MAX_SPECTRUM_SAMPLES} (${Math.max(1, Math.floor(MAX_SPECTRUM_SAMPLES / welch.segmentLength))} channels at ${welch.segmentLength} points)`,
      received: `${spectrumChannels} channels x ${welch.segmentLength}`, hint: "select fewer `channels`, or use a shorter `segmentLength` or a coarser `resolutionHz`",
    });
  }
  if (options.forReport === true && spectrumChannels * welch.segmentLength > MAX_REPORT_SAMPLES) {
    throw new InputError("REPORT_TOO_LARGE", {
      file: info.file, expected: `for an HTML record, channels x segment length at most ${MAX_REPORT_SAMPLES} (${Math.max(1, Math.floor(MAX_REPORT_SAMPLES / welch.segmentLength))} channels at ${welch.segmentLength} points)`,
      received: `${spectrumChannels} channels x ${welch.segmentLength} (${Number(welch.resolutionHz.toPrecision(4))} Hz lines)`,
      hint: "write the full data as CSV or JSON instead of an HTML record, or select fewer `channels`, or use a coarser `resolutionHz`",
    });
  }
  const stretchS = options.stretchS ?? 1;
  if (!(stretchS > 0 && Number.isFinite(stretchS))) throw new InputError("OPTION_INVALID", { option: "stretchS", expected: "a stretch length in s above 0", received: String(stretchS) });
  const peakHoldS = options.peakHoldS;
  if (peakHoldS !== undefined) {
    const segS = welch.segmentLength / info.sampleRateHz;
    if (!(peakHoldS >= segS && Number.isFinite(peakHoldS))) throw new InputError("OPTION_INVALID", { option: "peakHoldS", expected: `a peak-hold stretch of at least one segment (${segS} s)`, received: String(peakHoldS) });
  }
  const asked = clockWindow(options, info);
  const { first, end } = frameWindow(asked, info.sampleRateHz);
  const csvGiven = options.csv ? (JSON.parse(JSON.stringify({ ...options.csv, parseWorkers: undefined })) as Omit<CsvReadOptions, "parseWorkers">) : undefined;
  const analysis: ResolvedAnalysis = {
    file: info.file,
    reading: { format: info.format, layout: info.layout, designRateHz: info.sampleRateHz, dialect: info.dialect, csvGiven: csvGiven && Object.keys(csvGiven).length > 0 ? csvGiven : undefined },
    channels: select.map((idx, c) => ({ name: info.channels[idx]!.name, position: idx + 1, resultUnits: conditioning[c]!.resultUnit, reading: conditioning[c]!.reading })),
    welch,
    band: options.fminHz !== undefined || options.fmaxHz !== undefined ? { fminHz: options.fminHz ?? 0, fmaxHz: options.fmaxHz ?? info.sampleRateHz / 2 } : undefined,
    window: { fromS: asked.fromS, toS: asked.toS, fromClock: options.fromClock, toClock: options.toClock },
    stretchS,
    spectrum,
    histogram: options.histogram === true,
    peakHoldS,
  };
  return { analysis, select, conditioning, first, end };
}

/**
 * The resolved analysis at the record's final rate (a CSV time column is known only once fully read): the
 * line spacing follows it, the band's open top is its Nyquist frequency, and a band edge above that is an error.
 */
export function atFinalRate(a: ResolvedAnalysis, fs: number, asked: { fminHz?: number | undefined; fmaxHz?: number | undefined }): ResolvedAnalysis {
  for (const [key, v] of [["fminHz", asked.fminHz], ["fmaxHz", asked.fmaxHz]] as const) {
    if (v !== undefined && v > fs / 2) {
      throw new InputError("OPTION_INVALID", { file: a.file, option: key, expected: `a frequency inside the record's 0–${fs / 2} Hz (half its ${fs} Hz sample rate)`, received: `${v} Hz` });
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
export function clockWindow(o: AnalysisOptions, info: RecordingInfo): AnalysisOptions {
  if (o.fromClock === undefined && o.toClock === undefined) return o;
  const stamp = info.firstStamp;
  const seconds = (text: string, option: string): number => {
    if (!stamp) {
      throw new InputError("OPTION_INVALID", { file: info.file, option, expected: "a time in s (a clock time needs a record with date-time stamps)", received: quoted(text) });
    }
    const day = isoDateTime(stamp.baseDays, 0, 0, false).slice(0, 10);
    const full = /^\d{1,2}:\d{2}/.test(text.trim()) ? `${day} ${text.trim()}` : text.trim();
    const scan = parseDateTimeText(full, stamp.baseDays);
    if (!scan || (scan.zone !== 0) !== stamp.zoned) {
      throw new InputError("OPTION_INVALID", {
        file: info.file, option, received: quoted(text),
        expected: `a clock time like the record's stamps (${stamp.zoned ? "with" : "without"} a zone), e.g. ${isoDateTime(stamp.baseDays, stamp.seconds, 0, stamp.zoned)} or ${isoDateTime(stamp.baseDays, stamp.seconds, 0, false).slice(11)}`,
      });
    }
    const s = scan.value - stamp.seconds;
    if (s < 0) throw new InputError("OPTION_INVALID", { file: info.file, option, expected: `a time at or after the first sample, ${isoDateTime(stamp.baseDays, stamp.seconds, 3, stamp.zoned)}`, received: quoted(text) });
    return s;
  };
  return {
    ...o,
    fromS: o.fromClock !== undefined ? seconds(o.fromClock, "fromClock") : o.fromS,
    toS: o.toClock !== undefined ? seconds(o.toClock, "toClock") : o.toS,
  };
}

/** First frame and end frame (exclusive) of --from/--to at the design rate: frames i with from <= i/fs < to. */
export function frameWindow(o: AnalysisOptions, fs: number): { first: number; end: number } {
  for (const [name, v] of [["fromS", o.fromS], ["toS", o.toS]] as const) {
    if (v !== undefined && !(v >= 0 && Number.isFinite(v))) throw new InputError("OPTION_INVALID", { option: name, expected: "a time in s from the start of the record, >= 0", received: String(v) });
  }
  if (o.fromS !== undefined && o.toS !== undefined && !(o.fromS < o.toS)) {
    throw new InputError("OPTION_INVALID", { option: "fromS", expected: "`fromS` before `toS`", received: `${o.fromS} >= ${o.toS}` });
  }
  const first = o.fromS === undefined ? 0 : Math.ceil(o.fromS * fs - 1e-9);
  const end = o.toS === undefined ? Infinity : Math.ceil(o.toS * fs - 1e-9);
  return { first, end };
}

