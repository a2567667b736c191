import { departureShare } from "../estimate/spectral/spectralKernel.js";
import {
  DEFAULT_POWER,
  dofForPower,
  powerAt,
  type PowerAt,
  type PowerInputs,
  type PowerRequirement,
} from "./decisionRule.js";
import type { JudgedSpectrum } from "./judgedGrid.js";
import type { TestProfile } from "./testProfile.js";

/**
 * The power requirement that applies to a profile: its own (parts it leaves out from the default), none, or the
 * default.
 */
export function powerRequirement(profile: TestProfile): (PowerRequirement & { source: "default" | "profile" }) | null {
  const p = profile.power;
  if (p === "none") return null;
  if (p === undefined) return { ...DEFAULT_POWER, source: "default" };
  return {
    departureDb: p.departureDb ?? DEFAULT_POWER.departureDb,
    departureShare: p.departurePercent !== undefined ? p.departurePercent / 100 : DEFAULT_POWER.departureShare,
    widthLines: p.widthLines ?? DEFAULT_POWER.widthLines,
    rmsBeyondDb: p.rmsBeyondDb ?? DEFAULT_POWER.rmsBeyondDb,
    probability: p.probabilityPercent !== undefined ? p.probabilityPercent / 100 : DEFAULT_POWER.probability,
    source: "profile",
  };
}

export interface PassPower {
  requirement: (PowerRequirement & { source: "default" | "profile" }) | null;
  /** Power at the achieved DOF against the requirement that applies (the default's when the profile asks none). */
  power: PowerAt;
  /** The DOF a pass needs for that requirement (0 when the profile asks none). */
  forPower: number;
  /** Power and the DOF needed against psdgate's default requirement, whatever the profile asks. */
  powerDefault: PowerAt;
  forDefault: number;
}

/** What the judgement needs of its tests for the power: how they split the lines' level and the RMS's DOF. */
export interface PowerSetting {
  lines: number;
  allowanceLines: number;
  outer: boolean;
  toneShare: number;
  singleShare: number;
  rmsDofRatio: number;
}

/** Power and the DOF a pass needs: against the requirement that applies, and against the default always. */
export function passPower(js: JudgedSpectrum, profile: TestProfile, s: PowerSetting): PassPower {
  const { kernel, nu } = js;
  const bandsUp = Math.max(...profile.bands.map((b) => b.upperDb));
  const bandsLo = Math.max(...profile.bands.map((b) => b.lowerDb));
  const powerInputs: PowerInputs = {
    lines: Math.max(1, s.lines),
    allowance: s.allowanceLines,
    inflation: js.inflation,
    rmsDofRatio: s.rmsDofRatio,
    outerLimits: s.outer,
    upperSharedBy: js.k,
    family: js.family,
    toneShare: s.toneShare,
    seenShare: (w) => departureShare(kernel, w),
    widestUpperDb: bandsUp,
    widestLowerDb: bandsLo,
    singleLineShare: s.singleShare,
  };
  const requirement = powerRequirement(profile);
  const forDefault = dofForPower(powerInputs, DEFAULT_POWER);
  const powerDefault = powerAt(Math.max(nu, 1e-9), powerInputs, DEFAULT_POWER);
  const forPower =
    requirement === null ? 0 : requirement.source === "default" ? forDefault : dofForPower(powerInputs, requirement);
  const power =
    requirement === null
      ? powerDefault
      : requirement.source === "default"
        ? powerDefault
        : powerAt(Math.max(nu, 1e-9), powerInputs, requirement);
  return { requirement, power, forPower, powerDefault, forDefault };
}
