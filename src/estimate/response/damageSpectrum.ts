import { narrowBandDamage, type SnCurve } from "./fatigueDamage.js";
import type { InputSpectrum } from "./inputSpectrum.js";
import { davenportPeakFactor, riceRates } from "./peakStatistics.js";
import { sdofResponse } from "./sdofResponse.js";

/**
 * The fatigue-damage spectrum and the extreme-response spectrum of one input spectrum over an exposure,
 * on a grid of natural frequencies, computed as `respond` computes them (estimate/response/sdofResponse.ts for the
 * exact response moments, Rice's rates, Davenport's largest peak, the narrow-band Miner damage of
 * estimate/response/fatigueDamage.ts with the stress proportional to the relative displacement in metres).
 */
export interface DamageSpectra {
  /**
   * Expected damage over `durationS` per natural frequency (the units of `respond`'s fatigueDamage: relative, K and C
   * as given).
   */
  damage: Float64Array;
  /** Expected largest peak of the absolute-acceleration response over `durationS`, in the input's unit. */
  extreme: Float64Array;
}

export interface DamageSpectraOptions {
  fnHz: Float64Array;
  q: number;
  durationS: number;
  sn: SnCurve;
  /** Factor from the input's acceleration unit to m/s^2 (the displacement that carries the stress is in metres). */
  toSi: number;
}

export function damageSpectra(input: InputSpectrum, o: DamageSpectraOptions): DamageSpectra {
  const n = o.fnHz.length;
  const damage = new Float64Array(n);
  const extreme = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const r = sdofResponse(input, o.fnHz[i]!, o.q);
    const zRms = Math.sqrt(r.relativeDisplacement.m0) * o.toSi;
    damage[i] = narrowBandDamage(zRms, riceRates(r.relativeDisplacement).upcrossingRateHz, o.durationS, o.sn);
    extreme[i] =
      davenportPeakFactor(riceRates(r.acceleration).upcrossingRateHz * o.durationS) * Math.sqrt(r.acceleration.m0);
  }
  return { damage, extreme };
}
