import { spectralMoments, type InputSpectrum, type SpectralMoments } from "./inputSpectrum.js";

/**
 * Single-degree-of-freedom system driven at its base, damping ratio zeta = 1 / (2 Q), r = f / f_n
 * (the standard SDOF base-excitation result; form as docs/REFERENCES.md sec. 4 gives it):
 *   absolute acceleration   |T(r)|^2 = (1 + (2 zeta r)^2) / ((1 - r^2)^2 + (2 zeta r)^2)
 *   relative displacement   |Z / A_base|^2 = 1 / ((2 pi f_n)^4 ((1 - r^2)^2 + (2 zeta r)^2))   [s^4]
 * The response mean square is integral |H|^2 G df, taken over the input spectrum without Miles'
 * white-noise approximation (estimate/response/inputSpectrum.ts, Gauss-Legendre refined around f_n).
 */
export function absoluteTransmissibilitySquared(fHz: number, fnHz: number, q: number): number {
  const r = fHz / fnHz;
  const c = (r / q) ** 2; // (2 zeta r)^2
  return (1 + c) / ((1 - r * r) ** 2 + c);
}

export function relativeDisplacementSquared(fHz: number, fnHz: number, q: number): number {
  const r = fHz / fnHz;
  const w2 = (2 * Math.PI * fnHz) ** 2;
  return 1 / (w2 * w2 * ((1 - r * r) ** 2 + (r / q) ** 2));
}

export interface SdofResponse {
  fnHz: number;
  q: number;
  /** Moments of the absolute-acceleration response, (input unit)^2 times Hz^n. */
  acceleration: SpectralMoments;
  /** Moments of the relative displacement, (input unit x s^2)^2 times Hz^n. */
  relativeDisplacement: SpectralMoments;
}

export function sdofResponse(input: InputSpectrum, fnHz: number, q: number): SdofResponse {
  if (!(fnHz > 0) || !(q > 0.5))
    throw new RangeError(`f_n above 0 and Q above 0.5 (underdamped), got ${fnHz} and ${q}`);
  // The resonance's half-power width is f_n / Q; the integrator keeps its steps well inside it.
  const width = fnHz / (2 * q);
  return {
    fnHz,
    q,
    acceleration: spectralMoments(input, (f) => absoluteTransmissibilitySquared(f, fnHz, q), fnHz, width),
    relativeDisplacement: spectralMoments(input, (f) => relativeDisplacementSquared(f, fnHz, q), fnHz, width),
  };
}

/**
 * Miles' equation: response RMS = sqrt((pi / 2) f_n Q G(f_n)) (Miles 1954, J. Aeronautical Sciences
 * 21(11); assumptions as the NASA GSFC FEMCI "Miles' Equation" page states them: white input, light
 * damping). For a white input over 0..infinity the exact answer is (pi / 2) f_n G0 (Q + 1/Q): Miles
 * drops the 1/Q term (docs/REFERENCES.md sec. 4).
 */
export function milesRms(fnHz: number, q: number, levelAtFn: number): number {
  return Math.sqrt((Math.PI / 2) * fnHz * q * levelAtFn);
}

/** Relative displacement by Miles: sqrt(Q G(f_n) / (32 pi^3 f_n^3)) in input unit x s^2 (NASA GSFC FEMCI). */
export function milesRelativeDisplacementRms(fnHz: number, q: number, levelAtFn: number): number {
  return Math.sqrt((q * levelAtFn) / (32 * Math.PI ** 3 * fnHz ** 3));
}
