import { lnGamma } from "../statistics/distributions.js";

/**
 * Basquin's S-N curve N S^b = C, S the stress amplitude, with the stress taken proportional to the
 * SDOF's relative displacement, S = K z.
 */
export interface SnCurve {
  /** Basquin exponent b. */
  basquinB: number;
  /** The constant C of N S^b = C. */
  snConstant: number;
  /** K: stress per unit of relative displacement. */
  stressPerUnit: number;
}

/** b = 8, C = 1, K = 1: common practice for a relative fatigue-damage spectrum (only ratios at one b mean anything). */
export const SN_DEFAULTS: SnCurve = { basquinB: 8, snConstant: 1, stressPerUnit: 1 };

/**
 * Expected fatigue damage of a narrow-band Gaussian response, its peaks Rayleigh distributed, by
 * Miner's rule: E[D] = (nu_0+ T / C) (sqrt(2) K sigma)^b Gamma(1 + b/2) (Miles 1954; the form used by
 * Henderson & Piersol and by Lalanne, Mechanical Vibration and Shock Analysis vol. 5; from memory,
 * docs/REFERENCES.md sec. 14; checked against rainflow counting in tests/estimate/response/fatigueDamage.test.ts).
 */
export function narrowBandDamage(sigma: number, upcrossingRateHz: number, durationS: number, sn: SnCurve): number {
  const b = sn.basquinB;
  return (
    ((upcrossingRateHz * durationS) / sn.snConstant) *
    Math.exp(b * Math.log(Math.SQRT2 * sn.stressPerUnit * sigma) + lnGamma(1 + b / 2))
  );
}
