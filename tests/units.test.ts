import { describe, expect, it } from "vitest";
import { FOOT_M, INCH_M, parseSensitivity, parseUnitSpec, STANDARD_GRAVITY_M_PER_S2 } from "../src/units.js";

describe("units", () => {
  it("exact factors: g_n = 9.80665 m/s^2 (SI Brochure 9th ed., 3rd CGPM 1901), in = 0.0254 m, ft = 0.3048 m (NIST SP 811)", () => {
    expect(STANDARD_GRAVITY_M_PER_S2).toBe(9.80665);
    expect(INCH_M).toBe(0.0254);
    expect(FOOT_M).toBe(0.3048);
  });
  it("parseUnitSpec reads every spelling of metres per second squared as m/s2, factor 1", () => {
    for (const t of [
      "m/s2",
      "m/s^2",
      "m/s**2",
      "m/s²",
      "m s-2",
      "m s^-2",
      "ms-2",
      "ms^-2",
      "m·s-2",
      "m*s^-2",
      "m/s/s",
      "m/sec^2",
      "M/S2",
      " m / s ^ 2 ",
    ]) {
      expect(parseUnitSpec(t), t).toEqual({ name: "m/s2", base: "m/s2", factor: 1 });
    }
  });
  it("parseUnitSpec: mg, µg, mm/s², cm/s², in/s², ft/s² with their exact factors to g or m/s2 (NIST SP 811 for in and ft)", () => {
    expect(parseUnitSpec("mg")).toEqual({ name: "mg", base: "g", factor: 1e-3 });
    for (const t of ["µg", "μg", "ug"]) expect(parseUnitSpec(t), t).toEqual({ name: "ug", base: "g", factor: 1e-6 });
    expect(parseUnitSpec("mm/s^2")).toEqual({ name: "mm/s2", base: "m/s2", factor: 1e-3 });
    expect(parseUnitSpec("mm s-2")).toEqual({ name: "mm/s2", base: "m/s2", factor: 1e-3 });
    expect(parseUnitSpec("cm/s²")).toEqual({ name: "cm/s2", base: "m/s2", factor: 1e-2 });
    expect(parseUnitSpec("in/s^2")).toEqual({ name: "in/s2", base: "m/s2", factor: 0.0254 });
    expect(parseUnitSpec("ft/s**2")).toEqual({ name: "ft/s2", base: "m/s2", factor: 0.3048 });
    expect(parseUnitSpec("G")?.name).toBe("g");
  });
  it("parseUnitSpec refuses what is not an acceleration: mV, s, MG, m/s, km/h, empty", () => {
    for (const t of ["mV", "s", "MG", "m/s", "km/h", "", "g2/Hz", "mg/s2"]) expect(parseUnitSpec(t), t).toBeUndefined();
  });
  it("parseSensitivity: 100mV/g is 0.1 V per g; 10.2 mV/(m/s2) is 0.0102 V per m/s2; garbage is undefined", () => {
    expect(parseSensitivity("100mV/g")).toMatchObject({ voltsPerUnit: 0.1, unit: { base: "g" } });
    expect(parseSensitivity("10.2 mV/(m/s2)")).toMatchObject({ voltsPerUnit: 10.2 / 1000, unit: { base: "m/s2" } });
    expect(parseSensitivity("1.02V/(m/s^2)")).toMatchObject({ voltsPerUnit: 1.02, unit: { base: "m/s2" } });
    for (const t of ["100", "100mV", "mV/g", "0mV/g", "-5mV/g", "100mA/g", "100mV/furlong"])
      expect(parseSensitivity(t), t).toBeUndefined();
  });
});
