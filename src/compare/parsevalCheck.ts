import type { WindowName } from "../estimate/windows.js";

/**
 * Parseval cross-check between the RMS from the time history and sqrt(sum P df). They agree only
 * statistically (the window weights samples unequally); the allowed spread comes from a seeded Monte
 * Carlo with numpy (../shared/REFERENCES.md sec. 11): about 2 % for Hann, Hamming or Blackman-Harris
 * with 16 or more averages, 5 % for flat top or shorter records.
 */
export interface ParsevalCheck {
  rmsTime: number;
  rmsPsd: number;
  /** rmsPsd / rmsTime. */
  ratio: number;
  tolerance: number;
  ok: boolean;
}

export function parsevalTolerance(window: WindowName, averages: number): number {
  const smooth = window === "hann" || window === "hamming" || window === "blackman-harris" || window === "rectangular";
  return smooth && averages >= 16 ? 0.02 : 0.05;
}

export function parsevalCheck(rmsTime: number, rmsPsd: number, window: WindowName, averages: number): ParsevalCheck {
  const ratio = rmsPsd / rmsTime;
  const tolerance = parsevalTolerance(window, averages);
  return { rmsTime, rmsPsd, ratio, tolerance, ok: Number.isFinite(ratio) && Math.abs(ratio - 1) <= tolerance };
}
