import type { Command } from "commander";
import type { AnalysisOptions } from "../pass/analyzeRecording.js";
import { InputError } from "../errors.js";
import { DETREND_NAMES, type Detrend } from "../estimate/spectral/welchPsd.js";
import { WINDOW_NAMES, type WindowName } from "../estimate/spectral/windows.js";
import type { ChannelSetting } from "../condition/scaleSamples.js";
import { ACCEL_UNITS, parseSensitivity, parseUnitSpec, UNIT_NAMES, type AccelUnit } from "../units.js";
import { CONFIDENCE_RULE, MAX_CONFIDENCE, MIN_CONFIDENCE } from "../estimate/spectral/welchOptions.js";

/** Option parsers that fail with the option's name, the rule and the value received. */
export function numberOption(option: string, rule: (x: number) => boolean, expected: string) {
  return (text: string): number => {
    const v = Number(text);
    if (text.trim() === "" || !Number.isFinite(v) || !rule(v))
      throw new InputError("OPTION_INVALID", { option, expected, received: JSON.stringify(text) });
    return v;
  };
}

/** `--result-units`: one of the two base units. */
function baseUnitOption(option: string) {
  return (text: string): AccelUnit => {
    const u = parseUnitSpec(text);
    if (u === undefined || u.factor !== 1)
      throw new InputError("OPTION_INVALID", {
        option,
        expected: `one of ${ACCEL_UNITS.join(", ")}`,
        received: JSON.stringify(text),
      });
    return u.base;
  };
}

/** `--units`: any acceleration unit psdgate knows, in any accepted spelling. */
function anyUnitOption(option: string) {
  return (text: string): string => {
    const u = parseUnitSpec(text);
    if (u === undefined)
      throw new InputError("OPTION_INVALID", {
        option,
        expected: `an acceleration unit: ${UNIT_NAMES.join(", ")}`,
        received: JSON.stringify(text),
      });
    return u.name;
  };
}

/**
 * `[CH=]VALUE`, repeatable: the channel is the text before the last `=` (a name may hold `=` only if
 * it is not the last one). Values are checked by `parse`.
 */
function channelSetting<T>(option: string, parse: (text: string) => T | undefined, expected: string) {
  return (text: string, prev: ChannelSetting<T>[] = []): ChannelSetting<T>[] => {
    const eq = text.lastIndexOf("=");
    const channel = eq >= 0 ? text.slice(0, eq).trim() : undefined;
    const valueText = eq >= 0 ? text.slice(eq + 1) : text;
    const value = parse(valueText);
    if (value === undefined || channel === "")
      throw new InputError("OPTION_INVALID", { option, expected, received: JSON.stringify(text) });
    return [...prev, { channel, value }];
  };
}

/**
 * A calibration factor with room for the arithmetic: 1e-12 <= |K| <= 1e12. A sample times K is squared
 * and summed over segments, so K = 1e200 made every PSD line infinite (NaN results, exit 0) and 1e308
 * made the samples themselves infinite.
 */
export const MAX_SCALE = 1e12;
const scaleValue = (t: string) => {
  const v = Number(t);
  return t.trim() !== "" && Number.isFinite(v) && Math.abs(v) >= 1 / MAX_SCALE && Math.abs(v) <= MAX_SCALE
    ? v
    : undefined;
};
const sensitivityValue = (t: string) => (parseSensitivity(t) ? t.trim() : undefined);

/**
 * A time option: seconds from the first sample (a plain number), or clock text kept as given (checked against the
 * record's stamps later).
 */
function timeOption(option: string) {
  return (v: string): number | string => {
    const t = v.trim();
    if (/^[+]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(t) && Number.isFinite(Number(t))) return Number(t);
    if (/^\d{4}-\d{2}-\d{2}[T ]\d{1,2}:\d{2}|^\d{1,2}:\d{2}/.test(t)) return t;
    throw new InputError("OPTION_INVALID", {
      option,
      expected: "a time in s >= 0, or a clock time such as 2024-05-17T14:03:10 or 14:03:10",
      received: JSON.stringify(v),
    });
  };
}

export function choice<T extends string>(option: string, values: readonly T[]) {
  return (text: string): T => {
    const t = text.toLowerCase() as T;
    if (!values.includes(t))
      throw new InputError("OPTION_INVALID", {
        option,
        expected: `one of ${values.join(", ")}`,
        received: JSON.stringify(text),
      });
    return t;
  };
}

const collect = (v: string, prev: string[] = []) => [...prev, v];

/** Options that say how to read a recording (shared by inspect, psd and check). */
export function addReadingOptions(cmd: Command): Command {
  return cmd
    .option("-c, --channel <name|n>", "analyse this channel (name or 1-based position); repeat for more", collect)
    .option(
      "--rate <hz>",
      "sample rate when the CSV has no time column",
      numberOption("--rate", (x) => x > 0, "a sample rate in Hz above 0"),
    )
    .option("--time-column <name|n>", "the CSV column that holds time (default: a column named time, t, time [ms], …)")
    .option(
      "--no-time-column",
      "do not use the CSV's time column (it is not read as a channel either; then --rate is needed)",
    )
    .option(
      "--time-unit <u>",
      "unit of a time column whose header does not say: s, ms, us, days, or serial-days (spreadsheet date numbers: days since 1899-12-30, start time said)",
      choice("--time-unit", ["s", "ms", "us", "days", "serial-days"]),
    )
    .option(
      "--delimiter <d>",
      "CSV field delimiter: comma, semicolon, tab or whitespace (default: detected)",
      choice("--delimiter", ["comma", "semicolon", "tab", "whitespace", ",", ";"]),
    )
    .option(
      "--decimal <mark>",
      "decimal mark: point or comma (default: detected)",
      choice("--decimal", ["point", "comma"]),
    )
    .option(
      "--units <u>",
      `unit of the samples where the file does not say: ${UNIT_NAMES.join(", ")} (default g)`,
      anyUnitOption("--units"),
    )
    .option(
      "--result-units <u>",
      "convert results to g or m/s2 (default: the input unit's base, g or m/s2)",
      baseUnitOption("--result-units"),
    )
    .option(
      "--scale <[ch=]k>",
      "calibration factor: engineering units per file unit (WAV: per full scale); ch=k for one channel, repeat per channel",
      channelSetting("--scale", scaleValue, "a number K with 1e-12 <= |K| <= 1e12, or CH=K"),
    )
    .option(
      "--sensitivity <[ch=]s>",
      "sensor sensitivity of a channel in volts, e.g. 100mV/g or 10.2mV/(m/s2); repeat per channel",
      channelSetting("--sensitivity", sensitivityValue, "a sensitivity such as 100mV/g or CH=10.2mV/(m/s2)"),
    )
    .option(
      "--from <time>",
      "analyse from this time: s from the first sample, or a clock time (2024-05-17T14:03:10, or 14:03:10 on the first stamp's day) for a record with date-time stamps; recorded in the results",
      timeOption("--from"),
    )
    .option("--to <time>", "analyse up to this time, in the same forms as --from", timeOption("--to"));
}

/** Options of the Welch estimate (shared by psd and check). */
export function addSpectrumOptions(cmd: Command, segmentDefault = "4096"): Command {
  return cmd
    .option(
      "-w, --window <name>",
      `${WINDOW_NAMES.join(", ")} (default hann)`,
      choice<WindowName>("--window", WINDOW_NAMES),
    )
    .option(
      "-s, --segment <n>",
      `samples per segment, a power of two (default ${segmentDefault})`,
      numberOption("--segment", (x) => Number.isInteger(x), "a power of two, e.g. 4096"),
    )
    .option(
      "-r, --resolution <hz>",
      "line spacing wanted; picks the smallest power-of-two segment that gives it",
      numberOption("--resolution", (x) => x > 0, "a line spacing in Hz above 0"),
    )
    .option(
      "--overlap <f>",
      "overlap of segments as a fraction, 0 <= f < 1 (default 0.5)",
      numberOption("--overlap", () => true, "a fraction 0 <= F < 1"),
    )
    .option(
      "--detrend <how>",
      `per segment: ${DETREND_NAMES.join(", ")} (default mean)`,
      choice<Detrend>("--detrend", DETREND_NAMES),
    )
    .option(
      "--confidence <c>",
      "level of the chi-square bounds, 0 < c < 1 (default 0.90)",
      numberOption("--confidence", (x) => x >= MIN_CONFIDENCE && x <= MAX_CONFIDENCE, CONFIDENCE_RULE),
    );
}

/** The band for a band RMS (psd only: check always uses the profile's range). */
export function addBandOptions(cmd: Command): Command {
  return cmd
    .option(
      "--fmin <hz>",
      "lower edge of the band for the band RMS",
      numberOption("--fmin", (x) => x >= 0, "a frequency in Hz >= 0"),
    )
    .option(
      "--fmax <hz>",
      "upper edge of the band for the band RMS",
      numberOption("--fmax", (x) => x > 0, "a frequency in Hz above 0"),
    );
}

export interface ParsedCommon {
  channel?: string[];
  rate?: number;
  timeColumn?: string | false;
  timeUnit?: "s" | "ms" | "us" | "days" | "serial-days";
  delimiter?: string;
  decimal?: "point" | "comma";
  units?: string;
  resultUnits?: AccelUnit;
  scale?: ChannelSetting<number>[];
  sensitivity?: ChannelSetting<string>[];
  from?: number | string;
  to?: number | string;
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
  /** Set when the result goes into an HTML record (its size is bounded before the work). */
  forReport?: boolean | undefined;
}

const DELIMS = { comma: ",", semicolon: ";", tab: "\t", whitespace: "whitespace", ",": ",", ";": ";" } as const;

export function analysisOptions(o: ParsedCommon): AnalysisOptions {
  const tc = o.timeColumn === (true as unknown) ? undefined : o.timeColumn;
  return {
    csv: {
      timeColumn: typeof tc === "string" && /^\d+$/.test(tc) ? Number(tc) : tc,
      sampleRateHz: o.rate,
      timeUnit: o.timeUnit,
      delimiter: o.delimiter === undefined ? undefined : DELIMS[o.delimiter as keyof typeof DELIMS],
      decimal: o.decimal === undefined ? undefined : o.decimal === "comma" ? "," : ".",
    },
    channels: o.channel,
    inputUnits: o.units,
    resultUnits: o.resultUnits,
    channelScales: o.scale,
    sensitivities: o.sensitivity,
    fromS: typeof o.from === "number" ? o.from : undefined,
    toS: typeof o.to === "number" ? o.to : undefined,
    fromClock: typeof o.from === "string" ? o.from : undefined,
    toClock: typeof o.to === "string" ? o.to : undefined,
    window: o.window,
    segmentLength: o.segment,
    resolutionHz: o.resolution,
    overlap: o.overlap,
    detrend: o.detrend,
    confidence: o.confidence,
    fminHz: o.fmin,
    fmaxHz: o.fmax,
    histogram: o.histogram,
    forReport: o.forReport,
  };
}

/**
 * A parsed option value in words: plain values as written, a parsed pair list (`--axes`, `--scale CH=K`) as key=value.
 */
function givenValue(v: unknown): string {
  if (v === null || typeof v !== "object") return String(v);
  const o = v as Record<string, unknown>;
  // A per-channel setting ({ channel?, value }, from `--scale`, `--sensitivity`) reads back as written: CH=K, or K for
  // every channel.
  const keys = Object.keys(o);
  if ("value" in o && keys.every((k) => k === "value" || k === "channel"))
    return o.channel === undefined ? givenValue(o.value) : `${String(o.channel)}=${givenValue(o.value)}`;
  return keys
    .filter((k) => o[k] !== undefined)
    .map((k) => `${k}=${typeof o[k] === "object" ? JSON.stringify(o[k]) : String(o[k])}`)
    .join(",");
}

/** The options the user typed (not defaults), in words for the report: `--units m/s2`, `--force`. */
export function givenOptions(cmd: Command): string[] {
  const out: string[] = [];
  for (const opt of cmd.options) {
    const key = opt.attributeName();
    if (cmd.getOptionValueSource(key) !== "cli") continue;
    const v: unknown = cmd.getOptionValue(key);
    const flag = opt.long ?? opt.short ?? key;
    if (typeof v === "boolean") out.push(v || !opt.negate ? flag : flag);
    else if (Array.isArray(v)) for (const x of v) out.push(`${flag} ${givenValue(x)}`);
    else out.push(`${flag} ${givenValue(v)}`);
  }
  return out;
}

/** The analysis options as plain JSON (undefined dropped, no callbacks): what `verify` re-runs. */
export function rerunOptions(o: AnalysisOptions & { control?: unknown }): Record<string, unknown> {
  return JSON.parse(JSON.stringify({ ...o, onProgress: undefined })) as Record<string, unknown>;
}

/**
 * A duration written `8h`, `6.5 h`, `90min`, `2h30min`, `45s`, `5d`, `5 days` or `hh:mm`, in s; undefined for anything
 * else.
 */
export function parseDuration(text: string): number | undefined {
  const body = text.trim().toLowerCase().replace(/\s+/g, "");
  const clock = /^(\d{1,2}):([0-5]\d)$/.exec(body);
  if (clock) return Number(clock[1]) * 3600 + Number(clock[2]) * 60;
  const part = /(\d+(?:\.\d+)?)(days?|d|hours?|h|minutes?|min|seconds?|s)/y;
  let total = 0;
  let m: RegExpExecArray | null;
  let at = 0;
  while ((m = part.exec(body)) !== null) {
    const v = Number(m[1]);
    total += m[2]!.startsWith("d") ? v * 86400 : m[2]!.startsWith("h") ? v * 3600 : m[2]!.startsWith("m") ? v * 60 : v;
    at = part.lastIndex;
  }
  return at === body.length && body.length > 0 ? total : undefined;
}

/**
 * `--life`, `--test-duration`: a number of seconds, or a number with s, min or h (`3600`, `90min`, `1.5h`, `2h30min`).
 */
export function durationOption(option: string) {
  return (text: string): number => {
    const t = text.trim();
    const s = /^[+]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(t)
      ? Number(t)
      : /^\d{1,2}:\d{2}$/.test(t)
        ? undefined
        : parseDuration(t);
    if (s === undefined || !(s > 0) || !Number.isFinite(s)) {
      throw new InputError("OPTION_INVALID", {
        option,
        expected: "a duration above 0: seconds, or a number with s, min, h or d (3600, 90min, 1.5h, 2h30min, 5d)",
        received: JSON.stringify(text),
      });
    }
    return s;
  };
}

/** A word that only a duration's unit would be: `--life 5 days` leaves `days` as a file argument. */
export const UNIT_WORD = /^(s|sec|secs|seconds?|min|mins|minutes?|h|hr|hrs|hours?|d|days?|weeks?|years?)$/i;

/**
 * A duration option written with a space before its unit (`--life 5 days`) splits in two, and the unit would be
 * read as a file named `days`: the option's value and the unit are put back together, or refused with one line.
 */
export function joinDurationUnits(argv: readonly string[], options: readonly string[]): string[] {
  const out: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i]!;
    const next = argv[i + 1];
    if (
      options.includes(a) &&
      next !== undefined &&
      argv[i + 2] !== undefined &&
      /^[+]?\d+(\.\d*)?$/.test(next) &&
      UNIT_WORD.test(argv[i + 2]!)
    ) {
      const unit = argv[i + 2]!.toLowerCase();
      if (/^(weeks?|years?)$/.test(unit))
        throw new InputError("OPTION_INVALID", {
          option: a,
          expected: "a duration in s, min, h or d (a week is 7d, a year of service is its hours)",
          received: JSON.stringify(`${next} ${argv[i + 2]}`),
        });
      out.push(a, `${next}${unit}`);
      i += 2;
      continue;
    }
    out.push(a);
  }
  return out;
}
