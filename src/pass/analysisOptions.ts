import type { ChannelReading, ChannelSetting } from "../condition/scaleSamples.js";
import type { ResolvedWelchOptions, WelchOptions } from "../estimate/spectral/welchOptions.js";
import type { ChannelName } from "../read/channelChoice.js";
import type { CsvReadOptions } from "../read/csvTimeHistory.js";
import type { CsvDialect } from "../read/timeHistory.js";
import type { AccelUnit } from "../units.js";

/**
 * The options family. What every command that reads a recording takes is declared once, here:
 * `RecordingOptions` (how to read the file, how its numbers become accelerations, Welch's settings, the
 * window, progress). `AnalysisOptions` adds what the pass itself is asked for (which channels, the band,
 * the built-in listeners, more listeners); each command's options extend one of the two (ride, shock and
 * check AnalysisOptions, transfer RecordingOptions) and add only their own keys. One spelling per concept:
 * `channels` for the channels a pass reads, `fminHz`/`fmaxHz` for a band, `fromS`/`toS` for the window.
 */
export interface RecordingOptions extends WelchOptions {
  csv?: CsvReadOptions | undefined;
  /**
   * Unit of the samples where the file does not say (default g): g, mg, ug, m/s2, mm/s2, cm/s2, in/s2, ft/s2 or another
   * spelling of them.
   */
  inputUnits?: string | undefined;
  /** Unit of the results (default: each channel's input unit). */
  resultUnits?: AccelUnit | undefined;
  /** Calibration: engineering units per file unit (per full scale for WAV). */
  scale?: number | undefined;
  /** Calibration factors per channel (`--scale CH=K`); a channel at most once, and not with `scale`. */
  channelScales?: ChannelSetting<number>[] | undefined;
  /** Sensitivities of channels in volts, e.g. `100mV/g` or `10.2mV/(m/s2)` (`--sensitivity [CH=]S`). */
  sensitivities?: ChannelSetting<string>[] | undefined;
  onProgress?: ((bytesDone: number, bytesTotal: number) => void) | undefined;
  /** Start of the analysed window, s from the first sample (default 0). The whole file is still read and hashed. */
  fromS?: number | undefined;
  /** --from as a clock time (ISO 8601 date-time, or a time of day on the first stamp's day); needs date-time stamps. */
  fromClock?: string | undefined;
  /** --to as a clock time. */
  toClock?: string | undefined;
  /** End of the analysed window, s from the first sample (default: the end). */
  toS?: number | undefined;
}

/**
 * What a pass over one recording is asked for (every command that reads a recording fills it; resolveAnalysis
 * checks it against what the reader found).
 */
export interface AnalysisOptions extends RecordingOptions {
  /** Channel names or 1-based positions (a number is always a position); all channels when empty. */
  channels?: ChannelName[] | undefined;
  /** The band of the band RMS (respond and derive: the band of the input used). */
  fminHz?: number | undefined;
  fmaxHz?: number | undefined;
  /** Estimate the PSD (default true; `inspect` needs only the statistics, `transfer` its cross spectra). */
  spectrum?: boolean | undefined;
  /** Also build the amplitude histogram of each channel (one more pass over each block). */
  histogram?: boolean | undefined;
  /**
   * The built-in per-channel statistics (moments, sample-and-hold runs, stationarity stretches; default true).
   * Only without a spectrum can they be turned off: `transfer`'s listener holds every figure it reports, and
   * the channels' `stats` are then empty.
   */
  statistics?: boolean | undefined;
  /** The result goes into an HTML record: channels x segment length is held to MAX_REPORT_SAMPLES before the work. */
  forReport?: boolean | undefined;
  /** Also a peak-hold spectrum: the largest Welch PSD of consecutive stretches of this length, s, at each line. */
  peakHoldS?: number | undefined;
  /** Length of the stretches whose mean squares the stationarity test compares, s (default 1). */
  stretchS?: number | undefined;
  /** More listeners on the same pass (see PassAccumulator); their results come back in `extras`, in order. */
  accumulators?: PassAccumulator[] | undefined;
}

/**
 * One resolved analysis: the options a caller gave and what the reader found (format, CSV dialect, time
 * column, rate, channels and their units, calibration, sensitivity), turned once into the settings the
 * pass runs with (pass/resolveAnalysis.ts). It is plain data and is recorded whole in every result
 * (`analysis` in the JSON and in the report's embedded result), so a result says exactly how to reproduce
 * it. Declared here, beside the listener interface that receives it, so the pass's modules form no circle.
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
  window: {
    fromS?: number | undefined;
    toS?: number | undefined;
    fromClock?: string | undefined;
    toClock?: string | undefined;
  };
  /** Length of the stretches of the stationarity test, s. */
  stretchS: number;
  spectrum: boolean;
  histogram: boolean;
  /** Present (false) only when the built-in statistics were off (AnalysisOptions.statistics). */
  statistics?: false | undefined;
  /** Length of the peak-hold spectrum's stretches, s, when one is asked for. */
  peakHoldS?: number | undefined;
}

/**
 * A listener on the one pass: the interface every analysis beyond the built-in statistics and Welch uses
 * (ride's weighting, transfer's cross spectra, respond's time responses, shock's events, check's tones).
 * - `spectra` (optional): how many segment-length spectra it will hold and the option that sets how many;
 *   resolveAnalysis counts them with the pass's own against the memory bound before a byte is read.
 * - `start(designRateHz, analysis)` is called once before any sample flows, with the rate the reader
 *   announces (provisional for a CSV with a time column: the final one is known only when the column is
 *   read) and the resolved analysis (its Welch geometry, channels and units: nothing is resolved twice).
 *   Rate-dependent design (filters, window lengths) happens here.
 * - `push(blocks, frames)` gets every block of the selected channels, in `channels` order, conditioned
 *   (calibrated, in the result unit) and cut to the frame window. The arrays are reused: copy what must
 *   outlive the call.
 * - `finish(sampleRateHz)` gets the record's final rate and returns the result.
 * Rate contract: when the final rate differs from the design rate (relative 1e-6), the analysis carries
 * a doubt in `passDoubts`, since the accumulators were designed for a rate their samples did not have.
 */
export interface PassAccumulator<R = unknown> {
  readonly spectra?: { count: number; option: string } | undefined;
  start(designRateHz: number, analysis: ResolvedAnalysis): void;
  push(blocks: Float64Array[], frames: number): void;
  finish(sampleRateHz: number): R;
}
