import type { ChannelSetting } from "../condition/scaleSamples.js";
import type { WelchOptions } from "../estimate/spectral/welchOptions.js";
import type { CsvReadOptions } from "../read/csvTimeHistory.js";
import type { AccelUnit } from "../units.js";

/**
 * What a pass over one recording is asked for (every command that reads a recording fills it; resolveAnalysis
 * checks it against what the reader found).
 */
export interface AnalysisOptions extends WelchOptions {
  csv?: CsvReadOptions | undefined;
  /** Channel names or 1-based positions; all channels when empty. */
  channels?: string[] | undefined;
  /** Unit of the samples where the file does not say (default g): g, mg, ug, m/s2, mm/s2, cm/s2, in/s2, ft/s2 or another spelling of them. */
  inputUnits?: string | undefined;
  /** Unit of the results (default: each channel's input unit). */
  resultUnits?: AccelUnit | undefined;
  /** Calibration: engineering units per file unit (per full scale for WAV). */
  scale?: number | undefined;
  /** Calibration factors per channel (`--scale CH=K`); a channel at most once, and not with `scale`. */
  channelScales?: ChannelSetting<number>[] | undefined;
  /** Sensitivities of channels in volts, e.g. `100mV/g` or `10.2mV/(m/s2)` (`--sensitivity [CH=]S`). */
  sensitivities?: ChannelSetting<string>[] | undefined;
  fminHz?: number | undefined;
  fmaxHz?: number | undefined;
  /** Estimate the PSD (default true; `inspect` needs only the statistics). */
  spectrum?: boolean | undefined;
  /** Also build the amplitude histogram of each channel (one more pass over each block). */
  histogram?: boolean | undefined;
  /** The result goes into an HTML record: channels x segment length is held to MAX_REPORT_SAMPLES before the work. */
  forReport?: boolean | undefined;
  onProgress?: ((bytesDone: number, bytesTotal: number) => void) | undefined;
  /** Start of the analysed window, s from the first sample (default 0). The whole file is still read and hashed. */
  fromS?: number | undefined;
  /** --from as a clock time (ISO 8601 date-time, or a time of day on the first stamp's day); needs date-time stamps. */
  fromClock?: string | undefined;
  /** --to as a clock time. */
  toClock?: string | undefined;
  /** End of the analysed window, s from the first sample (default: the end). */
  toS?: number | undefined;
  /** Also a peak-hold spectrum: the largest Welch PSD of consecutive stretches of this length, s, at each line. */
  peakHoldS?: number | undefined;
  /** Length of the stretches whose mean squares the stationarity test compares, s (default 1). */
  stretchS?: number | undefined;
  /** More listeners on the same pass (see PassAccumulator); their results come back in `extras`, in order. */
  accumulators?: PassAccumulator[] | undefined;
}

/**
 * An extra listener on the one pass: how an analysis beyond the built-in statistics and Welch joins it
 * (ride's weighting, respond's time response, shock's events, the tone fit).
 * - `start(designRateHz)` is called once before any sample flows, with the rate the reader announces
 *   (provisional for a CSV with a time column: the final one is known only when the column is read).
 *   Rate-dependent design (filters, window lengths) happens here.
 * - `push(blocks, frames)` gets every block of the selected channels, in `channels` order, conditioned
 *   (calibrated, in the result unit) and cut to the frame window. The arrays are reused: copy what must
 *   outlive the call.
 * - `finish(sampleRateHz)` gets the record's final rate and returns the result.
 * Rate contract: when the final rate differs from the design rate (relative 1e-6), the analysis carries
 * a doubt in `passDoubts`, since the accumulators were designed for a rate their samples did not have.
 */
export interface PassAccumulator<R = unknown> {
  start(designRateHz: number): void;
  push(blocks: Float64Array[], frames: number): void;
  finish(sampleRateHz: number): R;
}
