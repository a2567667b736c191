import type { Command } from "commander";
import type { AnalysisOptions } from "../analyzeRecording.js";
import { InputError } from "../errors.js";
import type { Detrend } from "../estimate/welchPsd.js";
import type { WindowName } from "../estimate/windows.js";
import { CONFIDENCE_RULE, MAX_CONFIDENCE, MIN_CONFIDENCE } from "../estimate/welchOptions.js";
import { ACCEL_UNITS, parseAccelUnit, type AccelUnit } from "../units.js";

/** Option parsers that fail with the option's name, the rule and the value received. */
export function numberOption(option: string, rule: (x: number) => boolean, expected: string) {
  return (text: string): number => {
    const v = Number(text);
    if (text.trim() === "" || !Number.isFinite(v) || !rule(v)) throw new InputError("OPTION_INVALID", { option, expected, received: JSON.stringify(text) });
    return v;
  };
}

function unitOption(option: string) {
  return (text: string): AccelUnit => {
    const u = parseAccelUnit(text);
    if (u === undefined) throw new InputError("OPTION_INVALID", { option, expected: `one of ${ACCEL_UNITS.join(", ")}`, received: JSON.stringify(text) });
    return u;
  };
}

export function choice<T extends string>(option: string, values: readonly T[]) {
  return (text: string): T => {
    const t = text.toLowerCase() as T;
    if (!values.includes(t)) throw new InputError("OPTION_INVALID", { option, expected: `one of ${values.join(", ")}`, received: JSON.stringify(text) });
    return t;
  };
}

const collect = (v: string, prev: string[] = []) => [...prev, v];

/** Options that say how to read a recording (shared by inspect, psd and check). */
export function addReadingOptions(cmd: Command): Command {
  return cmd
    .option("-c, --channel <name|n>", "analyse this channel (name or 1-based position); repeat for more", collect)
    .option("--rate <hz>", "sample rate when the CSV has no time column", numberOption("--rate", (x) => x > 0, "a sample rate in Hz above 0"))
    .option("--time-column <name|n>", "the CSV column that holds time (default: a column named time, t, time [ms], …)")
    .option("--no-time-column", "the CSV has no time column (then --rate is needed)")
    .option("--delimiter <d>", "CSV field delimiter: comma, semicolon, tab or whitespace (default: detected)", choice("--delimiter", ["comma", "semicolon", "tab", "whitespace", ",", ";"]))
    .option("--decimal <mark>", "decimal mark: point or comma (default: detected)", choice("--decimal", ["point", "comma"]))
    .option("--units <u>", "unit of the samples where the file does not say: g or m/s2 (default g)", unitOption("--units"))
    .option("--result-units <u>", "convert results to g or m/s2 (default: the input unit)", unitOption("--result-units"))
    .option("--scale <k>", "calibration factor: engineering units per file unit (WAV: per full scale)", numberOption("--scale", (x) => x !== 0, "a non-zero number"));
}

/** Options of the Welch estimate (shared by psd and check). */
export function addSpectrumOptions(cmd: Command, segmentDefault = "4096"): Command {
  return cmd
    .option("-w, --window <name>", "hann, hamming, blackman-harris, flattop or rectangular (default hann)", choice<WindowName>("--window", ["hann", "hamming", "blackman-harris", "flattop", "rectangular"]))
    .option("-s, --segment <n>", `samples per segment, a power of two (default ${segmentDefault})`, numberOption("--segment", (x) => Number.isInteger(x), "a power of two, e.g. 4096"))
    .option("-r, --resolution <hz>", "line spacing wanted; picks the smallest power-of-two segment that gives it", numberOption("--resolution", (x) => x > 0, "a line spacing in Hz above 0"))
    .option("--overlap <f>", "overlap of segments as a fraction, 0 <= f < 1 (default 0.5)", numberOption("--overlap", () => true, "a fraction 0 <= F < 1"))
    .option("--detrend <how>", "per segment: none, mean or linear (default mean)", choice<Detrend>("--detrend", ["none", "mean", "linear"]))
    .option("--confidence <c>", "level of the chi-square bounds, 0 < c < 1 (default 0.90)", numberOption("--confidence", (x) => x >= MIN_CONFIDENCE && x <= MAX_CONFIDENCE, CONFIDENCE_RULE));
}

/** The band for a band RMS (psd only: check always uses the profile's range). */
export function addBandOptions(cmd: Command): Command {
  return cmd
    .option("--fmin <hz>", "lower edge of the band for the band RMS", numberOption("--fmin", (x) => x >= 0, "a frequency in Hz >= 0"))
    .option("--fmax <hz>", "upper edge of the band for the band RMS", numberOption("--fmax", (x) => x > 0, "a frequency in Hz above 0"));
}

export interface ParsedCommon {
  channel?: string[];
  rate?: number;
  timeColumn?: string | false;
  delimiter?: string;
  decimal?: "point" | "comma";
  units?: AccelUnit;
  resultUnits?: AccelUnit;
  scale?: number;
  window?: WindowName;
  segment?: number;
  resolution?: number;
  overlap?: number;
  detrend?: Detrend;
  confidence?: number;
  fmin?: number;
  fmax?: number;
  /** Set by the check command when a report will show the histogram. */
  histogram?: boolean;
}

const DELIMS = { comma: ",", semicolon: ";", tab: "\t", whitespace: "whitespace", ",": ",", ";": ";" } as const;

export function analysisOptions(o: ParsedCommon): AnalysisOptions {
  const tc = o.timeColumn === true as unknown ? undefined : o.timeColumn;
  return {
    csv: {
      timeColumn: typeof tc === "string" && /^\d+$/.test(tc) ? Number(tc) : tc,
      sampleRateHz: o.rate,
      delimiter: o.delimiter === undefined ? undefined : DELIMS[o.delimiter as keyof typeof DELIMS],
      decimal: o.decimal === undefined ? undefined : o.decimal === "comma" ? "," : ".",
    },
    channels: o.channel,
    inputUnits: o.units,
    resultUnits: o.resultUnits,
    scale: o.scale,
    window: o.window,
    segmentLength: o.segment,
    resolutionHz: o.resolution,
    overlap: o.overlap,
    detrend: o.detrend,
    confidence: o.confidence,
    fminHz: o.fmin,
    fmaxHz: o.fmax,
    histogram: o.histogram,
  };
}
