import { createHash } from "node:crypto";
import Papa from "papaparse";
import { z } from "zod";
import { InputError } from "../errors.js";
import type { AccelUnit } from "../units.js";
import { strictDocument } from "./plainDocument.js";
import { readSmallText } from "./regularFile.js";

/**
 * Required random-vibration test profiles, as their files state them: breakpoints joined by straight lines
 * on log-log axes, with tolerance bands, optional sine tones and the profile's own conditions. A profile file
 * is JSON or YAML (schema below, validated with zod; read by plainDocument's strict reader) or a two-column
 * CSV of (Hz, level). Reading gives a ProfileSpec: every key checked, every error PROFILE_INVALID (or
 * PROFILE_SYNTAX, PROFILE_CSV, PROFILE_TOO_LARGE) naming its key path or line. The log-log arithmetic
 * (levels, segments, RMS, velocity and displacement) is compare/testProfile.ts's, which makes a TestProfile
 * of the spec.
 */

/**
 * Largest profile file read: a profile is a few breakpoints and bands (kilobytes); 1 MiB is far beyond any real one.
 */
export const MAX_PROFILE_BYTES = 1 << 20;

/** The text of a profile file: a regular file (never a FIFO or device), at most MAX_PROFILE_BYTES. */
export async function readProfileText(file: string): Promise<string> {
  return (
    await readSmallText(file, {
      what: "a readable profile file",
      maxBytes: MAX_PROFILE_BYTES,
      tooLarge: "PROFILE_TOO_LARGE",
    })
  ).text;
}

const positive = (what: string) =>
  z.number({ error: `${what} (a number)` }).refine((v) => v > 0 && Number.isFinite(v), { message: `${what} above 0` });

const PointSchema = z.strictObject({
  hz: positive("a frequency in Hz"),
  level: positive("a level").optional(),
  slopeDbPerOctave: z
    .number({ error: "a slope in dB/octave (a number)" })
    .refine(Number.isFinite, { message: "a finite slope" })
    .optional(),
});

/** Widest band limit, in dB, that keeps 10^(dB/10) finite and meaningful (10^10 in power). */
export const MAX_TOLERANCE_DB = 100;

const BandSchema = z.strictObject({
  fromHz: positive("a frequency in Hz"),
  toHz: positive("a frequency in Hz"),
  upperDb: z
    .number({ error: "allowed excess in dB (a number >= 0)" })
    .min(0, { message: "allowed excess in dB >= 0 (both limits are positive numbers)" })
    .max(MAX_TOLERANCE_DB, { message: `allowed excess of at most ${MAX_TOLERANCE_DB} dB` }),
  lowerDb: z
    .number({ error: "allowed shortfall in dB (a number >= 0)" })
    .min(0, { message: "allowed shortfall in dB >= 0 (both limits are positive numbers)" })
    .max(MAX_TOLERANCE_DB, { message: `allowed shortfall of at most ${MAX_TOLERANCE_DB} dB` }),
});

/**
 * Where a derived profile came from (`psdgate derive` writes it): the tool, the inputs by SHA-256 and every
 * parameter. Optional; `profile` shows it and every `check` report names it.
 */
const ProvenanceSchema = z.strictObject(
  {
    derivedBy: z.string({ error: "the tool that derived the profile (text)" }).min(1),
    created: z.string({ error: "a date-time (text)" }).optional(),
    method: z.string({ error: "the method in words (text)" }).optional(),
    inputs: z
      .array(
        z.strictObject(
          {
            file: z.string({ error: "an input file name (text)" }).min(1),
            sha256: z
              .string({ error: "a SHA-256 (64 hex digits)" })
              .regex(/^[0-9a-f]{64}$/, { message: "a SHA-256 (64 lower-case hex digits)" }),
            role: z.string({ error: "the input's role (text)" }).optional(),
            group: z.string({ error: "a group name (text)" }).optional(),
            serviceHours: z.number({ error: "service hours (a number)" }).optional(),
            durationS: z.number({ error: "a duration in s (a number)" }).optional(),
          },
          { error: "an input: file and sha256" },
        ),
        { error: "a list of inputs" },
      )
      .min(1, { message: "at least one input" }),
    parameters: z.record(z.string(), z.union([z.number(), z.string(), z.boolean(), z.null()]), {
      error: "a mapping of parameters (numbers, text, true/false)",
    }),
  },
  { error: "a provenance mapping: derivedBy, inputs, parameters" },
);

export type ProfileProvenance = z.infer<typeof ProvenanceSchema>;

/**
 * A sine tone on the random background (sine-on-random, mixed mode): its frequency, its required peak
 * acceleration in the profile's unit root (g or m/s2), and its tolerance: ±toleranceDb on the peak, or
 * lowerDb/upperDb apart; toleranceHz is how far the tone's frequency may lie from hz.
 */
const ToneSchema = z.strictObject(
  {
    hz: positive("a tone frequency in Hz"),
    peak: positive("a peak acceleration in the profile's unit (g or m/s2)"),
    toleranceDb: positive("a tolerance on the peak in dB").optional(),
    upperDb: z
      .number({ error: "allowed excess of the peak in dB (a number >= 0)" })
      .min(0, { message: "allowed excess in dB >= 0" })
      .optional(),
    lowerDb: z
      .number({ error: "allowed shortfall of the peak in dB (a number >= 0)" })
      .min(0, { message: "allowed shortfall in dB >= 0" })
      .optional(),
    toleranceHz: positive("how far the tone may lie from its frequency, Hz").optional(),
    name: z.string({ error: "a name for the tone (text)" }).min(1).optional(),
  },
  { error: "a tone: hz, peak and a tolerance" },
);

const ProfileSchema = z.strictObject({
  title: z.string({ error: "a title (text)" }).min(1, { message: "a non-empty title" }),
  units: z.enum(["g2/Hz", "(m/s2)2/Hz"], { error: 'units "g2/Hz" or "(m/s2)2/Hz"' }),
  points: z.array(PointSchema, { error: "a list of breakpoints" }).min(2, { message: "at least 2 breakpoints" }),
  tolerance: z.strictObject(
    {
      bands: z
        .array(BandSchema, { error: "a list of tolerance bands" })
        .min(1, { message: "at least one tolerance band" }),
      rmsDb: z
        .number({ error: "an RMS tolerance in dB (a number > 0)" })
        .positive({ message: "an RMS tolerance in dB above 0" })
        .optional(),
      rmsPercent: z
        .number({ error: "an RMS tolerance in percent (a number)" })
        .positive()
        .max(99, { message: "an RMS tolerance below 100 %" })
        .optional(),
      allowedOutsidePercent: z
        .number({ error: "a share of the lines in percent (a number from 0 to 50)" })
        .min(0, { message: "a share from 0 to 50 %" })
        .max(50, { message: "a share from 0 to 50 %" })
        .optional(),
      outerLimits: z
        .array(BandSchema, { error: "a list of outer-limit bands" })
        .min(1, { message: "at least one outer-limit band" })
        .optional(),
    },
    { error: "a tolerance object with bands" },
  ),
  minDof: positive("a minimum number of degrees of freedom").optional(),
  resolutionHz: positive("an analysis resolution in Hz").optional(),
  durationS: positive("a test duration in s").optional(),
  tones: z.array(ToneSchema, { error: "a list of tones" }).optional(),
  /**
   * The procedure's own power requirement for a pass (what a pass must have been able to see), or "none";
   * absent: psdgate's default (compare/decisionRule.ts DEFAULT_POWER).
   */
  power: z
    .union(
      [
        z.literal("none"),
        z
          .object(
            {
              departureDb: positive("a departure beyond the band in dB").optional(),
              departurePercent: z
                .number({ error: "a share of the lines in percent (a number above 0, at most 100)" })
                .positive({ message: "a share above 0 %" })
                .max(100, { message: "a share of at most 100 %" })
                .optional(),
              widthLines: z
                .number({ error: "a width in neighbouring lines (a whole number from 1 to 64)" })
                .int({ message: "a whole number of lines" })
                .min(1, { message: "at least 1 line" })
                .max(64, { message: "at most 64 lines" })
                .optional(),
              rmsBeyondDb: positive("an RMS departure beyond its tolerance in dB").optional(),
              probabilityPercent: z
                .number({ error: "a probability in percent (a number from 50 to 99.9)" })
                .min(50, { message: "a probability from 50 %" })
                .max(99.9, { message: "a probability up to 99.9 %" })
                .optional(),
            },
            {
              error:
                'a power requirement (departureDb, departurePercent, widthLines, rmsBeyondDb, probabilityPercent) or "none"',
            },
          )
          .strict(),
      ],
      {
        error:
          'a power requirement (departureDb, departurePercent, widthLines, rmsBeyondDb, probabilityPercent) or "none"',
      },
    )
    .optional(),
  description: z.string().optional(),
  provenance: ProvenanceSchema.optional(),
});

export type ProfileDocument = z.infer<typeof ProfileSchema>;

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

/** A breakpoint as the file gives it: a level, or (after the first) a slope in dB/octave from the previous one. */
export type ProfilePoint =
  | { hz: number; level: number; slopeDbPerOctave?: undefined }
  | { hz: number; level?: undefined; slopeDbPerOctave: number };

/**
 * What a profile file states, checked: everything of a TestProfile but the log-log arithmetic (compare/testProfile.ts).
 */
export interface ProfileSpec {
  title: string;
  file: string;
  sha256: string;
  units: AccelUnit;
  /** The breakpoints, frequencies rising; the first has a level. */
  points: ProfilePoint[];
  /** Sine tones on the random (mixed mode); empty for a random-only profile. */
  tones: ProfileTone[];
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
  power?:
    | "none"
    | {
        departureDb?: number | undefined;
        departurePercent?: number | undefined;
        widthLines?: number | undefined;
        rmsBeyondDb?: number | undefined;
        probabilityPercent?: number | undefined;
      }
    | undefined;
}

/** A PROFILE_INVALID error naming the key path (also for compare/testProfile.ts's arithmetic checks). */
export function profileInvalid(file: string, keyPath: string, expected: string, received?: string): never {
  throw new InputError("PROFILE_INVALID", { file, keyPath, expected, received });
}

/**
 * The checked spec of a validated document: breakpoints in order, bands covering the range, tones inside it and apart.
 */
function profileSpec(doc: ProfileDocument, file: string, sha256: string, defaultsApplied?: string[]): ProfileSpec {
  const pts = doc.points;
  const points: ProfilePoint[] = [];
  for (let i = 0; i < pts.length; i++) {
    const p = pts[i]!;
    const at = `points[${i}]`;
    if (p.level !== undefined && p.slopeDbPerOctave !== undefined)
      profileInvalid(file, at, "either level or slopeDbPerOctave, not both", "both");
    if (i > 0 && !(p.hz > pts[i - 1]!.hz))
      profileInvalid(file, `${at}.hz`, `a frequency above the previous point's ${pts[i - 1]!.hz} Hz`, String(p.hz));
    if (i === 0) {
      if (p.level === undefined)
        profileInvalid(
          file,
          `${at}.level`,
          "a level on the first point (a slope needs a level to start from)",
          p.slopeDbPerOctave !== undefined ? "a slope only" : "nothing",
        );
      points.push({ hz: p.hz, level: p.level! });
    } else if (p.level !== undefined) points.push({ hz: p.hz, level: p.level });
    else if (p.slopeDbPerOctave !== undefined) points.push({ hz: p.hz, slopeDbPerOctave: p.slopeDbPerOctave });
    else profileInvalid(file, at, "a level or a slopeDbPerOctave", "neither");
  }
  const f0 = points[0]!.hz;
  const fN = points[points.length - 1]!.hz;
  const { bands, outerBands } = toleranceBands(doc, f0, fN, file);
  const t = doc.tolerance;
  if (t.rmsDb !== undefined && t.rmsPercent !== undefined)
    profileInvalid(file, "tolerance", "either rmsDb or rmsPercent, not both", "both");
  const rmsToleranceDb =
    t.rmsDb !== undefined
      ? { upper: t.rmsDb, lower: t.rmsDb }
      : t.rmsPercent !== undefined
        ? { upper: 20 * Math.log10(1 + t.rmsPercent / 100), lower: -20 * Math.log10(1 - t.rmsPercent / 100) }
        : undefined;
  return {
    title: doc.title,
    file,
    sha256,
    units: doc.units === "g2/Hz" ? "g" : "m/s2",
    points,
    tones: profileTones(doc, f0, fN, file),
    bands,
    rmsToleranceDb,
    minDof: doc.minDof,
    resolutionHz: doc.resolutionHz,
    durationS: doc.durationS,
    allowedOutsidePercent: t.allowedOutsidePercent,
    outerBands,
    defaultsApplied: defaultsApplied ?? [],
    ...(doc.provenance !== undefined ? { provenance: doc.provenance } : {}),
    ...(doc.power !== undefined ? { power: doc.power } : {}),
  };
}

/**
 * The tolerance bands and outer limits, each covering the range; outer limits at least as wide as the band everywhere.
 */
function toleranceBands(
  doc: ProfileDocument,
  f0: number,
  fN: number,
  file: string,
): { bands: ToleranceBand[]; outerBands: ToleranceBand[] | undefined } {
  const bands = coveringBands(doc.tolerance.bands, "tolerance.bands", f0, fN, file);
  const outerBands = doc.tolerance.outerLimits
    ? coveringBands(doc.tolerance.outerLimits, "tolerance.outerLimits", f0, fN, file)
    : undefined;
  if (outerBands) {
    // The file's index of each sorted outer band (coveringBands sorts the same way), for the error's key path.
    const fileIndex = doc.tolerance
      .outerLimits!.map((b, i) => ({ fromHz: b.fromHz, i }))
      .sort((a, b) => a.fromHz - b.fromHz)
      .map((x) => x.i);
    // Outer limits must lie on or outside the band at every frequency: check at every band edge and midpoint.
    const probes = [
      ...bands.flatMap((b) => [b.fromHz, b.toHz, (b.fromHz + b.toHz) / 2]),
      ...outerBands.flatMap((b) => [b.fromHz, b.toHz]),
    ];
    for (const f of probes) {
      const inner = bands.find((b) => f >= b.fromHz && f <= b.toHz);
      const o = outerBands.findIndex((b) => f >= b.fromHz && f <= b.toHz);
      if (!inner || o < 0) continue;
      if (outerBands[o]!.upperDb < inner.upperDb || outerBands[o]!.lowerDb < inner.lowerDb) {
        profileInvalid(
          file,
          `tolerance.outerLimits[${fileIndex[o]}]`,
          `outer limits at least as wide as the tolerance band at ${f} Hz (+${inner.upperDb}/-${inner.lowerDb} dB)`,
          `+${outerBands[o]!.upperDb}/-${outerBands[o]!.lowerDb} dB`,
        );
      }
    }
  }
  return { bands, outerBands };
}

/** The tones, each with a tolerance, inside the range, their frequency allowances apart. */
function profileTones(doc: ProfileDocument, f0: number, fN: number, file: string): ProfileTone[] {
  const tones = (doc.tones ?? []).map((t, i): ProfileTone => {
    const at = `tones[${i}]`;
    if (t.toleranceDb !== undefined && (t.upperDb !== undefined || t.lowerDb !== undefined))
      profileInvalid(file, at, "either toleranceDb or upperDb/lowerDb, not both", "both");
    if (t.toleranceDb === undefined && (t.upperDb === undefined || t.lowerDb === undefined))
      profileInvalid(
        file,
        at,
        "a tolerance: toleranceDb, or both upperDb and lowerDb",
        t.upperDb !== undefined || t.lowerDb !== undefined ? "only one of upperDb/lowerDb" : "none",
      );
    if (t.hz < f0 || t.hz > fN)
      profileInvalid(file, `${at}.hz`, `a tone inside the profile's range ${f0}–${fN} Hz`, String(t.hz));
    return {
      label: t.name ?? `tone at ${t.hz} Hz`,
      hz: t.hz,
      peak: t.peak,
      upperDb: t.toleranceDb ?? t.upperDb!,
      lowerDb: t.toleranceDb ?? t.lowerDb!,
      toleranceHz: t.toleranceHz ?? defaultToneToleranceHz(t.hz),
      index: i,
    };
  });
  const sorted = [...tones].sort((a, b) => a.hz - b.hz);
  for (let k = 1; k < sorted.length; k++) {
    const a = sorted[k - 1]!;
    const b = sorted[k]!;
    if (b.hz - b.toleranceHz <= a.hz + a.toleranceHz)
      profileInvalid(
        file,
        `tones[${b.index}].hz`,
        `tones whose frequency allowances do not overlap (tones[${a.index}] at ${a.hz} ± ${a.toleranceHz} Hz)`,
        `${b.hz} ± ${b.toleranceHz} Hz`,
      );
  }
  return tones;
}

/** Bands sorted by frequency that cover f0..fN without gaps or overlaps; errors name the key path. */
function coveringBands(
  list: ProfileDocument["tolerance"]["bands"],
  key: string,
  f0: number,
  fN: number,
  file: string,
): ToleranceBand[] {
  const bands = [...list].map((b, i) => ({ ...b, i })).sort((a, b) => a.fromHz - b.fromHz);
  for (const b of bands)
    if (!(b.toHz > b.fromHz))
      profileInvalid(file, `${key}[${b.i}].toHz`, `a frequency above fromHz ${b.fromHz}`, String(b.toHz));
  if (bands[0]!.fromHz > f0)
    profileInvalid(
      file,
      `${key}[${bands[0]!.i}].fromHz`,
      `bands that cover the profile from ${f0} Hz`,
      `a first band from ${bands[0]!.fromHz} Hz`,
    );
  for (let k = 1; k < bands.length; k++) {
    const a = bands[k - 1]!;
    const b = bands[k]!;
    if (b.fromHz < a.toHz)
      profileInvalid(
        file,
        `${key}[${b.i}].fromHz`,
        `bands that do not overlap (the previous band ends at ${a.toHz} Hz)`,
        String(b.fromHz),
      );
    if (b.fromHz > a.toHz)
      profileInvalid(
        file,
        `${key}[${b.i}].fromHz`,
        `bands without gaps (the previous band ends at ${a.toHz} Hz)`,
        String(b.fromHz),
      );
  }
  const last = bands[bands.length - 1]!;
  if (last.toHz < fN)
    profileInvalid(file, `${key}[${last.i}].toHz`, `bands that cover the profile up to ${fN} Hz`, String(last.toHz));
  return bands.map(({ fromHz, toHz, upperDb, lowerDb }) => ({ fromHz, toHz, upperDb, lowerDb }));
}

function keyPath(path: readonly PropertyKey[]): string {
  let s = "";
  for (const k of path) s += typeof k === "number" ? `[${k}]` : s === "" ? String(k) : `.${String(k)}`;
  return s === "" ? "(top level)" : s;
}

function describe(v: unknown): string {
  if (v === undefined) return "nothing";
  if (typeof v === "number" && !Number.isFinite(v)) return `${v} (YAML's .inf or .nan)`;
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
      // A key psdgate does not know is an error naming it, never silently ignored (a misspelt `tones` would drop the
      // tones).
      const key = issue.keys[0]!;
      const known = Object.keys(knownKeysAt(issue.path)).join(", ");
      profileInvalid(file, keyPath([...issue.path, key]), `a key psdgate knows here (${known})`, JSON.stringify(key));
    }
    const expected = issue.message
      .replace(/^Invalid input: expected /, "")
      .replace(/^Invalid option: expected one of /, "one of ");
    profileInvalid(file, keyPath(issue.path), expected, describe(valueAt(doc, issue.path)));
  }
  return r.data;
}

/**
 * The tolerance a two-column CSV profile gets, since the format has no place for one (common practice: a ±3 dB band is
 * the widest in general use; docs/REFERENCES.md sec. 7).
 */
export const CSV_PROFILE_DEFAULTS = { bandDb: 3, rmsDb: 1.5 } as const;

/**
 * Two-column CSV (Hz, level) breakpoints; an optional header may name the unit, e.g. `level [(m/s2)2/Hz]`.
 * Comma, semicolon or tab between the fields; with a semicolon or tab, a decimal comma is read too. A first row
 * is a header only when none of its fields is or starts with a number (a typo in the first breakpoint is an error,
 * never a header that drops it). Every error names the file's own line (comment and blank lines counted); `lines` holds the
 * line of each breakpoint, for the spec's errors.
 */
function profileFromCsv(text: string, file: string): { doc: unknown; defaults: string[]; lines: number[] } {
  const body = text.replace(/^\ufeff/, "");
  const all = body.split(/\r?\n/);
  const kept: number[] = [];
  all.forEach((l, i) => {
    if (l.trim() !== "" && !l.trim().startsWith("#")) kept.push(i);
  });
  const delimiter = kept.some((i) => all[i]!.includes(";"))
    ? ";"
    : kept.some((i) => all[i]!.includes("\t"))
      ? "\t"
      : ",";
  // One line at a time, so that each row keeps its line number (a profile's fields never span lines).
  const rows = kept.map((i) => Papa.parse<string[]>(all[i]!, { delimiter }).data[0] ?? []);
  const lineOf = (k: number) => kept[k]! + 1;
  const num = (f: string) => {
    const t = f.trim();
    if (t === "") return NaN;
    // Decimal numbers only: Number() would also read "0x14" as 20 and "0b1" as 1.
    return decimalNumber(delimiter !== "," ? t.replace(",", ".") : t);
  };
  let units = "g2/Hz";
  let start = 0;
  const first = rows[0];
  // A header names its columns: no field of it is, or starts with, a number ("20 Hz" is a breakpoint with its unit).
  if (first?.every((f) => Number.isNaN(num(f)) && !/^\s*[+-]?\.?\d/.test(f))) {
    units = csvProfileUnits(first, file, lineOf(0));
    start = 1;
  }
  const points = rows.slice(start).map((r, i) => {
    const line = lineOf(i + start);
    if (r.length !== 2)
      throw new InputError("PROFILE_CSV", {
        file,
        line,
        expected: "2 fields: frequency in Hz, level",
        received: `${r.length}`,
      });
    const [hz, level] = r.map(num);
    if (!Number.isFinite(hz!) || !Number.isFinite(level!))
      throw new InputError("PROFILE_CSV", {
        file,
        line,
        expected: "two numbers",
        received: describe(r.join(delimiter)),
      });
    return { hz: hz!, level: level! };
  });
  const f0 = points[0]?.hz ?? 1;
  const fN = points[points.length - 1]?.hz ?? 2;
  const d = CSV_PROFILE_DEFAULTS;
  return {
    doc: {
      title: file.replace(/^.*\//, ""),
      units,
      points,
      tolerance: { bands: [{ fromHz: f0, toHz: fN, upperDb: d.bandDb, lowerDb: d.bandDb }], rmsDb: d.rmsDb },
    },
    defaults: [
      `tolerance band ±${d.bandDb} dB and RMS tolerance ±${d.rmsDb} dB (a CSV profile has no place for them; use a JSON or YAML profile to set them)`,
      "no minimum DOF, resolution or duration",
    ],
    lines: points.map((_, i) => lineOf(i + start)),
  };
}

/** A PROFILE_INVALID error about points[i] of a CSV profile, with the file's line of that breakpoint added. */
function withCsvLine(e: unknown, lines: number[]): unknown {
  if (!(e instanceof InputError) || e.code !== "PROFILE_INVALID" || e.details.line !== undefined) return e;
  const m = /^points\[(\d+)\]/.exec(e.details.keyPath ?? "");
  const line = m ? lines[Number(m[1])] : undefined;
  return line === undefined ? e : new InputError("PROFILE_INVALID", { ...e.details, line });
}

/**
 * Read a profile's spec from its text (JSON, YAML or CSV by extension); compare/testProfile.ts parseProfile adds the
 * arithmetic.
 */
export function readProfileSpec(text: string, file: string): ProfileSpec {
  const sha = createHash("sha256").update(text).digest("hex");
  checkProfileSize(text, file);
  if (/\.csv$/i.test(file)) {
    const { doc, defaults, lines } = profileFromCsv(text, file);
    try {
      return profileSpec(validateProfileDocument(doc, file), file, sha, defaults);
    } catch (e) {
      throw withCsvLine(e, lines);
    }
  }
  const doc = strictDocument(
    text,
    file,
    { syntax: "PROFILE_SYNTAX", invalid: "PROFILE_INVALID", tooDeep: "PROFILE_TOO_LARGE" },
    !/\.ya?ml$/i.test(file),
    MAX_PROFILE_DEPTH,
  );
  return profileSpec(validateProfileDocument(doc, file), file, sha);
}

// ---- Limits on what a profile file may hold (issue #12): size, nesting, tags, number forms, finite arithmetic.

/** Deepest nesting of arrays and objects a profile may have; the format needs 3 (tolerance.bands[i]). */
export const MAX_PROFILE_DEPTH = 32;

/**
 * Size, checked on the text before any parser runs; nesting, tags and number forms are read/plainDocument.ts's rules.
 */
function checkProfileSize(text: string, file: string): void {
  if (text.length > MAX_PROFILE_BYTES) {
    throw new InputError("PROFILE_TOO_LARGE", {
      file,
      expected: `a profile of at most ${MAX_PROFILE_BYTES} bytes`,
      received: `${text.length} characters`,
    });
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
function csvProfileUnits(header: string[], file: string, line: number): string {
  const unitOf = (f: string) => /[[(]\s*([^\])]*(?:\)[^\])]*)?)\s*[\])]\s*$/.exec(f.trim())?.[1]?.trim();
  const norm = (u: string) =>
    u.replace(/\s+/g, "").replace(/\^/g, "").replace(/²/g, "2").replace(/⁴/g, "4").toLowerCase();
  const hzUnit = header[0] !== undefined ? unitOf(header[0]) : undefined;
  if (hzUnit !== undefined && norm(hzUnit) !== "hz") {
    throw new InputError("PROFILE_CSV", {
      file,
      line,
      column: 1,
      expected: "a frequency column in Hz",
      received: quotedShort(hzUnit),
    });
  }
  const levelUnit = header[1] !== undefined ? unitOf(header[1]) : undefined;
  if (levelUnit === undefined) return "g2/Hz";
  const u = norm(levelUnit);
  if (u === "g2/hz") return "g2/Hz";
  if (u === "(m/s2)2/hz" || u === "m2/s4/hz" || u === "(m/s/s)2/hz") return "(m/s2)2/Hz";
  throw new InputError("PROFILE_CSV", {
    file,
    line,
    column: 2,
    expected: "a level unit g2/Hz or (m/s2)2/Hz",
    received: quotedShort(levelUnit),
  });
}
