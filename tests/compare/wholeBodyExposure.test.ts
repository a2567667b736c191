import { describe, expect, it } from "vitest";
import {
  axisRules,
  basicMethodCheck,
  comfortReactions,
  dailyExposure,
  EIGHT_HOURS_S,
  vibrationTotalValue,
} from "../../src/compare/wholeBodyExposure.js";

const seated = axisRules("seated");

describe("dailyExposure (Directive 2002/44/EC Annex part B; worked values docs/REFERENCES.md sec. 8)", () => {
  it("a_wz = 0.7 m/s^2 for 6 h gives A(8) = 0.606 m/s^2, at or above the action value", () => {
    const e = dailyExposure([{ axis: "z", aw: 0.7, vdv: 1, durationS: 600 }], seated, 6 * 3600);
    expect(e.a8).toBeCloseTo(0.606, 3);
    expect(e.directive.a8).toBe("at or above the action value");
  });
  it("a_wz = 0.8 m/s^2 reaches the action value 0.5 after 3.125 h", () => {
    const e = dailyExposure([{ axis: "z", aw: 0.8, vdv: 1, durationS: 600 }], seated, 3600);
    expect(e.a8ActionAfterS / 3600).toBeCloseTo(3.125, 9);
  });
  it("applies 1.4 on x and y: a_wx = 0.4, a_wz = 0.5 over 8 h gives A(8) = 1.4 x 0.4 = 0.56 on x", () => {
    const e = dailyExposure(
      [
        { axis: "x", aw: 0.4, vdv: 1, durationS: 600 },
        { axis: "y", aw: 0.1, vdv: 1, durationS: 600 },
        { axis: "z", aw: 0.5, vdv: 1, durationS: 600 },
      ],
      seated,
      EIGHT_HOURS_S,
    );
    expect(e.a8).toBeCloseTo(0.56, 12);
    expect(e.a8Axis).toBe("x");
  });
  it("VDV for the exposure scales by the fourth root of time, with the same factors: 3 m/s^1.75 in 240 s on z is 9.929 for 8 h", () => {
    const e = dailyExposure(
      [
        { axis: "z", aw: 0.3, vdv: 3, durationS: 240 },
        { axis: "x", aw: 0.1, vdv: 1.5, durationS: 240 },
      ],
      seated,
      EIGHT_HOURS_S,
    );
    expect(e.vdv).toBeCloseTo(3 * (28800 / 240) ** 0.25, 10);
    expect(e.vdv).toBeCloseTo(9.929, 3);
    expect(e.vdvAxis).toBe("z");
    expect(e.directive.vdv).toBe("at or above the action value"); // 9.1 <= 9.93 <= 21
    expect(e.healthZone.vdv).toBe("in the caution zone"); // 8.5-17 (Annex B, from memory)
  });
  it("bands: the limit value is exceeded only above 1.15 and 21 (Article 3(2) wording: not to be exceeded)", () => {
    const at = dailyExposure([{ axis: "z", aw: 1.15, vdv: 21, durationS: EIGHT_HOURS_S }], seated, EIGHT_HOURS_S);
    expect(at.directive).toEqual({ a8: "at or above the action value", vdv: "at or above the action value" });
    const over = dailyExposure([{ axis: "z", aw: 1.2, vdv: 22, durationS: EIGHT_HOURS_S }], seated, EIGHT_HOURS_S);
    expect(over.directive).toEqual({ a8: "above the limit value", vdv: "above the limit value" });
    const low = dailyExposure([{ axis: "z", aw: 0.3, vdv: 5, durationS: EIGHT_HOURS_S }], seated, EIGHT_HOURS_S);
    expect(low.directive).toEqual({ a8: "below the action value", vdv: "below the action value" });
    expect(low.healthZone.a8).toBe("below the caution zone");
  });
});

describe("the other whole-body figures", () => {
  it("vibrationTotalValue is sqrt(sum (k a_w)^2) (ISO 2631-1 6.5)", () => {
    const axes = [
      { axis: "x" as const, aw: 0.3 },
      { axis: "y" as const, aw: 0.4 },
      { axis: "z" as const, aw: 1.2 },
    ];
    expect(vibrationTotalValue(axes, () => 1)).toBeCloseTo(1.3, 12);
    expect(vibrationTotalValue(axes, (a) => seated[a].healthK)).toBeCloseTo(
      Math.sqrt(0.42 ** 2 + 0.56 ** 2 + 1.44),
      12,
    );
  });
  it("comfortReactions follows the overlapping Annex C ranges (from memory)", () => {
    expect(comfortReactions(0.2)).toEqual(["not uncomfortable"]);
    expect(comfortReactions(0.55)).toEqual(["a little uncomfortable", "fairly uncomfortable"]);
    expect(comfortReactions(3)).toEqual(["extremely uncomfortable"]);
  });
  it("basicMethodCheck flags crest factor > 9, MTVV/a_w > 1.5 and VDV/(a_w T^1/4) > 1.75", () => {
    expect(basicMethodCheck(1, 4, 1.2, 1.3 * 600 ** 0.25, 600).adequate).toBe(true);
    const c = basicMethodCheck(1, 9.5, 1.6, 1.8 * 600 ** 0.25, 600);
    expect(c.adequate).toBe(false);
    expect(c.exceeded.length).toBe(3);
  });
  it("seated weightings: Wd on x and y, Wk on z (ISO 2631-1 Table 1)", () => {
    expect([seated.x.weighting, seated.y.weighting, seated.z.weighting]).toEqual(["Wd", "Wd", "Wk"]);
  });
});
