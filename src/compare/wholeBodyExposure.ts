import type { WeightingName } from "../weight/isoWeightings.js";

/**
 * Whole-body vibration figures judged against published values: axis factors, vibration total value,
 * daily exposure A(8) and VDV against Directive 2002/44/EC, the ISO 2631-1 Annex B health guidance
 * caution zone and the Annex C comfort reactions. Forms and values: docs/REFERENCES.md sec. 8,
 * with each value's status (confirmed / from memory) named beside it below.
 */
export const POSTURES = ["seated", "standing", "recumbent"] as const;
export type Posture = (typeof POSTURES)[number];
export const AXES = ["x", "y", "z"] as const;
export type Axis = (typeof AXES)[number];

export interface AxisRule {
  weighting: WeightingName;
  /** Multiplying factor k for health (and the Directive's daily exposure). */
  healthK: number;
  /** Multiplying factor k for comfort. */
  comfortK: number;
}

/**
 * Weighting and factors per axis (z vertical). Health, seated or standing: 1.4 a_wx, 1.4 a_wy, a_wz
 * (Directive 2002/44/EC Annex part B, confirmed; ISO 2631-1 clause 7 uses the same for seated, Griffin
 * 1998 confirms the 1.4 is for health only). Comfort: k = 1 on x, y, z at the seat surface, the floor
 * of a standing person, and under the pelvis of a recumbent one (ISO 2631-1 clause 8, from memory).
 * Recumbent health: neither the Directive nor ISO 2631-1 Annex B states factors; the seated set is used
 * and the result says so.
 */
export function axisRules(posture: Posture): Record<Axis, AxisRule> {
  void posture;
  return {
    x: { weighting: "Wd", healthK: 1.4, comfortK: 1 },
    y: { weighting: "Wd", healthK: 1.4, comfortK: 1 },
    z: { weighting: "Wk", healthK: 1, comfortK: 1 },
  };
}

/** Directive 2002/44/EC Article 3(2), whole-body (docs/REFERENCES.md sec. 8, confirmed at legislation.gov.uk). */
export const DIRECTIVE_2002_44_EC = {
  a8ActionMs2: 0.5,
  a8LimitMs2: 1.15,
  vdvActionMs175: 9.1,
  vdvLimitMs175: 21,
} as const;

/**
 * ISO 2631-1:1997 Annex B health guidance caution zone at 8 h (docs/REFERENCES.md sec. 8, from memory, medium-low
 * confidence): 0.43-0.86 m/s^2 by the square-root time rule (Eq. B.1), VDV 8.5-17 m/s^1.75 by the
 * fourth-power rule (Eq. B.2).
 */
export const ISO_2631_HEALTH_ZONE = {
  a8LowerMs2: 0.43,
  a8UpperMs2: 0.86,
  vdvLowerMs175: 8.5,
  vdvUpperMs175: 17,
} as const;

/**
 * The caution zone's bounds at 8 h: ISO_2631_HEALTH_ZONE by default, or the lab's confirmed values (ride
 * --health-zone).
 */
export interface HealthZone {
  a8LowerMs2: number;
  a8UpperMs2: number;
  vdvLowerMs175: number;
  vdvUpperMs175: number;
}

export const EIGHT_HOURS_S = 8 * 3600;

export interface AxisFigures {
  axis: Axis;
  aw: number;
  vdv: number;
  /** Length of the measurement, s. */
  durationS: number;
}

export interface DailyExposure {
  /** Stated daily exposure, s. */
  durationS: number;
  /** A(8) = max(k a_w) sqrt(T / 8 h), m/s^2 (Directive 2002/44/EC Annex part B). */
  a8: number;
  a8Axis: Axis;
  /** max(k VDV_measured) (T / T_measured)^(1/4), m/s^1.75 (fourth-power time dependence, ISO 2631-1 6.3.2). */
  vdv: number;
  vdvAxis: Axis;
  /** Exposure time at which A(8) reaches the action and the limit value, s. */
  a8ActionAfterS: number;
  a8LimitAfterS: number;
  directive: { a8: DirectiveBand; vdv: DirectiveBand };
  healthZone: { a8: ZoneBand; vdv: ZoneBand };
}

export type DirectiveBand = "below the action value" | "at or above the action value" | "above the limit value";
export type ZoneBand = "below the caution zone" | "in the caution zone" | "above the caution zone";

function directiveBand(v: number, action: number, limit: number): DirectiveBand {
  return v > limit ? "above the limit value" : v >= action ? "at or above the action value" : "below the action value";
}

function zoneBand(v: number, lower: number, upper: number): ZoneBand {
  return v > upper ? "above the caution zone" : v >= lower ? "in the caution zone" : "below the caution zone";
}

/** Daily exposure from one recording taken as representative of `durationS` of exposure a day. */
export function dailyExposure(
  axes: readonly AxisFigures[],
  rules: Record<Axis, AxisRule>,
  durationS: number,
  zone: HealthZone = ISO_2631_HEALTH_ZONE,
): DailyExposure {
  let a8 = -Infinity;
  let a8Axis: Axis = "z";
  let vdv = -Infinity;
  let vdvAxis: Axis = "z";
  let worstKaw = 0;
  for (const a of axes) {
    const k = rules[a.axis].healthK;
    const kaw = k * a.aw;
    const x = kaw * Math.sqrt(durationS / EIGHT_HOURS_S);
    if (x > a8) {
      a8 = x;
      a8Axis = a.axis;
      worstKaw = kaw;
    }
    const v = k * a.vdv * Math.pow(durationS / a.durationS, 0.25);
    if (v > vdv) {
      vdv = v;
      vdvAxis = a.axis;
    }
  }
  const d = DIRECTIVE_2002_44_EC;
  const z = zone;
  // A(8) = k a_w sqrt(T / T0) reaches a value V after T = T0 (V / k a_w)^2.
  const after = (v: number) => (worstKaw > 0 ? EIGHT_HOURS_S * (v / worstKaw) ** 2 : Infinity);
  return {
    durationS,
    a8,
    a8Axis,
    vdv,
    vdvAxis,
    a8ActionAfterS: after(d.a8ActionMs2),
    a8LimitAfterS: after(d.a8LimitMs2),
    directive: {
      a8: directiveBand(a8, d.a8ActionMs2, d.a8LimitMs2),
      vdv: directiveBand(vdv, d.vdvActionMs175, d.vdvLimitMs175),
    },
    healthZone: { a8: zoneBand(a8, z.a8LowerMs2, z.a8UpperMs2), vdv: zoneBand(vdv, z.vdvLowerMs175, z.vdvUpperMs175) },
  };
}

/** Vibration total value a_v = sqrt(sum (k a_w)^2) over the axes (ISO 2631-1 6.5, vector-sum form from memory). */
export function vibrationTotalValue(axes: readonly { axis: Axis; aw: number }[], k: (axis: Axis) => number): number {
  let s = 0;
  for (const a of axes) s += (k(a.axis) * a.aw) ** 2;
  return Math.sqrt(s);
}

/**
 * Likely reactions to an overall vibration total value in public transport, ISO 2631-1 Annex C
 * (ranges from memory; they overlap on purpose, so a value can carry two words).
 */
export const COMFORT_REACTIONS: readonly { fromMs2: number; toMs2: number; words: string }[] = [
  { fromMs2: 0, toMs2: 0.315, words: "not uncomfortable" },
  { fromMs2: 0.315, toMs2: 0.63, words: "a little uncomfortable" },
  { fromMs2: 0.5, toMs2: 1, words: "fairly uncomfortable" },
  { fromMs2: 0.8, toMs2: 1.6, words: "uncomfortable" },
  { fromMs2: 1.25, toMs2: 2.5, words: "very uncomfortable" },
  { fromMs2: 2, toMs2: Infinity, words: "extremely uncomfortable" },
];

export function comfortReactions(aV: number): string[] {
  return COMFORT_REACTIONS.filter((r) => aV >= r.fromMs2 && aV < r.toMs2).map((r) => r.words);
}

/**
 * When the basic (r.m.s.) method may underestimate (ISO 2631-1 6.2-6.3): crest factor above 9, or
 * MTVV / a_w above 1.5, or VDV / (a_w T^(1/4)) above 1.75 (docs/REFERENCES.md sec. 8; 9 confirmed in use by
 * Griffin 1998, the two ratios from memory).
 */
export const BASIC_METHOD_LIMITS = { crestFactor: 9, mtvvRatio: 1.5, vdvRatio: 1.75 } as const;

export interface BasicMethodCheck {
  crestFactor: number;
  mtvvRatio: number;
  vdvRatio: number;
  /** The limits passed: the r.m.s. figures are enough on their own. */
  adequate: boolean;
  /** The limits exceeded, by name (report/findingTexts.ts says them). */
  exceeded: (keyof typeof BASIC_METHOD_LIMITS)[];
}

export function basicMethodCheck(
  aw: number,
  crestFactor: number,
  mtvv: number,
  vdv: number,
  durationS: number,
): BasicMethodCheck {
  const mtvvRatio = mtvv / aw;
  const vdvRatio = vdv / (aw * Math.pow(durationS, 0.25));
  const L = BASIC_METHOD_LIMITS;
  const exceeded: BasicMethodCheck["exceeded"] = [];
  if (crestFactor > L.crestFactor) exceeded.push("crestFactor");
  if (mtvvRatio > L.mtvvRatio) exceeded.push("mtvvRatio");
  if (vdvRatio > L.vdvRatio) exceeded.push("vdvRatio");
  return { crestFactor, mtvvRatio, vdvRatio, adequate: exceeded.length === 0, exceeded };
}

/**
 * Seat effective amplitude transmissibility: weighted r.m.s. on the seat over that on the floor beneath it (common
 * practice).
 */
export function seatTransmissibility(awSeat: number, awFloor: number): number {
  return awSeat / awFloor;
}
