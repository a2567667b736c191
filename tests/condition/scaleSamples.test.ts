import { describe, expect, it } from "vitest";
import { channelConditionings } from "../../src/condition/scaleSamples.js";
import { InputError } from "../../src/errors.js";
import type { ChannelInfo } from "../../src/read/timeHistory.js";
import { parseUnitSpec, parseVoltUnit } from "../../src/units.js";

function header(name: string, unit?: string): ChannelInfo {
  if (unit === undefined) return { name };
  const spec = parseUnitSpec(unit);
  return {
    name,
    declaredUnit: spec?.base,
    declaredUnitSpec: spec,
    declaredVolts: spec ? undefined : parseVoltUnit(unit),
    declaredUnitText: unit,
    unitPlace: { line: 1, column: 2 },
  };
}
function err(f: () => unknown): InputError {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return e as InputError;
  }
  throw new Error("no error");
}

describe("channelConditionings", () => {
  const chs = [header("ax", "mg"), header("ay", "in/s^2"), header("az"), header("v1", "mV"), header("tc", "degC")];
  it("converts header units into the base unit with exact factors, and records what was read", () => {
    const [mg, ips, none] = channelConditionings("f.csv", chs, [0, 1, 2], {});
    expect(mg).toMatchObject({
      inputUnit: "g",
      resultUnit: "g",
      factor: 1e-3,
      reading: { fileUnit: "mg", unitFrom: "header", scale: 1, sensitivity: null },
    });
    expect(ips).toMatchObject({ inputUnit: "m/s2", resultUnit: "m/s2", factor: 0.0254 });
    expect(none).toMatchObject({ inputUnit: "g", factor: 1, reading: { fileUnit: "g", unitFrom: "default" } });
  });
  it("--result-units converts through g_n = 9.80665 m/s^2 (SI Brochure 9th ed.)", () => {
    const [mg] = channelConditionings("f.csv", chs, [0], { resultUnits: "m/s2" });
    expect(mg!.factor).toBe(1e-3 * 9.80665);
  });
  it("a sensitivity turns a channel in mV into g: 100 mV/g reads 250 mV as 2.5 g", () => {
    const [v] = channelConditionings("f.csv", chs, [3], { sensitivities: [{ channel: "v1", value: "100mV/g" }] });
    expect(250 * v!.factor).toBeCloseTo(2.5, 14);
    expect(v!.reading).toMatchObject({ fileUnit: "mV", unitFrom: "sensitivity", sensitivity: "100mV/g" });
    const [w] = channelConditionings("f.csv", chs, [2], { sensitivities: [{ channel: "3", value: "10mV/(m/s2)" }] });
    expect(w).toMatchObject({ inputUnit: "m/s2" });
    expect(0.5 * w!.factor).toBeCloseTo(50, 12);
  });
  it("per-channel --scale applies to its channel only", () => {
    const r = channelConditionings("f.csv", chs, [0, 2], { channelScales: [{ channel: "az", value: 2 }] });
    expect(r.map((c) => c.factor)).toEqual([1e-3, 2]);
  });
  it("an unknown header unit is UNIT_UNKNOWN naming file, line, column and the text, never g", () => {
    const e = err(() => channelConditionings("f.csv", chs, [4], {}));
    expect(e.code).toBe("UNIT_UNKNOWN");
    expect(e.message).toContain("f.csv:1:2 (tc)");
    expect(e.message).toContain('received "degC"');
  });
  it("a channel in mV without a sensitivity is UNIT_NEEDS_SENSITIVITY; an unselected one is no problem", () => {
    expect(err(() => channelConditionings("f.csv", chs, [3], {})).code).toBe("UNIT_NEEDS_SENSITIVITY");
    expect(() => channelConditionings("f.csv", chs, [0], {})).not.toThrow();
  });
  it("repeated options for one channel are OPTION_CONFLICT (by name, by position, twice without a channel, both forms)", () => {
    expect(
      err(() =>
        channelConditionings("f.csv", chs, [0], {
          channelScales: [
            { channel: "ax", value: 2 },
            { channel: "AX", value: 3 },
          ],
        }),
      ).code,
    ).toBe("OPTION_CONFLICT");
    expect(
      err(() =>
        channelConditionings("f.csv", chs, [0], {
          channelScales: [
            { channel: "ax", value: 2 },
            { channel: "1", value: 3 },
          ],
        }),
      ).code,
    ).toBe("OPTION_CONFLICT");
    expect(
      err(() => channelConditionings("f.csv", chs, [0], { channelScales: [{ value: 2 }, { value: 3 }] })).code,
    ).toBe("OPTION_CONFLICT");
    expect(
      err(() => channelConditionings("f.csv", chs, [0], { channelScales: [{ value: 2 }, { channel: "ax", value: 3 }] }))
        .code,
    ).toBe("OPTION_CONFLICT");
    expect(
      err(() =>
        channelConditionings("f.csv", chs, [0], {
          sensitivities: [
            { channel: "v1", value: "1V/g" },
            { channel: "v1", value: "2V/g" },
          ],
        }),
      ).code,
    ).toBe("OPTION_CONFLICT");
  });
  it("a header unit and --units that disagree are UNIT_CONFLICT; --units mg applies where the file says nothing", () => {
    expect(err(() => channelConditionings("f.csv", chs, [0], { inputUnits: "g" })).code).toBe("UNIT_CONFLICT");
    expect(channelConditionings("f.csv", chs, [2], { inputUnits: "mg" })[0]).toMatchObject({
      factor: 1e-3,
      reading: { unitFrom: "--units" },
    });
  });
  it("a sensitivity on a channel the header says is already an acceleration is UNIT_CONFLICT; an unknown channel is CHANNEL_NOT_FOUND", () => {
    expect(
      err(() => channelConditionings("f.csv", chs, [0], { sensitivities: [{ channel: "ax", value: "100mV/g" }] })).code,
    ).toBe("UNIT_CONFLICT");
    expect(
      err(() => channelConditionings("f.csv", chs, [0], { channelScales: [{ channel: "nope", value: 2 }] })).code,
    ).toBe("CHANNEL_NOT_FOUND");
  });
});
