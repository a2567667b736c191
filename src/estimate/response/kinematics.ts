import { spectralMoments, type InputSpectrum } from "./inputSpectrum.js";

/**
 * Velocity and displacement of a stationary random acceleration: G_v(f) = G_a(f) / (2 pi f)^2 and
 * G_d(f) = G_a(f) / (2 pi f)^4, one division by omega^2 per integration (Bendat & Piersol 2010; from
 * memory, docs/REFERENCES.md sec. 6). `toSi` converts the acceleration unit to m/s^2 (9.80665 for
 * g), so G_v is in (m/s)^2/Hz and G_d in m^2/Hz. Lines at 0 Hz have no finite velocity and are left as NaN.
 */
export function velocityPsd(frequencyHz: Float64Array, accelPsd: Float64Array, toSi: number): Float64Array {
  const out = new Float64Array(accelPsd.length);
  for (let k = 0; k < out.length; k++)
    out[k] = frequencyHz[k]! > 0 ? (accelPsd[k]! * toSi * toSi) / (2 * Math.PI * frequencyHz[k]!) ** 2 : NaN;
  return out;
}

export function displacementPsd(frequencyHz: Float64Array, accelPsd: Float64Array, toSi: number): Float64Array {
  const out = new Float64Array(accelPsd.length);
  for (let k = 0; k < out.length; k++)
    out[k] = frequencyHz[k]! > 0 ? (accelPsd[k]! * toSi * toSi) / (2 * Math.PI * frequencyHz[k]!) ** 4 : NaN;
  return out;
}

export interface Motion {
  /** RMS acceleration over the range, input unit. */
  accelerationRms: number;
  /** RMS velocity, m/s. */
  velocityRms: number;
  /** RMS displacement, m. */
  displacementRms: number;
  /** Peak-to-peak displacement estimate 6 x RMS (a +-3 sigma excursion; common practice), m. */
  displacementPeakToPeak: number;
  /** Lowest frequency integrated: the displacement is dominated by it. */
  fromHz: number;
  toHz: number;
}

/** RMS acceleration, velocity and displacement of a spectrum whose range starts above 0 Hz. */
export function spectrumMotion(s: InputSpectrum, toSi: number): Motion {
  if (!(s.fminHz > 0)) throw new RangeError(`velocity and displacement need a range above 0 Hz, got ${s.fminHz}`);
  // Weights 1/f^4 then m2 and m4 of that weight give displacement, velocity and acceleration in one pass.
  const m = spectralMoments(s, (f) => 1 / f ** 4, 0, s.fminHz * 1e-3);
  const velocityRms = Math.sqrt((m.m2 * toSi * toSi) / (4 * Math.PI ** 2));
  const displacementRms = Math.sqrt((m.m0 * toSi * toSi) / (16 * Math.PI ** 4));
  return {
    accelerationRms: Math.sqrt(m.m4),
    velocityRms,
    displacementRms,
    displacementPeakToPeak: 6 * displacementRms,
    fromHz: s.fminHz,
    toHz: s.fmaxHz,
  };
}
