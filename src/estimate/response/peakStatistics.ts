import type { SpectralMoments } from "./inputSpectrum.js";

export interface RiceRates {
  /** Mean rate of up-crossings of the mean, nu_0+ = sqrt(m2 / m0), per second. */
  upcrossingRateHz: number;
  /** Mean rate of maxima, nu_p = sqrt(m4 / m2), per second. */
  peakRateHz: number;
  /** Irregularity factor alpha = nu_0+ / nu_p = m2 / sqrt(m0 m4): 1 for a narrow band. */
  irregularity: number;
}

/**
 * Rice's rates of a stationary Gaussian process from its one-sided Hz moments (Rice, "Mathematical
 * analysis of random noise", Bell System Tech. J. 23-24, 1944-45; Hz form as ISO 19901-1 uses it,
 * docs/REFERENCES.md sec. 10). Crossings of one direction only, so no factor 1/pi.
 */
export function riceRates(m: SpectralMoments): RiceRates {
  return {
    upcrossingRateHz: Math.sqrt(m.m2 / m.m0),
    peakRateHz: Math.sqrt(m.m4 / m.m2),
    irregularity: m.m2 / Math.sqrt(m.m0 * m.m4),
  };
}

const EULER_GAMMA = 0.5772156649015329;

/**
 * Expected largest peak over sigma of a stationary Gaussian process with nu_0+ T up-crossings of the mean:
 * sqrt(2 ln(nu T)) + 0.5772 / sqrt(2 ln(nu T)) (Davenport 1964, Proc. Instn Civ. Engrs 28; from memory,
 * docs/REFERENCES.md sec. 10, checked against simulation in tests/estimate/response/peakStatistics.test.ts). The
 * asymptotic form needs many crossings; below nu T = 3 it is not defined here (NaN).
 */
export function davenportPeakFactor(upcrossings: number): number {
  if (!(upcrossings >= 3)) return NaN;
  const s = Math.sqrt(2 * Math.log(upcrossings));
  return s + EULER_GAMMA / s;
}
