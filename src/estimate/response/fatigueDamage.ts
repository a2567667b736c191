import { InputError } from "../../errors.js";
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

/** The smallest normal double (IEEE 754): below it a damage keeps fewer digits, down to none at 0. */
export const SMALLEST_NORMAL = 2.2250738585072014e-308;

/**
 * Damage is the response in metres to the power b (K = C = 1): a quiet record at high natural frequencies and a large
 * b take it below the smallest double, to 0 (a relative displacement of 1e-12 m at b = 30 gives about 1e-351). The
 * cause is b with that band, not the life or the exposure: the error names them, rather than a damage of 0 being
 * shown as a result. `gridKey`: the option that ends the grid of natural frequencies.
 */
export function refuseDamageUnderflow(damage: number, fnHz: number, b: number, what: string, gridKey: string): void {
  if (damage >= SMALLEST_NORMAL || !(damage >= 0)) return;
  const at = Number(fnHz.toPrecision(4));
  throw new InputError("OPTION_INVALID", {
    option: "basquinB",
    expected: "a Basquin exponent with which the damage is a number a double holds (above 2.2e-308)",
    received: `b ${b}: ${what} at ${at} Hz is ${damage} (the response there, in metres, to the power b underflows)`,
    hint: `a smaller b, or natural frequencies that stop below ${at} Hz (\`${gridKey}\`)`,
  });
}
