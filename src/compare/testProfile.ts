import { MAX_TOLERANCE_DB, profileInvalid as fail, readProfileSpec, type ProfileSpec } from "../read/profileFile.js";
import { STANDARD_GRAVITY_M_PER_S2 } from "../units.js";

/**
 * The log-log arithmetic of a test profile: breakpoints joined by straight lines on log-log axes, so that
 * level(f), the mean square over any range, RMS acceleration, velocity and displacement follow in closed
 * form. Reading and checking a profile file is read/profileFile.ts's (readProfileSpec); parseProfile here
 * adds the arithmetic and checks that it stays finite.
 */

// The file's types, for the modules that take them with the arithmetic (analyses/deriveProfile.ts imports
// ProfileDocument from here).
export type {
  ProfileDocument,
  ProfileProvenance,
  ProfileSpec,
  ProfileTone,
  ToleranceBand,
} from "../read/profileFile.js";

export interface ProfileSegment {
  f1: number;
  f2: number;
  g1: number;
  g2: number;
  /** n in G(f) = g1 (f/f1)^n. */
  exponent: number;
  slopeDbPerOctave: number;
  /** Integral of G over the segment. */
  area: number;
}

/** A profile with its arithmetic: the spec's breakpoints as levels, the log-log segments between them, the RMS. */
export interface TestProfile extends Omit<ProfileSpec, "points"> {
  breakpoints: { hz: number; level: number }[];
  segments: ProfileSegment[];
  /** Overall RMS acceleration of the random part over the profile's range. */
  rms: number;
  /** RMS of random and tones together: sqrt(rms^2 + sum of peak^2 / 2). Equal to rms without tones. */
  totalRms: number;
}

/** Parse a profile from its text (JSON, YAML or CSV by extension): read/profileFile.ts's spec, then the arithmetic. */
export function parseProfile(text: string, file: string): TestProfile {
  return checkProfileArithmetic(profileFromSpec(readProfileSpec(text, file)));
}

/** The arithmetic of a checked spec: levels from slopes, segments, the RMS (keys in the order results record them). */
export function profileFromSpec(spec: ProfileSpec): TestProfile {
  const breakpoints: { hz: number; level: number }[] = [];
  for (const p of spec.points) {
    if (p.level !== undefined) breakpoints.push({ hz: p.hz, level: p.level });
    else {
      const prev = breakpoints[breakpoints.length - 1]!;
      breakpoints.push({
        hz: p.hz,
        level: prev.level * Math.pow(10, (p.slopeDbPerOctave * Math.log2(p.hz / prev.hz)) / 10),
      });
    }
  }
  const segments = breakpoints.slice(1).map((b, i): ProfileSegment => {
    const a = breakpoints[i]!;
    const exponent = Math.log(b.level / a.level) / Math.log(b.hz / a.hz);
    return {
      f1: a.hz,
      f2: b.hz,
      g1: a.level,
      g2: b.level,
      exponent,
      slopeDbPerOctave: exponent * 10 * LOG10_2,
      area: powerLawArea(a.hz, b.hz, a.level, exponent),
    };
  });
  let area = 0;
  for (const s of segments) area += s.area;
  let toneMs = 0;
  for (const t of spec.tones) toneMs += (t.peak * t.peak) / 2;
  return {
    title: spec.title,
    file: spec.file,
    sha256: spec.sha256,
    units: spec.units,
    breakpoints,
    segments,
    rms: Math.sqrt(area),
    tones: spec.tones,
    totalRms: Math.sqrt(area + toneMs),
    bands: spec.bands,
    rmsToleranceDb: spec.rmsToleranceDb,
    minDof: spec.minDof,
    resolutionHz: spec.resolutionHz,
    durationS: spec.durationS,
    allowedOutsidePercent: spec.allowedOutsidePercent,
    outerBands: spec.outerBands,
    defaultsApplied: spec.defaultsApplied,
    ...(spec.provenance !== undefined ? { provenance: spec.provenance } : {}),
    ...(spec.power !== undefined ? { power: spec.power } : {}),
  };
}

const LOG10_2 = Math.log10(2);

/**
 * Area under g1 (f/f1)^n from f1 to f2: g1 f1 / (n+1) ((f2/f1)^(n+1) - 1), and g1 f1 ln(f2/f1) when
 * n = -1 (a slope of -3.0103 dB/octave), where the general form divides by zero. Standard log-log
 * segment integration (docs/REFERENCES.md sec. 5).
 */
export function powerLawArea(f1: number, f2: number, g1: number, n: number): number {
  const r = f2 / f1;
  if (Math.abs(n + 1) < 1e-9) return g1 * f1 * Math.log(r);
  return ((g1 * f1) / (n + 1)) * (Math.pow(r, n + 1) - 1);
}

/** Level of the profile at f (log-log interpolation), NaN outside its range. */
export function profileLevel(p: Pick<TestProfile, "segments">, f: number): number {
  const s = p.segments;
  if (s.length === 0 || !(f >= s[0]!.f1 && f <= s[s.length - 1]!.f2)) return NaN;
  let lo = 0;
  let hi = s.length - 1;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (f > s[mid]!.f2) lo = mid + 1;
    else hi = mid;
  }
  const seg = s[lo]!;
  return seg.g1 * Math.pow(f / seg.f1, seg.exponent);
}

/** Integral of the profile over [f1, f2] (clipped to its range), segment by segment in closed form. */
export function profileMeanSquare(p: Pick<TestProfile, "segments">, f1: number, f2: number): number {
  let area = 0;
  for (const s of p.segments) {
    const a = Math.max(f1, s.f1);
    const b = Math.min(f2, s.f2);
    if (b <= a) continue;
    area += powerLawArea(a, b, s.g1 * Math.pow(a / s.f1, s.exponent), s.exponent);
  }
  return area;
}

/**
 * Numbers that stay finite through the arithmetic: every breakpoint level (a slope of 1e6 dB/octave
 * overflows it), every segment area and the overall RMS (a level of 1e308 times a frequency does),
 * and the velocity and displacement integrals. A non-finite value is an error naming the point,
 * never a "NaN g RMS" on the page.
 */
function checkProfileArithmetic(p: TestProfile): TestProfile {
  const file = p.file;
  p.breakpoints.forEach((b, i) => {
    if (!(Number.isFinite(b.level) && b.level > 0)) {
      fail(
        file,
        `points[${i}]`,
        "a level that stays a finite positive number (check the slope and the level)",
        String(b.level),
      );
    }
  });
  p.segments.forEach((s, i) => {
    if (!(Number.isFinite(s.area) && s.area >= 0 && Number.isFinite(s.exponent))) {
      fail(file, `points[${i + 1}]`, `a segment ${s.f1}–${s.f2} Hz whose area is a finite number`, String(s.area));
    }
  });
  if (!(Number.isFinite(p.rms) && p.rms > 0))
    fail(file, "points", "levels whose overall RMS is a finite number above 0", String(p.rms));
  const m = profileMotion(p);
  if (!Number.isFinite(m.velocityRms) || !Number.isFinite(m.displacementRms)) {
    fail(
      file,
      "points",
      "levels and frequencies whose velocity and displacement are finite",
      `velocity ${m.velocityRms}, displacement ${m.displacementRms}`,
    );
  }
  const t = p.rmsToleranceDb;
  if (
    t &&
    !(
      Number.isFinite(t.upper) &&
      Number.isFinite(t.lower) &&
      t.upper <= MAX_TOLERANCE_DB &&
      t.lower <= MAX_TOLERANCE_DB
    )
  ) {
    fail(file, "tolerance", `an RMS tolerance of at most ${MAX_TOLERANCE_DB} dB`, `+${t.upper}/-${t.lower} dB`);
  }
  return p;
}

export interface ProfileMotion {
  /** RMS velocity, m/s. */
  velocityRms: number;
  /** RMS displacement, m. */
  displacementRms: number;
  /**
   * Peak-to-peak displacement estimate, m: 6 x the random part's RMS (a +-3 sigma excursion; common practice), plus
   * twice each tone's displacement peak. Equal to 6 x RMS without tones.
   */
  displacementPeakToPeak: number;
}

/**
 * Velocity and displacement of the profile: G_v = G_a g^2 / (2 pi f)^2 and G_d = G_a g^2 / (2 pi f)^4
 * (stationary random process, one division by omega^2 per integration; Bendat & Piersol 2010), each
 * again a power law per segment, so the same closed-form area applies with exponent n - 2 and n - 4.
 */
export function profileMotion(p: TestProfile): ProfileMotion {
  const toSi = p.units === "g" ? STANDARD_GRAVITY_M_PER_S2 ** 2 : 1;
  let v = 0;
  let d = 0;
  for (const s of p.segments) {
    v += powerLawArea(s.f1, s.f2, s.g1 / s.f1 ** 2, s.exponent - 2);
    d += powerLawArea(s.f1, s.f2, s.g1 / s.f1 ** 4, s.exponent - 4);
  }
  let vRandom = (v * toSi) / (4 * Math.PI ** 2);
  let dRandom = (d * toSi) / (16 * Math.PI ** 4);
  // A tone of peak A at f: velocity peak A/(2 pi f), displacement peak A/(2 pi f)^2, mean squares half
  // their squares; they add to the random part's mean squares (uncorrelated). The peak-to-peak stroke is
  // the random part's 6 sigma plus twice each tone's displacement peak (the peaks can line up).
  const toneSi = Math.sqrt(toSi);
  let tonesPeakToPeak = 0;
  for (const t of p.tones ?? []) {
    const w = 2 * Math.PI * t.hz;
    const vp = (t.peak * toneSi) / w;
    const dp = (t.peak * toneSi) / (w * w);
    vRandom += (vp * vp) / 2;
    dRandom += (dp * dp) / 2;
    tonesPeakToPeak += 2 * dp;
  }
  const randomDisp = Math.sqrt((d * toSi) / (16 * Math.PI ** 4));
  const velocityRms = Math.sqrt(vRandom);
  const displacementRms = Math.sqrt(dRandom);
  return { velocityRms, displacementRms, displacementPeakToPeak: 6 * randomDisp + tonesPeakToPeak };
}
