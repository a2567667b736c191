import { InputError } from "../errors.js";
import type { ChannelInfo } from "../read/timeHistory.js";
import { accelFactor, type AccelUnit } from "../units.js";

/** x[i] *= factor for the first `count` samples, in place. */
export function scaleSamples(x: Float64Array, count: number, factor: number): void {
  if (factor === 1) return;
  for (let i = 0; i < count; i++) x[i]! *= factor;
}

export interface ChannelConditioning {
  /** Unit of the samples as read (after the calibration factor). */
  inputUnit: AccelUnit;
  /** Unit of every result. */
  resultUnit: AccelUnit;
  /** calibration scale x unit conversion. */
  factor: number;
}

/**
 * Unit of each channel: what the file declares, else `--units` (default g). A file that declares one
 * unit and an option that says another is a conflict, not a silent choice. Results are in
 * `resultUnit` when given, else in the channel's own unit.
 */
export function channelConditioning(
  file: string, ch: ChannelInfo, opts: { inputUnits?: AccelUnit | undefined; resultUnits?: AccelUnit | undefined; scale?: number | undefined },
): ChannelConditioning {
  const scale = opts.scale ?? 1;
  if (!Number.isFinite(scale) || scale === 0) {
    throw new InputError("OPTION_INVALID", { option: "--scale", expected: "a finite, non-zero calibration factor", received: String(scale) });
  }
  if (ch.declaredUnit !== undefined && opts.inputUnits !== undefined && ch.declaredUnit !== opts.inputUnits) {
    throw new InputError("UNIT_CONFLICT", {
      file, field: ch.name, expected: `--units to agree with the header's unit ${ch.declaredUnit}`, received: opts.inputUnits,
      hint: "drop --units (the header already says), or fix the header",
    });
  }
  const inputUnit = ch.declaredUnit ?? opts.inputUnits ?? "g";
  const resultUnit = opts.resultUnits ?? inputUnit;
  return { inputUnit, resultUnit, factor: scale * accelFactor(inputUnit, resultUnit) };
}
