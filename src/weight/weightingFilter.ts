import { BiquadCascade, bilinearSection, cascadeMagnitude, type DigitalBiquad } from "./bilinearBiquads.js";
import { analogSections, THIRD_OCTAVE_CENTRES_HZ, weightingMagnitude, type WeightingName } from "./isoWeightings.js";

export interface WeightingFilterDesign {
  weighting: WeightingName;
  sampleRateHz: number;
  sections: DigitalBiquad[];
  gain: number;
  /**
   * Largest relative deviation of the digital magnitude from the analog |W(f)| over the nominal
   * one-third-octave centres 0.5-80 Hz, in percent (the realisation's stated error at this rate).
   */
  maxErrorPct: number;
  /** The centre where that deviation occurs. */
  maxErrorAtHz: number;
}

/** Lowest rate the time-domain weighting is designed for: every pre-warp frequency (up to 100 Hz) below Nyquist. */
export const MIN_WEIGHTING_RATE_HZ = 200;

/** Design the time-domain realisation of a weighting at a sample rate (bilinear, pre-warped per section). */
export function designWeightingFilter(name: WeightingName, sampleRateHz: number): WeightingFilterDesign {
  const { sections, gain } = analogSections(name);
  const digital = sections.map((s) => bilinearSection(s, sampleRateHz));
  let maxErrorPct = 0;
  let maxErrorAtHz = THIRD_OCTAVE_CENTRES_HZ[0]!;
  for (const f of THIRD_OCTAVE_CENTRES_HZ) {
    if (f >= sampleRateHz / 2) continue;
    const e = 100 * Math.abs(cascadeMagnitude(digital, gain, f, sampleRateHz) / weightingMagnitude(name, f) - 1);
    if (e > maxErrorPct) {
      maxErrorPct = e;
      maxErrorAtHz = f;
    }
  }
  return { weighting: name, sampleRateHz, sections: digital, gain, maxErrorPct, maxErrorAtHz };
}

/** A running filter for one channel from a design. */
export function weightingCascade(d: WeightingFilterDesign): BiquadCascade {
  return new BiquadCascade(d.sections, d.gain);
}
