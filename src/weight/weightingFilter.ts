import { BiquadCascade, bilinearSection, cascadeMagnitude, type DigitalBiquad } from "./bilinearBiquads.js";
import { fittedSection } from "./fittedBiquads.js";
import { analogSections, THIRD_OCTAVE_CENTRES_HZ, weightingMagnitude, type WeightingName } from "./isoWeightings.js";

export interface WeightingFilterDesign {
  weighting: WeightingName;
  sampleRateHz: number;
  sections: DigitalBiquad[];
  gain: number;
  /**
   * How the sections were made: bilinear with pre-warping, or poles by impulse invariance and magnitude-fitted zeros
   * (the high-pass stays bilinear).
   */
  method: "bilinear" | "fitted";
  /**
   * Largest relative deviation of the digital magnitude from the analog |W(f)| over the nominal
   * one-third-octave centres 0.5-80 Hz that the rate covers (see `coveredCentresHz`), in percent (the
   * realisation's stated error at this rate).
   */
  maxErrorPct: number;
  /** The centre where that deviation occurs. */
  maxErrorAtHz: number;
  /** Highest one-third-octave centre whose band lies wholly below Nyquist (80 Hz from about 180 Hz up). */
  topCentreHz: number;
}

/**
 * Lowest rate ride accepts. The weighting's realisation is within about 2.3 % of the analog |W| at every
 * rate from 100 Hz up (the table in README and tests/weight/bilinearBiquads.test.ts); what sets the floor is
 * the band: at 100 Hz the record covers the one-third-octave bands to 40 Hz of the standard's 0.5-80 Hz.
 */
export const MIN_WEIGHTING_RATE_HZ = 100;

/** One-third-octave band edge factor, 2^(1/6) (IEC 61260, base-two form, common practice). */
const HALF_BAND = 2 ** (1 / 6);

/** The nominal centres 0.5-80 Hz whose band's upper edge lies below Nyquist at this rate. */
export function coveredCentresHz(sampleRateHz: number): number[] {
  return THIRD_OCTAVE_CENTRES_HZ.filter((c) => c * HALF_BAND < sampleRateHz / 2);
}

function errorOver(
  name: WeightingName,
  sections: readonly DigitalBiquad[],
  gain: number,
  sampleRateHz: number,
  centres: readonly number[],
) {
  let maxErrorPct = 0;
  let maxErrorAtHz = centres[0] ?? THIRD_OCTAVE_CENTRES_HZ[0]!;
  for (const f of centres) {
    const e = 100 * Math.abs(cascadeMagnitude(sections, gain, f, sampleRateHz) / weightingMagnitude(name, f) - 1);
    if (!(e <= maxErrorPct)) {
      maxErrorPct = e;
      maxErrorAtHz = f;
    }
  }
  return { maxErrorPct, maxErrorAtHz };
}

/**
 * Design the time-domain realisation of a weighting at a sample rate. Two realisations are made and the
 * one closer to the analog |W| over the covered centres is kept: the bilinear transform pre-warped per
 * section (bilinearBiquads.ts; possible only while every pole lies below Nyquist, and coarse near it:
 * 11 % at 80 Hz for 400 Hz sampling), and impulse-invariant poles with zeros fitted to the magnitude over
 * the covered band (fittedBiquads.ts; the 0.4 Hz high-pass stays bilinear, where it is exact to 1e-5).
 */
export function designWeightingFilter(name: WeightingName, sampleRateHz: number): WeightingFilterDesign {
  if (!(sampleRateHz > 0 && Number.isFinite(sampleRateHz))) throw new RangeError(`sample rate ${sampleRateHz} Hz`);
  const { sections, gain } = analogSections(name);
  const centres = coveredCentresHz(sampleRateHz);
  if (centres.length === 0)
    throw new RangeError(`sample rate ${sampleRateHz} Hz covers no one-third-octave band of the weighting`);
  const topCentreHz = centres[centres.length - 1]!;
  const candidates: { method: "bilinear" | "fitted"; sections: DigitalBiquad[] }[] = [];
  if (sections.every((s) => s.poleHz < sampleRateHz / 2))
    candidates.push({ method: "bilinear", sections: sections.map((s) => bilinearSection(s, sampleRateHz)) });
  const fitted: DigitalBiquad[] = [];
  for (const s of sections) {
    const q = s.role === "high-pass" ? undefined : fittedSection(s, sampleRateHz, topCentreHz * HALF_BAND);
    if (q !== undefined) fitted.push(q);
    else if (s.poleHz < sampleRateHz / 2) fitted.push(bilinearSection(s, sampleRateHz));
    else break;
  }
  if (fitted.length === sections.length) candidates.push({ method: "fitted", sections: fitted });
  if (candidates.length === 0) throw new RangeError(`no realisation of ${name} at ${sampleRateHz} Hz`);
  let best: WeightingFilterDesign | undefined;
  for (const c of candidates) {
    const e = errorOver(name, c.sections, gain, sampleRateHz, centres);
    if (best === undefined || e.maxErrorPct < best.maxErrorPct)
      best = { weighting: name, sampleRateHz, sections: c.sections, gain, method: c.method, ...e, topCentreHz };
  }
  return best!;
}

/**
 * Seconds of the record's start the filter settles on before its first sample (BiquadCascade): what the
 * steady start leaves decays as exp(-zeta w1 t) in the 0.4 Hz high-pass (zeta = 1/sqrt 2), 1.4e-4 after 5 s.
 */
export const SETTLE_S = 5;

/**
 * Span of the start's autoregressive model (startPrediction.ts), s: 0.2 s of samples, at least 8 and at most 256
 * (0.2 s up to 1280 Hz). Measured against the filter run over a long real history (seeded ride-like records: band noise,
 * a 1.3 Hz bounce or a 27 Hz tone, a tilt; 100-1000 Hz): a span of 16 samples could not continue a 1 Hz sine at
 * 2000-5120 Hz under 1 % noise (MTVV +5 to +15 %); 0.2 s could (under 1 %), and 256 samples did as well as 1024 at 5120 Hz.
 */
export const PREDICTION_SPAN_S = 0.2;

/** Order of the start's model at a rate: PREDICTION_SPAN_S of samples, 8 to 256. */
export function predictionOrder(sampleRateHz: number): number {
  return Math.min(256, Math.max(8, Math.round(PREDICTION_SPAN_S * sampleRateHz)));
}

/**
 * A running filter for one channel from a design, settling on a past predicted from the first SETTLE_S seconds
 * (BiquadCascade).
 */
export function weightingCascade(d: WeightingFilterDesign): BiquadCascade {
  return new BiquadCascade(d.sections, d.gain, Math.round(SETTLE_S * d.sampleRateHz), predictionOrder(d.sampleRateHz));
}

/**
 * The realisation's error on a record's own spectrum: sqrt(sum |H_d(f)|^2 P(f) / sum |W(f)|^2 P(f)) over the lines of a
 * one-sided PSD (DC left out), H_d the digital cascade and W the analog weighting. This is the factor the time-domain
 * a_w of a stationary record carries against |W| applied exactly, wherever its content lies: between the centres, in the
 * top band, or between the top covered band and Nyquist, where the realisation departs most (at 100 Hz: Wk +8.7 % at
 * 47 Hz, Wd +10 %; at 200 Hz: Wk +15 % at 95 Hz; scipy.signal.freqs against sosfreqz, ride audit 2026-12-03). NaN
 * when the spectrum has no weighted content.
 */
export function spectrumErrorRatio(d: WeightingFilterDesign, psd: Float64Array, frequencyHz: Float64Array): number {
  let digital = 0;
  let analog = 0;
  for (let k = 0; k < psd.length; k++) {
    const f = frequencyHz[k]!;
    const p = psd[k]!;
    if (!(f > 0) || !(p > 0)) continue;
    digital += cascadeMagnitude(d.sections, d.gain, f, d.sampleRateHz) ** 2 * p;
    analog += weightingMagnitude(d.weighting, f) ** 2 * p;
  }
  return analog > 0 ? Math.sqrt(digital / analog) : NaN;
}
