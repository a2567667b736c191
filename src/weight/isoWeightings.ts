/**
 * Frequency weightings of whole-body vibration as analog prototypes (ISO 2631-1:1997 Annex A; the same
 * parameters in ISO 8041; Wb from ISO 2631-4:2001). With s = j 2 pi f and wi = 2 pi fi:
 *
 *   H(s) = K Hh(s) Hl(s) Ht(s) Hs(s)
 *   Hh = s^2 / (s^2 + w1 s / Q1 + w1^2)                       band-limiting high-pass, Q1 = 1/sqrt(2)
 *   Hl = w2^2 / (s^2 + w2 s / Q2 + w2^2)                      band-limiting low-pass,  Q2 = 1/sqrt(2)
 *   Ht = (1 + s/w3) / (1 + s/(w4 Q4) + s^2/w4^2)              acceleration-velocity transition
 *   Hs = (1 + s/(w5 Q5) + s^2/w5^2) / (1 + s/(w6 Q6) + s^2/w6^2) (w5/w6)^2   upward step
 *
 * A missing Ht or Hs (f = infinity in the standard's table) is a factor 1. Parameters: docs/REFERENCES.md
 * sec. 8 (confirmed against a published reproduction of the ISO 8041 table). Wb's row (f3 = f4 = 16 Hz,
 * Q4 = 0.55, f5 = 2.5 Hz, Q5 = 0.9, f6 = 4 Hz, Q6 = 0.95, K = 1.024) is from memory; it reproduces the
 * ISO 8041 reference value |Wb| = 0.8126 at 100 rad/s that docs/REFERENCES.md sec. 8 confirms.
 */
export const WEIGHTING_NAMES = ["Wk", "Wd", "Wc", "We", "Wj", "Wb"] as const;
export type WeightingName = (typeof WEIGHTING_NAMES)[number];

export interface WeightingParameters {
  f1: number;
  f2: number;
  /** Transition (Ht); undefined where the standard has none. */
  f3?: number | undefined;
  f4?: number | undefined;
  q4?: number | undefined;
  /** Upward step (Hs); undefined where the standard has none. */
  f5?: number | undefined;
  q5?: number | undefined;
  f6?: number | undefined;
  q6?: number | undefined;
  /** Overall gain K (1 except Wb). */
  gain: number;
  /** What the weighting is for (ISO 2631-1 Table 1/2, ISO 2631-4). */
  use: string;
}

const Q_BAND = Math.SQRT1_2;

export const WEIGHTINGS: Readonly<Record<WeightingName, WeightingParameters>> = {
  Wk: {
    f1: 0.4,
    f2: 100,
    f3: 12.5,
    f4: 12.5,
    q4: 0.63,
    f5: 2.37,
    q5: 0.91,
    f6: 3.35,
    q6: 0.91,
    gain: 1,
    use: "vertical (z) at the seat or feet",
  },
  Wd: { f1: 0.4, f2: 100, f3: 2.0, f4: 2.0, q4: 0.63, gain: 1, use: "horizontal (x, y) at the seat or feet" },
  Wc: { f1: 0.4, f2: 100, f3: 8.0, f4: 8.0, q4: 0.63, gain: 1, use: "seat-back (x)" },
  We: { f1: 0.4, f2: 100, f3: 1.0, f4: 1.0, q4: 0.63, gain: 1, use: "rotational vibration" },
  Wj: { f1: 0.4, f2: 100, f5: 3.75, q5: 0.91, f6: 5.32, q6: 0.91, gain: 1, use: "vertical under the head, recumbent" },
  Wb: {
    f1: 0.4,
    f2: 100,
    f3: 16,
    f4: 16,
    q4: 0.55,
    f5: 2.5,
    q5: 0.9,
    f6: 4.0,
    q6: 0.95,
    gain: 1.024,
    use: "vertical, railway (ISO 2631-4)",
  },
};

/**
 * One second-order analog section b(s)/a(s), coefficients highest power first: b = [b2, b1, b0] for
 * b2 s^2 + b1 s + b0. `poleHz` is the natural frequency of its denominator (the pre-warp frequency of
 * the digital realisation, see bilinearBiquads.ts).
 */
export interface AnalogSection {
  b: readonly [number, number, number];
  a: readonly [number, number, number];
  poleHz: number;
  role: "high-pass" | "low-pass" | "transition" | "upward step";
}

/** The analog prototype as a cascade of second-order sections, and its gain K. */
export function analogSections(name: WeightingName): { sections: AnalogSection[]; gain: number } {
  const p = WEIGHTINGS[name];
  const w1 = 2 * Math.PI * p.f1;
  const w2 = 2 * Math.PI * p.f2;
  const sections: AnalogSection[] = [
    { b: [1, 0, 0], a: [1, w1 / Q_BAND, w1 * w1], poleHz: p.f1, role: "high-pass" },
    { b: [0, 0, w2 * w2], a: [1, w2 / Q_BAND, w2 * w2], poleHz: p.f2, role: "low-pass" },
  ];
  if (p.f3 !== undefined && p.f4 !== undefined && p.q4 !== undefined) {
    const w3 = 2 * Math.PI * p.f3;
    const w4 = 2 * Math.PI * p.f4;
    sections.push({ b: [0, 1 / w3, 1], a: [1 / (w4 * w4), 1 / (w4 * p.q4), 1], poleHz: p.f4, role: "transition" });
  }
  if (p.f5 !== undefined && p.q5 !== undefined && p.f6 !== undefined && p.q6 !== undefined) {
    const w5 = 2 * Math.PI * p.f5;
    const w6 = 2 * Math.PI * p.f6;
    const g = (w5 / w6) ** 2;
    sections.push({
      b: [g / (w5 * w5), g / (w5 * p.q5), g],
      a: [1 / (w6 * w6), 1 / (w6 * p.q6), 1],
      poleHz: p.f6,
      role: "upward step",
    });
  }
  return { sections, gain: p.gain };
}

/** |b(jw)/a(jw)| of one analog section. */
function sectionMagnitude(s: AnalogSection, w: number): number {
  const w2 = w * w;
  const nr = s.b[2] - s.b[0] * w2;
  const ni = s.b[1] * w;
  const dr = s.a[2] - s.a[0] * w2;
  const di = s.a[1] * w;
  return Math.sqrt((nr * nr + ni * ni) / (dr * dr + di * di));
}

/** |W(f)| of the analog prototype, in closed form (product of the sections' magnitudes). */
export function weightingMagnitude(name: WeightingName, frequencyHz: number): number {
  const { sections, gain } = analogSections(name);
  const w = 2 * Math.PI * frequencyHz;
  let m = gain;
  for (const s of sections) m *= sectionMagnitude(s, w);
  return m;
}

/** |W(f)|^2 at each frequency of `frequencyHz` (for weighting a PSD line by line). */
export function weightingPowerGains(name: WeightingName, frequencyHz: Float64Array): Float64Array {
  const out = new Float64Array(frequencyHz.length);
  for (let k = 0; k < out.length; k++) out[k] = weightingMagnitude(name, frequencyHz[k]!) ** 2;
  return out;
}

/** Nominal one-third-octave centres 0.5 to 80 Hz (IEC 61260 / ISO 266 preferred numbers, common practice). */
export const THIRD_OCTAVE_CENTRES_HZ: readonly number[] = [
  0.5, 0.63, 0.8, 1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 8, 10, 12.5, 16, 20, 25, 31.5, 40, 50, 63, 80,
];
