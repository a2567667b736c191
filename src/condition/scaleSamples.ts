import { InputError, quoted } from "../errors.js";
import type { ChannelInfo } from "../read/timeHistory.js";
import { channelIndex } from "../read/channelChoice.js";
import { accelFactor, parseSensitivity, parseUnitSpec, UNIT_NAMES, type AccelUnit, type UnitSpec } from "../units.js";

/** x[i] *= factor for the first `count` samples, in place. */
export function scaleSamples(x: Float64Array, count: number, factor: number): void {
  if (factor === 1) return;
  for (let i = 0; i < count; i++) x[i]! *= factor;
}

/** One `--scale CH=K` or `--sensitivity CH=S` (channel undefined: every channel). */
export interface ChannelSetting<T> {
  channel?: string | undefined;
  value: T;
}

export interface ConditioningOptions {
  /** Unit of the samples where the file does not say: any spelling parseUnitSpec knows (default g). */
  inputUnits?: string | undefined;
  resultUnits?: AccelUnit | undefined;
  /** Calibration factor for every channel. */
  scale?: number | undefined;
  /** Calibration factors per channel (name or 1-based position). */
  channelScales?: ChannelSetting<number>[] | undefined;
  /** Sensitivities such as `100mV/g`, per channel or (channel undefined) for all. */
  sensitivities?: ChannelSetting<string>[] | undefined;
}

export interface ChannelConditioning {
  /** Base unit of the samples as read (after calibration and conversion). */
  inputUnit: AccelUnit;
  /** Unit of every result. */
  resultUnit: AccelUnit;
  /** calibration scale x sensitivity x unit conversion. */
  factor: number;
  /** What was read: the file's unit (as written, or the assumed one), and how it was turned into `inputUnit`. */
  reading: ChannelReading;
}

export interface ChannelReading {
  /** The unit of the numbers in the file, as written there, or as assumed. */
  fileUnit: string;
  /** Where that unit came from. */
  unitFrom: "header" | "file calibration" | "--units" | "default" | "sensitivity";
  /** The user's calibration factor for this channel (1 without one). */
  scale: number;
  /** The calibration the file carries (WAV 'pgcl' chunk), 1 without one. */
  fileScale: number;
  /** The sensitivity applied, as given (`100mV/g`), or null. */
  sensitivity: string | null;
  /** Unit conversion into the base unit (e.g. 0.001 for mg to g). */
  unitFactor: number;
  /** Everything multiplied: file number x factor = result. */
  factor: number;
  /**
   * Integer codes (a PCM WAV) with no calibration in the file and no `scale`: full scale is read as 1 of the unit (1 V
   * when a sensitivity is given), a guess every command says aloud.
   */
  fullScaleAssumed: boolean;
}

function checkScale(option: string, k: number): void {
  if (!Number.isFinite(k) || k === 0)
    throw new InputError("OPTION_INVALID", {
      option,
      expected: "a finite, non-zero calibration factor",
      received: String(k),
    });
}

/**
 * The per-channel settings of one option, one value per channel index: each channel at most once
 * (by name or by position), and either one value for all or values per channel, never both.
 */
function perChannel<T>(
  channels: ChannelInfo[],
  file: string,
  option: string,
  list: ChannelSetting<T>[] | undefined,
  all: T | undefined,
): (T | undefined)[] {
  const out: (T | undefined)[] = channels.map(() => all);
  if (list === undefined || list.length === 0) return out;
  const global = list.filter((s) => s.channel === undefined);
  if (global.length > 1 || (global.length === 1 && all !== undefined)) {
    throw new InputError("OPTION_CONFLICT", {
      option,
      expected: `\`${option}\` without a channel at most once`,
      received: `${global.length + (all !== undefined ? 1 : 0)} times`,
    });
  }
  if (global.length === 1 && list.length > 1) {
    throw new InputError("OPTION_CONFLICT", {
      option,
      expected: `either one \`${option}\` for every channel or \`${option}\` CH=… per channel`,
      received: "both",
      hint: "give the value for each channel",
    });
  }
  const seen = new Set<number>();
  for (const s of list) {
    if (s.channel === undefined) {
      out.fill(s.value);
      continue;
    }
    const i = channelIndex(channels, s.channel, { option, file });
    if (seen.has(i)) {
      throw new InputError("OPTION_CONFLICT", {
        option,
        field: channels[i]!.name,
        expected: `one \`${option}\` per channel`,
        received: `a second value for ${quoted(channels[i]!.name)} (${quoted(s.channel)})`,
      });
    }
    seen.add(i);
    out[i] = s.value;
  }
  return out;
}

/**
 * How every channel's file numbers become accelerations. The file's own unit (a header, a WAV
 * calibration chunk) comes first; `--units` fills in where the file says nothing (a file that says one
 * unit and an option that says another is a conflict, not a silent choice); without either, g. A
 * channel with a sensitivity is in volts (as its header says, V or mV, else volts), and the sensitivity
 * turns volts into its unit. A header unit that is neither an acceleration nor a voltage is an error,
 * never read as g. Results are in `resultUnits` when given, else in the channel's base unit.
 */
export function channelConditionings(
  file: string,
  channels: ChannelInfo[],
  select: number[],
  opts: ConditioningOptions,
): ChannelConditioning[] {
  if (opts.scale !== undefined) checkScale("scale", opts.scale);
  for (const s of opts.channelScales ?? []) checkScale("channelScales", s.value);
  const scales = perChannel(channels, file, "channelScales", opts.channelScales, opts.scale);
  const sens = perChannel(channels, file, "sensitivities", opts.sensitivities, undefined);
  let optionUnit: UnitSpec | undefined;
  if (opts.inputUnits !== undefined) {
    optionUnit = parseUnitSpec(opts.inputUnits);
    if (optionUnit === undefined)
      throw new InputError("OPTION_INVALID", {
        option: "inputUnits",
        expected: `an acceleration unit: ${UNIT_NAMES.join(", ")}`,
        received: quoted(opts.inputUnits),
      });
  }
  return select.map((i) => conditionChannel(file, channels[i]!, optionUnit, opts.resultUnits, scales[i], sens[i]));
}

function conditionChannel(
  file: string,
  ch: ChannelInfo,
  optionUnit: UnitSpec | undefined,
  resultUnits: AccelUnit | undefined,
  userScale: number | undefined,
  sensitivityText: string | undefined,
): ChannelConditioning {
  const scale = userScale ?? 1;
  const fileScale = ch.fileScale ?? 1;
  const place = { file, line: ch.unitPlace?.line, column: ch.unitPlace?.column, field: ch.name };
  const known = ch.declaredUnitSpec ?? (ch.declaredUnit !== undefined ? parseUnitSpec(ch.declaredUnit) : undefined);
  let unit: UnitSpec;
  let unitFrom: ChannelReading["unitFrom"];
  let fileUnit: string;
  let volts = 1;
  let sensitivity: string | null = null;
  if (sensitivityText !== undefined) {
    const s = parseSensitivity(sensitivityText);
    if (s === undefined) {
      throw new InputError("OPTION_INVALID", {
        option: "sensitivities",
        field: ch.name,
        expected: "a sensitivity such as 100mV/g or 10.2mV/(m/s2)",
        received: quoted(sensitivityText),
      });
    }
    if (known !== undefined) {
      throw new InputError("UNIT_CONFLICT", {
        ...place,
        expected: "a channel in volts (V or mV, or no unit) for `sensitivities`",
        received: `a channel already in ${quoted(ch.declaredUnitText ?? known.name)}`,
        hint: "drop `sensitivities` for this channel, or fix the header",
      });
    }
    if (ch.declaredUnitText !== undefined && ch.declaredVolts === undefined) unknownUnit(place, ch.declaredUnitText);
    volts = ch.declaredVolts ?? 1;
    unit = { name: s.unit.name, base: s.unit.base, factor: s.unit.factor / s.voltsPerUnit };
    unitFrom = "sensitivity";
    fileUnit = ch.declaredUnitText ?? "V";
    sensitivity = s.text;
  } else if (known !== undefined) {
    if (optionUnit !== undefined && optionUnit.name !== known.name) {
      throw new InputError("UNIT_CONFLICT", {
        ...place,
        expected: `\`inputUnits\` to agree with the ${ch.fileScale !== undefined ? "file's" : "header's"} unit ${known.name}`,
        received: optionUnit.name,
        hint:
          ch.fileScale !== undefined
            ? "drop `inputUnits` (the file's calibration chunk already says)"
            : "drop `inputUnits` (the file already says), or fix the header",
      });
    }
    unit = known;
    unitFrom = ch.fileScale !== undefined ? "file calibration" : "header";
    fileUnit = ch.declaredUnitText ?? known.name;
  } else if (ch.declaredUnitText !== undefined) {
    if (ch.declaredVolts === undefined) unknownUnit(place, ch.declaredUnitText);
    if (userScale === undefined) {
      throw new InputError("UNIT_NEEDS_SENSITIVITY", {
        ...place,
        expected: "an acceleration unit, or a sensitivity for a channel in volts",
        received: quoted(ch.declaredUnitText),
        hint: `give \`sensitivities\` ${ch.name}=100mV/g (your sensor's value), or \`channelScales\` ${ch.name}=K with \`inputUnits\``,
      });
    }
    unit = optionUnit ?? parseUnitSpec("g")!;
    unitFrom = optionUnit !== undefined ? "--units" : "default";
    fileUnit = ch.declaredUnitText;
  } else {
    unit = optionUnit ?? parseUnitSpec("g")!;
    unitFrom = optionUnit !== undefined ? "--units" : "default";
    fileUnit = unit.name;
  }
  const resultUnit = resultUnits ?? unit.base;
  const factor = scale * fileScale * volts * unit.factor * accelFactor(unit.base, resultUnit);
  return {
    inputUnit: unit.base,
    resultUnit,
    factor,
    reading: {
      fileUnit,
      unitFrom,
      scale,
      fileScale,
      sensitivity,
      unitFactor: volts * unit.factor,
      factor,
      // A sensitivity turns volts into acceleration, not codes into volts: without a scale, full scale is still 1 V.
      fullScaleAssumed: ch.integerFullScale === true && ch.fileScale === undefined && userScale === undefined,
    },
  };
}

function unknownUnit(
  place: { file: string; line?: number | undefined; column?: number | undefined; field: string },
  text: string,
): never {
  throw new InputError("UNIT_UNKNOWN", {
    ...place,
    expected: `an acceleration unit (${UNIT_NAMES.join(", ")}, also spelt m/s^2, m/s**2, m s-2, ms^-2) or a voltage (V, mV) with \`sensitivities\``,
    received: quoted(text),
  });
}

/** One channel's conditioning (the library's older entry point): `--units`, `--result-units`, one `--scale`. */
export function channelConditioning(file: string, ch: ChannelInfo, opts: ConditioningOptions): ChannelConditioning {
  return channelConditionings(file, [ch], [0], opts)[0]!;
}
