import { InputError } from "../errors.js";

/**
 * The one table from the library's option keys to the command line's flags. The library names its own
 * keys in errors (`option: "segmentLength"`, and inside texts as `` `segmentLength` `` or
 * `` `csv.timeUnit: ms` ``); the CLI shows the flag a user typed. tests/cli/optionFlags.test.ts holds every
 * key the library names to this table.
 */
export const OPTION_FLAGS: Readonly<Record<string, string>> = {
  channels: "--channel",
  "csv.sampleRateHz": "--rate",
  "csv.timeColumn": "--time-column",
  "csv.timeUnit": "--time-unit",
  "csv.delimiter": "--delimiter",
  "csv.decimal": "--decimal",
  inputUnits: "--units",
  resultUnits: "--result-units",
  scale: "--scale",
  channelScales: "--scale",
  sensitivities: "--sensitivity",
  fromS: "--from",
  toS: "--to",
  fromClock: "--from",
  toClock: "--to",
  window: "--window",
  segmentLength: "--segment",
  resolutionHz: "--resolution",
  overlap: "--overlap",
  detrend: "--detrend",
  confidence: "--confidence",
  fminHz: "--fmin",
  fmaxHz: "--fmax",
  meta: "--meta",
  metaTable: "--meta-table",
  // check
  control: "--control",
  "control.channels": "--control",
  "control.rule": "--control-rule",
  // respond
  fn: "--fn",
  q: "--q",
  durationS: "--duration",
  basquinB: "--basquin",
  strokeMm: "--stroke-mm",
  againstChannel: "--against-channel",
  // transfer
  inputChannel: "--in",
  outputChannels: "--output-channel",
  goodCoherence: "--good-coherence",
  // ride
  axes: "--axes",
  floor: "--floor",
  exposureS: "--exposure",
  runningRmsS: "--running-rms",
  // No command takes the stationarity stretch on its own: ride sets it from --running-rms (others use 1 s).
  stretchS: "--running-rms",
  // respond
  stressPerUnit: "--stress-per-metre",
  // synth
  sampleRateHz: "--rate",
  // derive
  mix: "--mix",
  lifeS: "--life",
  testDurationS: "--test-duration",
  maxBreakpoints: "--breakpoints",
  margin: "--margin",
  perOctave: "--per-octave",
  coverage: "--coverage",
  toleranceConfidence: "--tolerance-confidence",
  extremeLimit: "--extreme-limit",
  bandDb: "--band-db",
  rmsPercent: "--rms-percent",
  minDof: "--min-dof",
  // verify
  recording: "--recording",
  profile: "--profile",
  // derive, shock, psd/ride
  fieldDamage: "--field-damage",
  threshold: "--threshold",
  thresholdFactor: "--threshold-factor",
  holdS: "--hold",
  peakHoldS: "--peak-hold",
};

/** Flags whose `false` has a flag of its own. */
const NEGATED: Readonly<Record<string, string>> = { "csv.timeColumn": "--no-time-column" };

/** Library values shown as the CLI spells them. */
const VALUE_WORDS: Readonly<Record<string, Readonly<Record<string, string>>>> = {
  "csv.decimal": { ",": "comma", ".": "point" },
  "csv.delimiter": { ";": "';'", ",": "','", "\t": "tab" },
};

/** The flag for a library key (the key itself when the CLI has no flag for it). */
export function flagFor(key: string): string {
  return OPTION_FLAGS[key] ?? key;
}

/** `` `key` `` and `` `key: value` `` in a library text, in the CLI's words. */
export function inFlags(text: string): string {
  return text.replace(/`([A-Za-z][A-Za-z.]*)(?:: ([^`]+))?`/g, (whole, key: string, value: string | undefined) => {
    const flag = OPTION_FLAGS[key];
    if (flag === undefined) return whole;
    if (value === undefined) return flag;
    const v = value.replace(/^"(.*)"$/, "$1");
    if (v === "false" && NEGATED[key]) return NEGATED[key];
    return `${flag} ${VALUE_WORDS[key]?.[v] ?? v}`;
  });
}

/** A library error as the CLI shows it: its option and the options its texts name as flags. */
export function asCliError(e: InputError): InputError {
  const d = e.details;
  const option = d.option !== undefined && !d.option.startsWith("-") ? flagFor(d.option) : d.option;
  const next = {
    ...d,
    option,
    expected: inFlags(d.expected),
    received: d.received === undefined ? undefined : inFlags(d.received),
    hint: d.hint === undefined ? undefined : inFlags(d.hint),
  };
  return new InputError(e.code, next);
}
