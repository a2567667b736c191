import { createHash } from "node:crypto";
import Papa from "papaparse";
import { z } from "zod";
import { InputError } from "../errors.js";
import { strictDocument } from "../read/plainDocument.js";
import { MAX_PROFILE_BYTES } from "../read/profileFile.js";
import { STANDARD_GRAVITY_M_PER_S2, type AccelUnit } from "../units.js";

/**
 * Required random-vibration test profiles: breakpoints joined by straight lines on log-log axes,
 * with tolerance bands. A profile file is JSON or YAML (schema below, validated with zod) or a
 * two-column CSV of (Hz, level). Parsing gives a normalised table of segments from which level(f),
 * RMS acceleration, velocity and displacement follow in closed form.
 */

const positive = (what: string) => z.number({ error: `${what} (a number)` }).refine((v) => v > 0 && Number.isFinite(v), { message: `${what} above 0` });

const PointSchema = z.strictObject({
  hz: positive("a frequency in Hz"),
  level: positive("a level").optional(),
  slopeDbPerOctave: z.number({ error: "a slope in dB/octave (a number)" }).refine(Number.isFinite, { message: "a finite slope" }).optional(),
});

const BandSchema = z.strictObject({
  fromHz: positive("a frequency in Hz"),
  toHz: positive("a frequency in Hz"),
  upperDb: z.number({ error: "allowed excess in dB (a number >= 0)" }).min(0, { message: "allowed excess in dB >= 0 (both limits are positive numbers)" }),
  lowerDb: z.number({ error: "allowed shortfall in dB (a number >= 0)" }).min(0, { message: "allowed shortfall in dB >= 0 (both limits are positive numbers)" }),
});

/**
 * Where a derived profile came from (`psdgate derive` writes it): the tool, the inputs by SHA-256 and every
 * parameter. Optional; `profile` shows it and every `check` report names it.
 */
const ProvenanceSchema = z.strictObject({
  derivedBy: z.string({ error: "the tool that derived the profile (text)" }).min(1),
  created: z.string({ error: "a date-time (text)" }).optional(),
  method: z.string({ error: "the method in words (text)" }).optional(),
  inputs: z.array(z.strictObject({
    file: z.string({ error: "an input file name (text)" }).min(1),
    sha256: z.string({ error: "a SHA-256 (64 hex digits)" }).regex(/^[0-9a-f]{64}$/, { message: "a SHA-256 (64 lower-case hex digits)" }),
    role: z.string({ error: "the input's role (text)" }).optional(),
    group: z.string({ error: "a group name (text)" }).optional(),
    serviceHours: z.number({ error: "service hours (a number)" }).optional(),
    durationS: z.number({ error: "a duration in s (a number)" }).optional(),
  }, { error: "an input: file and sha256" }), { error: "a list of inputs" }).min(1, { message: "at least one input" }),
  parameters: z.record(z.string(), z.union([z.number(), z.string(), z.boolean(), z.null()]), { error: "a mapping of parameters (numbers, text, true/false)" }),
}, { error: "a provenance mapping: derivedBy, inputs, parameters" });

export type ProfileProvenance = z.infer<typeof ProvenanceSchema>;

/**
 * A sine tone on the random background (sine-on-random, mixed mode): its frequency, its required peak
 * acceleration in the profile's unit root (g or m/s2), and its tolerance: ±toleranceDb on the peak, or
 * lowerDb/upperDb apart; toleranceHz is how far the tone's frequency may lie from hz.
 */
const ToneSchema = z.strictObject({
  hz: positive("a tone frequency in Hz"),
  peak: positive("a peak acceleration in the profile's unit (g or m/s2)"),
  toleranceDb: positive("a tolerance on the peak in dB").optional(),
  upperDb: z.number({ error: "allowed excess of the peak in dB (a number >= 0)" }).min(0, { message: "allowed excess in dB >= 0" }).optional(),
  lowerDb: z.number({ error: "allowed shortfall of the peak in dB (a number >= 0)" }).min(0, { message: "allowed shortfall in dB >= 0" }).optional(),
  toleranceHz: positive("how far the tone may lie from its frequency, Hz").optional(),
  name: z.string({ error: "a name for the tone (text)" }).min(1).optional(),
}, { error: "a tone: hz, peak and a tolerance" });

const ProfileSchema = z.strictObject({
  title: z.string({ error: "a title (text)" }).min(1, { message: "a non-empty title" }),
  units: z.enum(["g2/Hz", "(m/s2)2/Hz"], { error: 'units "g2/Hz" or "(m/s2)2/Hz"' }),
  points: z.array(PointSchema, { error: "a list of breakpoints" }).min(2, { message: "at least 2 breakpoints" }),
  tolerance: z.strictObject({
    bands: z.array(BandSchema, { error: "a list of tolerance bands" }).min(1, { message: "at least one tolerance band" }),
    rmsDb: z.number({ error: "an RMS tolerance in dB (a number > 0)" }).positive({ message: "an RMS tolerance in dB above 0" }).optional(),
    rmsPercent: z.number({ error: "an RMS tolerance in percent (a number)" }).positive().max(99, { message: "an RMS tolerance below 100 %" }).optional(),
    allowedOutsidePercent: z.number({ error: "a share of the lines in percent (a number from 0 to 50)" }).min(0, { message: "a share from 0 to 50 %" }).max(50, { message: "a share from 0 to 50 %" }).optional(),
    outerLimits: z.array(BandSchema, { error: "a list of outer-limit bands" }).min(1, { message: "at least one outer-limit band" }).optional(),
  }, { error: "a tolerance object with bands" }),
  minDof: positive("a minimum number of degrees of freedom").optional(),
  resolutionHz: positive("an analysis resolution in Hz").optional(),
  durationS: positive("a test duration in s").optional(),
  tones: z.array(ToneSchema, { error: "a list of tones" }).optional(),
  /**
   * The procedure's own power requirement for a pass (what a pass must have been able to see), or "none";
   * absent: psdgate's default (compare/decisionRule.ts DEFAULT_POWER).
   */
  power: z.union([
    z.literal("none"),
    z.object({
      departureDb: positive("a departure beyond the band in dB").optional(),
      departurePercent: z.number({ error: "a share of the lines in percent (a number above 0, at most 100)" }).positive({ message: "a share above 0 %" }).max(100, { message: "a share of at most 100 %" }).optional(),
      widthLines: z.number({ error: "a width in neighbouring lines (a whole number from 1 to 64)" }).int({ message: "a whole number of lines" }).min(1, { message: "at least 1 line" }).max(64, { message: "at most 64 lines" }).optional(),
      rmsBeyondDb: positive("an RMS departure beyond its tolerance in dB").optional(),
      probabilityPercent: z.number({ error: "a probability in percent (a number from 50 to 99.9)" }).min(50, { message: "a probability from 50 %" }).max(99.9, { message: "a probability up to 99.9 %" }).optional(),
    }, { error: 'a power requirement (departureDb, departurePercent, widthLines, rmsBeyondDb, probabilityPercent) or "none"' }).strict(),
  ], { error: 'a power requirement (departureDb, departurePercent, widthLines, rmsBeyondDb, probabilityPercent) or "none"' }).optional(),
  description: z.string().optional(),
  provenance: ProvenanceSchema.optional(),
});

export type ProfileDocument = z.infer<typeof ProfileSchema>;

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

export interface ToleranceBand {
  fromHz: number;
  toHz: number;
  upperDb: number;
  lowerDb: number;
}

/** A required sine tone, normalised: limits on the peak in dB either side, frequency allowance in Hz. */
export interface ProfileTone {
  /** A label for messages: the profile's name for it, else "tone at N Hz". */
  label: string;
  hz: number;
  /** Required peak acceleration, profile unit (g or m/s2). */
  peak: number;
  upperDb: number;
  lowerDb: number;
  toleranceHz: number;
  /** Index in the profile's `tones` list. */
  index: number;
}

/** Frequency allowance of a tone that does not give one: ±0.5 % of its frequency, at least 0.05 Hz (chosen here). */
export function defaultToneToleranceHz(hz: number): number {
  return Math.max(0.05, 0.005 * hz);
}

export interface TestProfile {
  title: string;
  file: string;
  sha256: string;
  units: AccelUnit;
  breakpoints: { hz: number; level: number }[];
  segments: ProfileSegment[];
  /** Overall RMS acceleration of the random part over the profile's range. */
  rms: number;
  /** Sine tones on the random (mixed mode); empty for a random-only profile. */
  tones: ProfileTone[];
  /** RMS of random and tones together: sqrt(rms^2 + sum of peak^2 / 2). Equal to rms without tones. */
  totalRms: number;
  bands: ToleranceBand[];
  /** Allowed RMS excess and shortfall in dB (20 log10 of the RMS ratio). */
  rmsToleranceDb: { upper: number; lower: number } | undefined;
  minDof: number | undefined;
  resolutionHz: number | undefined;
  durationS: number | undefined;
  /** Percent of the judged lines that may lie outside the tolerance band (0 when not given). */
  allowedOutsidePercent: number | undefined;
  /** Outer limits no line may cross, at least as wide as the tolerance band everywhere. */
  outerBands: ToleranceBand[] | undefined;
  /** Values the file did not give and psdgate supplied (e.g. a CSV profile's tolerance), each said in words. */
  defaultsApplied: string[];
  /** Where a derived profile came from (absent for a hand-written one). */
  provenance?: ProfileProvenance | undefined;
  /**
   * The profile's own power requirement: "none", or the parts it states (the rest from psdgate's default);
   * absent: psdgate's default applies.
   */
  power?: "none" | { departureDb?: number | undefined; departurePercent?: number | undefined; widthLines?: number | undefined; rmsBeyondDb?: number | undefined; probabilityPercent?: number | undefined } | undefined;
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

function fail(file: string, keyPath: string, expected: string, received?: string): never {
  throw new InputError("PROFILE_INVALID", { file, keyPath, expected, received });
}

/** Build the normalised profile from a validated document. */
export function normalizeProfile(doc: ProfileDocument, file: string, sha256: string, defaultsApplied?: string[]): TestProfile {
  const pts = doc.points;
  const breakpoints: { hz: number; level: number }[] = [];
  for (let i = 0; i < pts.length; i++) {
    const p = pts[i]!;
    const at = `points[${i}]`;
    if (p.level !== undefined && p.slopeDbPerOctave !== undefined) fail(file, at, "either level or slopeDbPerOctave, not both", "both");
    if (i > 0 && !(p.hz > pts[i - 1]!.hz)) fail(file, `${at}.hz`, `a frequency above the previous point's ${pts[i - 1]!.hz} Hz`, String(p.hz));
    if (i === 0) {
      if (p.level === undefined) fail(file, `${at}.level`, "a level on the first point (a slope needs a level to start from)", p.slopeDbPerOctave !== undefined ? "a slope only" : "nothing");
      breakpoints.push({ hz: p.hz, level: p.level! });
    } else if (p.level !== undefined) breakpoints.push({ hz: p.hz, level: p.level });
    else if (p.slopeDbPerOctave !== undefined) {
      const prev = breakpoints[i - 1]!;
      breakpoints.push({ hz: p.hz, level: prev.level * Math.pow(10, (p.slopeDbPerOctave * Math.log2(p.hz / prev.hz)) / 10) });
    } else fail(file, at, "a level or a slopeDbPerOctave", "neither");
  }
  const segments = breakpoints.slice(1).map((b, i): ProfileSegment => {
    const a = breakpoints[i]!;
    const exponent = Math.log(b.level / a.level) / Math.log(b.hz / a.hz);
    return { f1: a.hz, f2: b.hz, g1: a.level, g2: b.level, exponent, slopeDbPerOctave: exponent * 10 * LOG10_2, area: powerLawArea(a.hz, b.hz, a.level, exponent) };
  });
  const f0 = breakpoints[0]!.hz;
  const fN = breakpoints[breakpoints.length - 1]!.hz;

  const bands = coveringBands(doc.tolerance.bands, "tolerance.bands", f0, fN, file);
  const outerBands = doc.tolerance.outerLimits ? coveringBands(doc.tolerance.outerLimits, "tolerance.outerLimits", f0, fN, file) : undefined;
  if (outerBands) {
    // Outer limits must lie on or outside the band at every frequency: check at every band edge and midpoint.
    const probes = [...bands.flatMap((b) => [b.fromHz, b.toHz, (b.fromHz + b.toHz) / 2]), ...outerBands.flatMap((b) => [b.fromHz, b.toHz])];
    for (const f of probes) {
      const inner = bands.find((b) => f >= b.fromHz && f <= b.toHz);
      const o = outerBands.findIndex((b) => f >= b.fromHz && f <= b.toHz);
      if (!inner || o < 0) continue;
      if (outerBands[o]!.upperDb < inner.upperDb || outerBands[o]!.lowerDb < inner.lowerDb) {
        fail(file, `tolerance.outerLimits[${o}]`, `outer limits at least as wide as the tolerance band at ${f} Hz (+${inner.upperDb}/-${inner.lowerDb} dB)`, `+${outerBands[o]!.upperDb}/-${outerBands[o]!.lowerDb} dB`);
      }
    }
  }

  const t = doc.tolerance;
  if (t.rmsDb !== undefined && t.rmsPercent !== undefined) fail(file, "tolerance", "either rmsDb or rmsPercent, not both", "both");
  const rmsToleranceDb =
    t.rmsDb !== undefined ? { upper: t.rmsDb, lower: t.rmsDb }
      : t.rmsPercent !== undefined ? { upper: 20 * Math.log10(1 + t.rmsPercent / 100), lower: -20 * Math.log10(1 - t.rmsPercent / 100) }
        : undefined;
  let area = 0;
  for (const s of segments) area += s.area;
  const tones = (doc.tones ?? []).map((t, i): ProfileTone => {
    const at = `tones[${i}]`;
    if (t.toleranceDb !== undefined && (t.upperDb !== undefined || t.lowerDb !== undefined)) fail(file, at, "either toleranceDb or upperDb/lowerDb, not both", "both");
    if (t.toleranceDb === undefined && (t.upperDb === undefined || t.lowerDb === undefined)) fail(file, at, "a tolerance: toleranceDb, or both upperDb and lowerDb", t.upperDb !== undefined || t.lowerDb !== undefined ? "only one of upperDb/lowerDb" : "none");
    if (t.hz < f0 || t.hz > fN) fail(file, `${at}.hz`, `a tone inside the profile's range ${f0}–${fN} Hz`, String(t.hz));
    return {
      label: t.name ?? `tone at ${t.hz} Hz`, hz: t.hz, peak: t.peak,
      upperDb: t.toleranceDb ?? t.upperDb!, lowerDb: t.toleranceDb ?? t.lowerDb!, toleranceHz: t.toleranceHz ?? defaultToneToleranceHz(t.hz), index: i,
    };
  });
  const sorted = [...tones].sort((a, b) => a.hz - b.hz);
  for (let k = 1; k < sorted.length; k++) {
    const a = sorted[k - 1]!;
    const b = sorted[k]!;
    if (b.hz - b.toleranceHz <= a.hz + a.toleranceHz) fail(file, `tones[${b.index}].hz`, `tones whose frequency allowances do not overlap (tones[${a.index}] at ${a.hz} ± ${a.toleranceHz} Hz)`, `${b.hz} ± ${b.toleranceHz} Hz`);
  }
  let toneMs = 0;
  for (const t of tones) toneMs += (t.peak * t.peak) / 2;
  return {
    title: doc.title, file, sha256, units: doc.units === "g2/Hz" ? "g" : "m/s2", breakpoints, segments, rms: Math.sqrt(area),
    tones, totalRms: Math.sqrt(area + toneMs),
    bands,
    rmsToleranceDb, minDof: doc.minDof, resolutionHz: doc.resolutionHz, durationS: doc.durationS,
    allowedOutsidePercent: t.allowedOutsidePercent, outerBands, defaultsApplied: defaultsApplied ?? [],
    ...(doc.provenance !== undefined ? { provenance: doc.provenance } : {}),
    ...(doc.power !== undefined ? { power: doc.power } : {}),
  };
}

/** Bands sorted by frequency that cover f0..fN without gaps or overlaps; errors name the key path. */
function coveringBands(list: ProfileDocument["tolerance"]["bands"], key: string, f0: number, fN: number, file: string): ToleranceBand[] {
  const bands = [...list].map((b, i) => ({ ...b, i })).sort((a, b) => a.fromHz - b.fromHz);
  for (const b of bands) if (!(b.toHz > b.fromHz)) fail(file, `${key}[${b.i}].toHz`, `a frequency above fromHz ${b.fromHz}`, String(b.toHz));
  if (bands[0]!.fromHz > f0) fail(file, `${key}[${bands[0]!.i}].fromHz`, `bands that cover the profile from ${f0} Hz`, `a first band from ${bands[0]!.fromHz} Hz`);
  for (let k = 1; k < bands.length; k++) {
    const a = bands[k - 1]!;
    const b = bands[k]!;
    if (b.fromHz < a.toHz) fail(file, `${key}[${b.i}].fromHz`, `bands that do not overlap (the previous band ends at ${a.toHz} Hz)`, String(b.fromHz));
    if (b.fromHz > a.toHz) fail(file, `${key}[${b.i}].fromHz`, `bands without gaps (the previous band ends at ${a.toHz} Hz)`, String(b.fromHz));
  }
  const last = bands[bands.length - 1]!;
  if (last.toHz < fN) fail(file, `${key}[${last.i}].toHz`, `bands that cover the profile up to ${fN} Hz`, String(last.toHz));
  return bands.map(({ fromHz, toHz, upperDb, lowerDb }) => ({ fromHz, toHz, upperDb, lowerDb }));
}

function keyPath(path: readonly PropertyKey[]): string {
  let s = "";
  for (const k of path) s += typeof k === "number" ? `[${k}]` : s === "" ? String(k) : `.${String(k)}`;
  return s === "" ? "(top level)" : s;
}

function describe(v: unknown): string {
  if (v === undefined) return "nothing";
  const s = JSON.stringify(v);
  return s === undefined ? String(v) : s.length > 40 ? `${s.slice(0, 40)}…` : s;
}

function valueAt(doc: unknown, path: readonly PropertyKey[]): unknown {
  let v: unknown = doc;
  for (const k of path) v = v !== null && typeof v === "object" ? (v as Record<PropertyKey, unknown>)[k] : undefined;
  return v;
}

/** The schema's keys for the object at a path (for the unknown-key message). */
function knownKeysAt(path: readonly PropertyKey[]): Record<string, unknown> {
  const names = path.filter((k) => typeof k === "string");
  const last = names[names.length - 1];
  if (last === undefined) return ProfileSchema.shape;
  if (last === "points") return PointSchema.shape;
  if (last === "tones") return ToneSchema.shape;
  if (last === "bands" || last === "outerLimits") return BandSchema.shape;
  if (last === "tolerance") return ProfileSchema.shape.tolerance.shape;
  if (last === "provenance") return ProvenanceSchema.shape;
  return {};
}

/** Validate a parsed document; the first problem becomes an error naming its key path. */
export function validateProfileDocument(doc: unknown, file: string): ProfileDocument {
  const r = ProfileSchema.safeParse(doc);
  if (!r.success) {
    const issue = r.error.issues[0]!;
    if (issue.code === "unrecognized_keys") {
      // A key psdgate does not know is an error naming it, never silently ignored (a misspelt `tones` would drop the tones).
      const key = issue.keys[0]!;
      const known = Object.keys(knownKeysAt(issue.path)).join(", ");
      fail(file, keyPath([...issue.path, key]), `a key psdgate knows here (${known})`, JSON.stringify(key));
    }
    const expected = issue.message.replace(/^Invalid input: expected /, "").replace(/^Invalid option: expected one of /, "one of ");
    fail(file, keyPath(issue.path), expected, describe(valueAt(doc, issue.path)));
  }
  return r.data;
}

/** The tolerance a two-column CSV profile gets, since the format has no place for one (common practice: a ±3 dB band is the widest in general use; docs/REFERENCES.md sec. 7). */
export const CSV_PROFILE_DEFAULTS = { bandDb: 3, rmsDb: 1.5 } as const;

/**
 * Two-column CSV (Hz, level) breakpoints; an optional header may name the unit, e.g. `level [(m/s2)2/Hz]`.
 * Comma, semicolon or tab between the fields; with a semicolon or tab, a decimal comma is read too.
 */
function profileFromCsv(text: string, file: string): { doc: unknown; defaults: string[] } {
  const body = text.replace(/^\ufeff/, "");
  const dataLines = body.split(/\r?\n/).filter((l) => l.trim() !== "" && !l.trim().startsWith("#"));
  const delimiter = dataLines.some((l) => l.includes(";")) ? ";" : dataLines.some((l) => l.includes("\t")) ? "\t" : ",";
  const rows = Papa.parse<string[]>(body, { skipEmptyLines: "greedy", comments: "#", delimiter }).data;
  const num = (f: string) => {
    const t = f.trim();
    if (t === "") return NaN;
    // Decimal numbers only: Number() would also read "0x14" as 20 and "0b1" as 1.
    return decimalNumber(delimiter !== "," ? t.replace(",", ".") : t);
  };
  let units = "g2/Hz";
  let start = 0;
  if (rows[0] && rows[0].some((f) => Number.isNaN(num(f)))) {
    units = csvProfileUnits(rows[0], file);
    start = 1;
  }
  const points = rows.slice(start).map((r, i) => {
    if (r.length !== 2) throw new InputError("PROFILE_CSV", { file, line: i + start + 1, expected: "2 fields: frequency in Hz, level", received: `${r.length}` });
    const [hz, level] = r.map(num);
    if (!Number.isFinite(hz!) || !Number.isFinite(level!)) throw new InputError("PROFILE_CSV", { file, line: i + start + 1, expected: "two numbers", received: describe(r.join(delimiter)) });
    return { hz: hz!, level: level! };
  });
  const f0 = points[0]?.hz ?? 1;
  const fN = points[points.length - 1]?.hz ?? 2;
  const d = CSV_PROFILE_DEFAULTS;
  return {
    doc: { title: file.replace(/^.*\//, ""), units, points, tolerance: { bands: [{ fromHz: f0, toHz: fN, upperDb: d.bandDb, lowerDb: d.bandDb }], rmsDb: d.rmsDb } },
    defaults: [`tolerance band ±${d.bandDb} dB and RMS tolerance ±${d.rmsDb} dB (a CSV profile has no place for them; use a JSON or YAML profile to set them)`, "no minimum DOF, resolution or duration"],
  };
}

/** Parse a profile from its text (JSON, YAML or CSV by extension). */
export function parseProfile(text: string, file: string): TestProfile {
  const sha = createHash("sha256").update(text).digest("hex");
  checkProfileSize(text, file);
  let doc: unknown;
  let defaults: string[] = [];
  if (/\.csv$/i.test(file)) ({ doc, defaults } = profileFromCsv(text, file));
  else doc = strictDocument(text, file, { syntax: "PROFILE_SYNTAX", invalid: "PROFILE_INVALID", tooDeep: "PROFILE_TOO_LARGE" }, !/\.ya?ml$/i.test(file), MAX_PROFILE_DEPTH);
  return checkProfileArithmetic(normalizeProfile(validateProfileDocument(doc, file), file, sha, defaults));
}

// ---- Limits on what a profile file may hold (issue #12): size, nesting, tags, number forms, finite arithmetic.

/** Deepest nesting of arrays and objects a profile may have; the format needs 3 (tolerance.bands[i]). */
export const MAX_PROFILE_DEPTH = 32;

/** Size, checked on the text before any parser runs; nesting, tags and number forms are read/plainDocument.ts's rules. */
function checkProfileSize(text: string, file: string): void {
  if (text.length > MAX_PROFILE_BYTES) {
    throw new InputError("PROFILE_TOO_LARGE", { file, expected: `a profile of at most ${MAX_PROFILE_BYTES} bytes`, received: `${text.length} characters` });
  }
}

function quotedShort(s: string): string {
  return JSON.stringify(s.length > 40 ? `${s.slice(0, 40)}…` : s);
}

/** A decimal number (optionally signed, with fraction and exponent), or NaN: no hex, octal, binary, "", "Infinity". */
export function decimalNumber(field: string): number {
  const t = field.trim();
  return /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(t) ? Number(t) : NaN;
}

/**
 * The unit of a CSV profile from its header: the level column may say `[g2/Hz]` (also g^2/Hz, g²/Hz)
 * or `[(m/s2)2/Hz]` (also (m/s^2)^2/Hz, m2/s4/Hz, (m/s²)²/Hz); the frequency column `[Hz]`. Any other
 * unit, such as mg2/Hz, is an error rather than a guess. No unit means g2/Hz.
 */
function csvProfileUnits(header: string[], file: string): string {
  const unitOf = (f: string) => /[[(]\s*([^\])]*(?:\)[^\])]*)?)\s*[\])]\s*$/.exec(f.trim())?.[1]?.trim();
  const norm = (u: string) => u.replace(/\s+/g, "").replace(/\^/g, "").replace(/²/g, "2").replace(/⁴/g, "4").toLowerCase();
  const hzUnit = header[0] !== undefined ? unitOf(header[0]) : undefined;
  if (hzUnit !== undefined && norm(hzUnit) !== "hz") {
    throw new InputError("PROFILE_CSV", { file, line: 1, column: 1, expected: "a frequency column in Hz", received: quotedShort(hzUnit) });
  }
  const levelUnit = header[1] !== undefined ? unitOf(header[1]) : undefined;
  if (levelUnit === undefined) return "g2/Hz";
  const u = norm(levelUnit);
  if (u === "g2/hz") return "g2/Hz";
  if (u === "(m/s2)2/hz" || u === "m2/s4/hz" || u === "(m/s/s)2/hz") return "(m/s2)2/Hz";
  throw new InputError("PROFILE_CSV", { file, line: 1, column: 2, expected: "a level unit g2/Hz or (m/s2)2/Hz", received: quotedShort(levelUnit) });
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
      fail(file, `points[${i}]`, "a level that stays a finite positive number (check the slope and the level)", String(b.level));
    }
  });
  p.segments.forEach((s, i) => {
    if (!(Number.isFinite(s.area) && s.area >= 0 && Number.isFinite(s.exponent))) {
      fail(file, `points[${i + 1}]`, `a segment ${s.f1}–${s.f2} Hz whose area is a finite number`, String(s.area));
    }
  });
  if (!(Number.isFinite(p.rms) && p.rms > 0)) fail(file, "points", "levels whose overall RMS is a finite number above 0", String(p.rms));
  const m = profileMotion(p);
  if (!Number.isFinite(m.velocityRms) || !Number.isFinite(m.displacementRms)) {
    fail(file, "points", "levels and frequencies whose velocity and displacement are finite", `velocity ${m.velocityRms}, displacement ${m.displacementRms}`);
  }
  for (const [k, b] of p.bands.entries()) {
    if (!(b.upperDb <= MAX_TOLERANCE_DB && b.lowerDb <= MAX_TOLERANCE_DB)) {
      fail(file, `tolerance.bands[${k}]`, `limits of at most ${MAX_TOLERANCE_DB} dB`, `+${b.upperDb}/-${b.lowerDb} dB`);
    }
  }
  const t = p.rmsToleranceDb;
  if (t && !(Number.isFinite(t.upper) && Number.isFinite(t.lower) && t.upper <= MAX_TOLERANCE_DB && t.lower <= MAX_TOLERANCE_DB)) {
    fail(file, "tolerance", `an RMS tolerance of at most ${MAX_TOLERANCE_DB} dB`, `+${t.upper}/-${t.lower} dB`);
  }
  return p;
}

/** Widest tolerance, in dB, that keeps 10^(dB/10) finite and meaningful (10^10 in power). */
const MAX_TOLERANCE_DB = 100;

export interface ProfileMotion {
  /** RMS velocity, m/s. */
  velocityRms: number;
  /** RMS displacement, m. */
  displacementRms: number;
  /** Peak-to-peak displacement estimate, m: 6 x the random part's RMS (a +-3 sigma excursion; common practice), plus twice each tone's displacement peak. Equal to 6 x RMS without tones. */
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
