import {
  analyzeRecording,
  stationarityNote,
  type AnalysisOptions,
  type RecordingAnalysis,
} from "../pass/analyzeRecording.js";
import {
  parseProfile,
  profileMotion,
  type ProfileDocument,
  type ProfileMotion,
  type TestProfile,
} from "../compare/testProfile.js";
import { longestDeadRun } from "../compare/levelGate.js";
import { InputError, quoted } from "../errors.js";
import { damageSpectra } from "../estimate/response/damageSpectrum.js";
import {
  refuseDamageUnderflow,
  SMALLEST_NORMAL,
  SN_DEFAULTS,
  type SnCurve,
} from "../estimate/response/fatigueDamage.js";
import { clippedSpectrum, lineSpectrum, powerLawSpectrum } from "../estimate/response/inputSpectrum.js";
import { bandRms } from "../estimate/spectral/psdEstimate.js";
import { spectralKernel } from "../estimate/spectral/spectralKernel.js";
import { spectralWindow } from "../estimate/spectral/windows.js";
import {
  logToleranceLimit,
  MIN_TOLERANCE_SAMPLES,
  type LogToleranceLimit,
} from "../estimate/statistics/toleranceLimit.js";
import type { ServiceMix } from "../read/mixFile.js";
import type { ChannelName } from "../read/channelChoice.js";
import { fitDamageProfile, type Breakpoint } from "../synth/profileFit.js";
import { accelFactor, type AccelUnit } from "../units.js";
import type { Finding } from "../findings.js";

/**
 * `psdgate derive`: from field recordings to a lab test profile. Each recording's PSD on one resolution,
 * the field's envelope, service-weighted mean and statistical upper limit; the fatigue-damage spectrum
 * over the whole service life and the extreme-response spectrum; a profile of at most N breakpoints whose
 * damage over the test duration covers the field's at every natural frequency; and the profile document,
 * with tolerances, minimum DOF, resolution, duration and its provenance, ready for `check` and `synth`.
 */

/** Defaults, each stated where it is used. */
export const DERIVE_DEFAULTS = {
  /** Q = 10 (5 % damping): common practice for a fatigue-damage spectrum of equipment. */
  q: 10,
  /** Basquin b = 8: common practice for a relative FDS (choose the material's; respond uses the same). */
  basquinB: SN_DEFAULTS.basquinB,
  maxBreakpoints: 8,
  /** Natural frequencies per octave of the grid. */
  perOctave: 6,
  /** Test FDS >= field FDS x margin (1: no margin). */
  margin: 1,
  /** P95/50: the normal tolerance limit NASA-HDBK-7005 uses for field spectra (from memory). */
  coverage: 0.95,
  confidence: 0.5,
  /**
   * Warn where the test's expected largest response exceeds the field's by more than this factor (psdgate's default,
   * not a standard's).
   */
  extremeLimit: 1.5,
  /**
   * ±3 dB band and ±10 % RMS, 120 DOF: the tolerances recalled for IEC 60068-2-64 and MIL-STD-810H (from memory;
   * docs/REFERENCES.md sec. 7).
   */
  bandDb: 3,
  rmsPercent: 10,
  minDof: 120,
  /** Field PSD line spacing, Hz (when neither --resolution nor --segment is given). */
  resolutionHz: 1,
} as const;

export interface FieldRecordingInput {
  file: string;
  /** The group (road type, mission phase) it belongs to. */
  group: string;
  fromS?: number | undefined;
  toS?: number | undefined;
}

export interface DeriveOptions {
  recordings: FieldRecordingInput[];
  /** Service time of each group, s; every recording's group must be here. */
  groups: { name: string; serviceS: number }[];
  /** How the life was shared: by a mix file's hours, or by the recordings' durations. */
  lifeRule: "mix file hours" | "recorded durations";
  mix?: Pick<ServiceMix, "file" | "sha256"> | undefined;
  testDurationS: number;
  analysis?: AnalysisOptions | undefined;
  /**
   * The one channel of each recording used, as a list of one (default the first): `channels`, as every command spells
   * it.
   */
  channels?: ChannelName[] | undefined;
  q?: number | undefined;
  basquinB?: number | undefined;
  maxBreakpoints?: number | undefined;
  margin?: number | undefined;
  /** The band of the profile and of the natural-frequency grid (`fminHz`/`fmaxHz`, as psd and respond spell it). */
  fminHz?: number | undefined;
  fmaxHz?: number | undefined;
  perOctave?: number | undefined;
  coverage?: number | undefined;
  toleranceConfidence?: number | undefined;
  extremeLimit?: number | undefined;
  /**
   * Where the field's FDS and ERS come from: "psd" (default: narrow-band damage and Davenport's peak of each
   * recording's PSD) or "time" (each recording filtered through each SDOF in time: rainflow damage and its largest
   * response, as respond does for a recording; the shocks a Gaussian PSD hides are kept).
   */
  fieldDamage?: "psd" | "time" | undefined;
  bandDb?: number | undefined;
  rmsPercent?: number | undefined;
  minDof?: number | undefined;
  title?: string | undefined;
  /** Rated peak-to-peak stroke of the exciter, mm, to check the profile's displacement estimate against. */
  strokeMm?: number | undefined;
  version: string;
  created: Date;
  /** File name the profile will be written to (its `file` in the parsed profile). */
  outFile?: string | undefined;
}

export interface FieldRecordingResult {
  file: string;
  sha256: string;
  group: string;
  channel: string;
  /** Analysed duration (the --from/--to window), s. */
  durationS: number;
  /** Service time this recording stands for, s. */
  serviceS: number;
  sampleRateHz: number;
  dof: number;
  averages: number;
  /** RMS over the profile's band, in `units`. */
  bandRms: number;
  stationary: boolean | undefined;
  /** NOT_STATIONARY when the recording failed the stationarity test. */
  stationarityNote: Finding | undefined;
  psd: Float64Array;
  /**
   * Damage over its service time and expected largest response over it, per f_n (from the PSD, or in time with
   * fieldDamage "time").
   */
  damage: Float64Array;
  extreme: Float64Array;
  /**
   * With fieldDamage "time": the PSD's narrow-band damage and Davenport peak beside them, and the record's kurtosis.
   */
  fromPsd?: { damage: Float64Array; extreme: Float64Array; kurtosis: number } | undefined;
}

export interface FieldShocks {
  /**
   * Each natural frequency's largest maximax SRS over the recordings' whole records (NaN above a recording's fs/4,
   * where none is computed).
   */
  fieldSrs: Float64Array;
  /**
   * The largest events over all recordings, largest |peak| first (at most 5); `recording` indexes `recordings` (not a
   * path, so a re-run elsewhere compares alike).
   */
  largestEvents: { recording: number; timeS: number; peak: number; durationS: number }[];
  /**
   * Events found in each recording, in the order of `recordings` (threshold 6 x its background r.m.s., hold 0.05 s).
   */
  eventsPerRecording: number[];
  /** Natural frequencies where the test's expected largest response falls below the field's measured one. */
  shortfallHz: number[];
}

export interface DeriveResult {
  units: AccelUnit;
  lifeS: number;
  lifeRule: DeriveOptions["lifeRule"];
  testDurationS: number;
  groups: { name: string; serviceS: number; damageShare: Float64Array }[];
  recordings: FieldRecordingResult[];
  /** The field's lines (common to every recording) and their spacing. */
  frequencyHz: Float64Array;
  lineSpacingHz: number;
  band: { fromHz: number; toHz: number };
  envelope: Float64Array;
  /** Service-weighted mean PSD: each recording weighted by its share of the life. */
  mean: Float64Array;
  /** The normal tolerance limit on log10 PSD, or why it was not computed. */
  tolerance: LogToleranceLimit | { n: number; coverage: number; confidence: number; missing: Finding };
  fnHz: Float64Array;
  q: number;
  sn: SnCurve;
  margin: number;
  fieldFatigue: Float64Array;
  testFatigue: Float64Array;
  fieldExtreme: Float64Array;
  testExtreme: Float64Array;
  /** testExtreme / fieldExtreme, and the f_n where it exceeds `extremeLimit`. */
  extremeRatio: Float64Array;
  extremeLimit: number;
  extremeWarnings: number[];
  fit: {
    maxBreakpoints: number;
    minRatio: number;
    minRatioHz: number;
    maxRatio: number;
    medianRatio: number;
    scale: number;
  };
  /** The field's shocks (as `psdgate shock` finds them) against the random test's largest response. */
  shocks: FieldShocks;
  /**
   * Time compression: the flat-spectrum factor (T_field / T_test)^(2/b) and the profile's RMS against the mean field's.
   */
  compression: { flatFactor: number; profileRms: number; meanFieldRms: number; rmsRatio: number };
  /** What the derivation notes, as findings (report/findingTexts.ts says them). */
  notes: Finding[];
  /** The profile's velocity and displacement in closed form (peak-to-peak 6 x RMS, common practice). */
  motion: ProfileMotion;
  /** The displacement against the exciter's rated stroke, when given. */
  stroke?: { ratedMm: number; estimateMm: number; margin: number; withinRating: boolean } | undefined;
  /**
   * Lines standing far above their neighbours in a field recording (estimate/spectral/toneEstimate.ts spectralTones):
   * candidate sine tones for a mixed-mode lab profile. Their lines are replaced by the background around them before
   * the envelope, mean, tolerance limit and damage, so the random profile is not fitted to them.
   */
  candidateTones: { file: string; frequencyHz: number; peak: number; aboveBackgroundDb: number }[];
  /** The profile document as written, and as psdgate reads it back. */
  document: ProfileDocument;
  profile: TestProfile;
}

function checkRange(option: string, v: number, ok: boolean, expected: string): void {
  if (!ok || !Number.isFinite(v)) throw new InputError("OPTION_INVALID", { option, expected, received: String(v) });
}

/** Natural-frequency grid from a to b, n per octave, both ends included. */
export function octaveGrid(a: number, b: number, n: number): Float64Array {
  const count = Math.floor(n * Math.log2(b / a) + 1e-9) + 1;
  const out = Array.from({ length: count }, (_, i) => a * 2 ** (i / n));
  if (b / out[count - 1]! > 1 + 1e-9) out.push(b);
  return Float64Array.from(out);
}

function segmentsOf(points: readonly Breakpoint[]) {
  return points.slice(1).map((p, i) => {
    const a = points[i]!;
    return { f1: a.hz, f2: p.hz, g1: a.level, exponent: Math.log(p.level / a.level) / Math.log(p.hz / a.hz) };
  });
}

/** Mean of the lines within a factor `half` either side of f (the nearest line when none falls inside). */
function cellMean(f: Float64Array, g: Float64Array, at: number, half: number): number {
  let s = 0;
  let n = 0;
  let nearest = 0;
  for (let k = 1; k < f.length; k++) {
    if (Math.abs(f[k]! - at) < Math.abs(f[nearest]! - at)) nearest = k;
    if (f[k]! >= at / half && f[k]! <= at * half) {
      s += g[k]!;
      n++;
    }
  }
  return n > 0 ? s / n : g[nearest]!;
}

/** derive's settings with their defaults, each checked. */
function deriveSettings(o: DeriveOptions) {
  const q = o.q ?? DERIVE_DEFAULTS.q;
  const b = o.basquinB ?? DERIVE_DEFAULTS.basquinB;
  const nMax = o.maxBreakpoints ?? DERIVE_DEFAULTS.maxBreakpoints;
  const margin = o.margin ?? DERIVE_DEFAULTS.margin;
  const perOctave = o.perOctave ?? DERIVE_DEFAULTS.perOctave;
  const coverage = o.coverage ?? DERIVE_DEFAULTS.coverage;
  const confidence = o.toleranceConfidence ?? DERIVE_DEFAULTS.confidence;
  const extremeLimit = o.extremeLimit ?? DERIVE_DEFAULTS.extremeLimit;
  checkRange("q", q, q > 0.5 && q <= 1000, "a Q above 0.5 and at most 1000");
  checkRange("basquinB", b, b >= 1 && b <= 30, "a Basquin exponent b from 1 to 30");
  checkRange(
    "maxBreakpoints",
    nMax,
    Number.isInteger(nMax) && nMax >= 2 && nMax <= 40,
    "a whole number of breakpoints from 2 to 40",
  );
  checkRange("margin", margin, margin >= 1 && margin <= 1e6, "a damage margin factor from 1 (none) up");
  checkRange(
    "perOctave",
    perOctave,
    Number.isInteger(perOctave) && perOctave >= 1 && perOctave <= 24,
    "1 to 24 natural frequencies per octave",
  );
  checkRange("coverage", coverage, coverage > 0.5 && coverage < 1, "a coverage between 0.5 and 1, e.g. 0.95");
  checkRange(
    "toleranceConfidence",
    confidence,
    confidence > 0 && confidence < 1,
    "a confidence between 0 and 1, e.g. 0.5",
  );
  checkRange("extremeLimit", extremeLimit, extremeLimit >= 1, "a factor of at least 1");
  checkRange("testDurationS", o.testDurationS, o.testDurationS > 0, "a test duration above 0");
  if (o.recordings.length === 0)
    throw new InputError("NO_FILES", { expected: "at least one field recording", received: "none" });
  const sn: SnCurve = { ...SN_DEFAULTS, basquinB: b };
  return { q, b, nMax, margin, perOctave, coverage, confidence, extremeLimit, sn };
}

/**
 * Step 1: each recording's PSD, one channel, on one resolution, in one unit; recordings whose lines or units differ are
 * refused.
 */
/**
 * The same samples listed twice (one file named twice, or two copies of it, with windows that overlap): the field's
 * tolerance limit would count them as independent recordings and shrink on no spread at all.
 */
function repeatedRecording(o: DeriveOptions, first: string, second: string, a: RecordingAnalysis): InputError {
  return new InputError(o.mix ? "MIX_INVALID" : "OPTION_INVALID", {
    file: o.mix?.file,
    option: o.mix ? undefined : "recordings",
    expected: "each field recording once (the field's tolerance limit takes the recordings as independent)",
    received: `${quoted(first)} and ${quoted(second)}: the same samples (SHA-256 ${a.input.sha256.slice(0, 12)}…, windows that overlap)`,
  });
}

async function analyseField(o: DeriveOptions) {
  if ((o.channels?.length ?? 0) > 1)
    throw new InputError("OPTION_INVALID", {
      option: "channels",
      expected: "one channel",
      received: o.channels!.join(", "),
    });
  const channel = o.channels?.[0] ?? "1";
  const base: AnalysisOptions = { ...o.analysis, resultUnits: o.analysis?.resultUnits ?? "g" };
  if (base.resolutionHz === undefined && base.segmentLength === undefined)
    base.resolutionHz = DERIVE_DEFAULTS.resolutionHz;
  const analysed: { r: FieldRecordingInput; a: RecordingAnalysis; c: RecordingAnalysis["channels"][number] }[] = [];
  for (const r of o.recordings) {
    const a = await analyzeRecording(r.file, {
      ...base,
      channels: [channel],
      fromS: r.fromS ?? base.fromS,
      toS: r.toS ?? base.toS,
      fminHz: undefined,
      fmaxHz: undefined,
    });
    const c = a.channels[0]!;
    if (c.psd.averages === 0) {
      throw new InputError("RECORD_TOO_SHORT", {
        file: r.file,
        expected: `at least one segment of ${a.settings.segmentLength} samples`,
        received: `${a.window.frames} samples`,
        hint: "use a shorter `segmentLength` or a coarser `resolutionHz`",
      });
    }
    const again = analysed.find(
      (x) =>
        x.a.input.sha256 === a.input.sha256 &&
        Math.max(x.a.window.fromS, a.window.fromS) < Math.min(x.a.window.toS, a.window.toS),
    );
    if (again) throw repeatedRecording(o, again.r.file, r.file, a);
    analysed.push({ r, a, c });
  }
  const first = analysed[0]!;
  const df = first.c.psd.lineSpacingHz;
  for (const x of analysed) {
    if (Math.abs(x.c.psd.lineSpacingHz / df - 1) > 1e-9) {
      throw new InputError("RECORDINGS_UNLIKE", {
        file: x.r.file,
        expected: `the line spacing of ${first.r.file}, ${df} Hz (record at one sample rate, or give \`segmentLength\` for each rate's lines)`,
        received: `${x.c.psd.lineSpacingHz} Hz`,
      });
    }
    if (x.c.units !== first.c.units)
      throw new InputError("RECORDINGS_UNLIKE", {
        file: x.r.file,
        expected: `results in ${first.c.units}`,
        received: x.c.units,
      });
  }
  return { channel, base, analysed, first, df };
}

/**
 * Step 4b's figures: each recording's shock spectrum of the whole record (natural frequencies above its fs/4 left out),
 * the largest at each f_n, and the events.
 */
async function fieldShockSpectra(
  analysed: { r: FieldRecordingInput; a: RecordingAnalysis }[],
  base: AnalysisOptions,
  channel: ChannelName,
  fnHz: Float64Array,
  q: number,
  notes: Finding[],
) {
  const n = fnHz.length;
  const { shockRecording } = await import("./shockRecording.js");
  const fieldSrs = new Float64Array(n).fill(NaN);
  const events: FieldShocks["largestEvents"] = [];
  const eventsPerRecording: FieldShocks["eventsPerRecording"] = [];
  for (const [index, { r, a }] of analysed.entries()) {
    const keep = [...fnHz.keys()].filter((i) => fnHz[i]! <= a.input.sampleRateHz / 4);
    if (keep.length === 0) {
      eventsPerRecording.push(0);
      continue;
    }
    const sr = await shockRecording(r.file, {
      ...base,
      channels: [channel],
      fromS: r.fromS ?? base.fromS,
      toS: r.toS ?? base.toS,
      fminHz: undefined,
      fmaxHz: undefined,
      fnHz: keep.map((i) => fnHz[i]!),
      q,
    });
    const ch = sr.channels[0]!;
    // A baseline that drifts (a tilting sensor) puts the threshold near the background where it drifts most: the
    // events found there, and the field SRS they feed, may be drift and noise. Said as `psdgate shock` says it.
    for (const d of sr.doubts)
      if (d.code === "BASELINE_DRIFT") notes.push({ ...d, about: { ...d.about, file: r.file } });
    keep.forEach((i, k) => {
      const v = ch.srs.maximax[k]!;
      fieldSrs[i] = Number.isNaN(fieldSrs[i]!) ? v : Math.max(fieldSrs[i]!, v);
    });
    eventsPerRecording.push(ch.events.length);
    for (const e of ch.events) events.push({ recording: index, timeS: e.timeS, peak: e.peak, durationS: e.durationS });
  }
  events.sort((x, y) => Math.abs(y.peak) - Math.abs(x.peak) || x.recording - y.recording || x.timeS - y.timeS);
  return { fieldSrs, events, eventsPerRecording };
}

/**
 * The field's damage in time (fieldDamage "time"), per recording (keyed by file and window): rainflow damage per second
 * of record, and its largest response grown to a service time.
 */
interface TimeDamage {
  damage: Float64Array;
  extreme: (serviceS: number) => Float64Array;
}

async function fieldTimeDamage(
  analysed: { r: FieldRecordingInput }[],
  base: AnalysisOptions,
  channel: ChannelName,
  band: { fromHz: number; toHz: number },
  fnHz: Float64Array,
  q: number,
  sn: SnCurve,
): Promise<Map<string, TimeDamage>> {
  const { fromHz, toHz } = band;
  const timeDamage = new Map<string, TimeDamage>();
  const { loadSpectrumSource, responseSpectra } = await import("./responseSpectra.js");
  for (const { r } of analysed) {
    const src = await loadSpectrumSource(r.file, {
      ...base,
      as: "recording",
      channels: [channel],
      fromS: r.fromS ?? base.fromS,
      toS: r.toS ?? base.toS,
      fminHz: fromHz,
      fmaxHz: toHz,
      response: { fnHz, q, basquinB: sn.basquinB },
    });
    const t = src.timeResponse!;
    const perSecond = responseSpectra(src, {
      fnHz,
      q,
      durationS: t.recordS,
      sn: { ...sn, stressPerUnit: 1, snConstant: 1 },
    });
    const td = perSecond.timeDomain!;
    timeDamage.set(r.file + "\u0000" + (r.fromS ?? "") + "\u0000" + (r.toS ?? ""), {
      damage: td.recordDamage.map((d) => d / t.recordS),
      extreme: (serviceS) => responseSpectra(src, { fnHz, q, durationS: serviceS, sn }).extremePeak,
    });
  }
  return timeDamage;
}

/**
 * Step 4's fit: the profile's breakpoints whose damage over the test covers the field's times the margin, from two
 * starts (the field's mean shape, flat).
 */
function fitProfile(g: {
  fieldFatigue: Float64Array;
  mean: Float64Array;
  frequencyHz: Float64Array;
  fnHz: Float64Array;
  fromHz: number;
  toHz: number;
  perOctave: number;
  margin: number;
  q: number;
  b: number;
  sn: SnCurve;
  toSi: number;
  nMax: number;
  lifeS: number;
  testDurationS: number;
}) {
  const { fieldFatigue, mean, frequencyHz, fnHz, fromHz, toHz, perOctave, margin, q, b, sn, toSi, nMax, lifeS } = g;
  const o = { testDurationS: g.testDurationS };
  const n = fnHz.length;
  const target = fieldFatigue.map((d) => d * margin);
  const test = { fnHz, q, durationS: o.testDurationS, sn, toSi };
  // The inverted FDS, with the field's own mean spectrum as the reference shape: G_inv(f_n) = G_mean(f_n) (D_target /
  // D_mean)^(2/b), D_mean the mean spectrum's damage over the test. Where the damage at f_n comes from elsewhere in the
  // spectrum (the quasi-static response to a low-frequency peak), this keeps the level at f_n near the field's instead
  // of loading it all there. A flat reference is the second start (the local Miles inversion); the fit keeps whichever
  // ends with less over-test.
  const ref = damageSpectra(clippedSpectrum(lineSpectrum(frequencyHz, mean, fromHz, toHz), fromHz, toHz), test).damage;
  const fromMean = target.map(
    (d, i) => cellMean(frequencyHz, mean, fnHz[i]!, 2 ** (1 / (2 * perOctave))) * (d / ref[i]!) ** (2 / b),
  );
  const flatRef = damageSpectra(powerLawSpectrum([{ f1: fromHz, f2: toHz, g1: 1, exponent: 0 }]), test).damage;
  const fromFlat = target.map((d, i) => (d / flatRef[i]!) ** (2 / b));
  // A test so short (or a life so long) that the levels it needs overflow has no profile: name the durations. (The
  // field's damage is a normal double here, checkFieldDamage; a reference damage over the test below the smallest
  // normal double, which keeps fewer digits, is the life-to-test ratio's doing.)
  for (let i = 0; i < n; i++) {
    const refsHeld = ref[i]! >= SMALLEST_NORMAL && flatRef[i]! >= SMALLEST_NORMAL;
    if (
      !refsHeld ||
      !(fromMean[i]! > 0 && Number.isFinite(fromMean[i]!) && fromFlat[i]! > 0 && Number.isFinite(fromFlat[i]!))
    ) {
      throw new InputError("OPTION_INVALID", {
        option: "testDurationS",
        expected: `a test duration over which a finite level covers the field's damage (life ${lifeS} s)`,
        received: `${o.testDurationS} s (the starting levels at ${Number(fnHz[i]!.toPrecision(4))} Hz would be ${fromMean[i]} and ${fromFlat[i]})`,
        hint: "give the test's real duration (e.g. 1h); the life-to-test ratio sets the levels",
      });
    }
  }
  const fit = fitDamageProfile({
    fnHz,
    targetDamage: target,
    startLevels: [fromMean, fromFlat],
    basquinB: b,
    maxBreakpoints: nMax,
    damageOf: (pts) => damageSpectra(powerLawSpectrum(segmentsOf(pts)), test).damage,
  });
  return { fit, test };
}

/** Step 5: the profile document (tolerances, DOF, resolution, duration and provenance), as it will be written. */
function profileDocumentOf(
  o: DeriveOptions,
  g: {
    lifeS: number;
    q: number;
    b: number;
    margin: number;
    nMax: number;
    fromHz: number;
    toHz: number;
    perOctave: number;
    channel: ChannelName;
    df: number;
    settings: RecordingAnalysis["settings"];
    coverage: number;
    confidence: number;
    extremeLimit: number;
    fieldDamage: "psd" | "time";
    units: AccelUnit;
    fit: { points: Breakpoint[] };
    recordings: FieldRecordingResult[];
  },
): ProfileDocument {
  const {
    lifeS,
    q,
    b,
    margin,
    nMax,
    fromHz,
    toHz,
    perOctave,
    channel,
    df,
    coverage,
    confidence,
    extremeLimit,
    fieldDamage,
    units,
    fit,
    recordings,
  } = g;
  const first = { a: { settings: g.settings } };
  const bandDb = o.bandDb ?? DERIVE_DEFAULTS.bandDb;
  const rmsPercent = o.rmsPercent ?? DERIVE_DEFAULTS.rmsPercent;
  const minDof = o.minDof ?? DERIVE_DEFAULTS.minDof;
  checkRange("bandDb", bandDb, bandDb > 0 && bandDb <= 20, "a tolerance band in dB above 0 and at most 20");
  checkRange(
    "rmsPercent",
    rmsPercent,
    rmsPercent > 0 && rmsPercent < 99,
    "an RMS tolerance in percent above 0 and below 99",
  );
  checkRange("minDof", minDof, minDof > 0, "a minimum DOF above 0");
  const unitText = units === "g" ? "g2/Hz" : "(m/s2)2/Hz";
  const parameters: Record<string, number | string | boolean | null> = {
    lifeS,
    lifeHours: lifeS / 3600,
    lifeRule: o.lifeRule,
    testDurationS: o.testDurationS,
    q,
    basquinB: b,
    damageMargin: margin,
    maxBreakpoints: nMax,
    fnGrid: `${fromHz}:${toHz}:${perOctave} (Hz, per octave)`,
    fromHz,
    toHz,
    channel: String(channel),
    resolutionHz: df,
    window: first.a.settings.window,
    segmentLength: first.a.settings.segmentLength,
    overlap: first.a.settings.overlap,
    detrend: first.a.settings.detrend,
    toleranceCoverage: coverage,
    toleranceConfidence: confidence,
    extremeLimit,
    bandDb,
    rmsPercent,
    minDof,
    ...(fieldDamage === "time" ? { fieldDamage } : {}),
  };
  const document: ProfileDocument = {
    title:
      o.title ??
      `Derived profile: ${o.groups.map((g) => g.name).join(" + ")}, ${(lifeS / 3600).toPrecision(4)} h in ${o.testDurationS} s`,
    units: unitText,
    points: fit.points.map((p) => ({ hz: p.hz, level: p.level })),
    tolerance: {
      bands: [
        { fromHz: fit.points[0]!.hz, toHz: fit.points[fit.points.length - 1]!.hz, upperDb: bandDb, lowerDb: bandDb },
      ],
      rmsPercent,
    },
    minDof,
    resolutionHz: df,
    durationS: o.testDurationS,
    description: `Fatigue-equivalent test: its fatigue-damage spectrum over ${o.testDurationS} s covers the field's over ${(lifeS / 3600).toPrecision(5)} h of service (Q ${q}, Basquin b ${b}, damage margin ${margin}) at every natural frequency from ${fromHz} to ${toHz} Hz. For review under the governing standard's tailoring process by a qualified engineer.`,
    provenance: {
      derivedBy: `psdgate ${o.version} derive`,
      created: o.created.toISOString(),
      method:
        fieldDamage === "time"
          ? "field FDS from the recordings in time: each filtered through a linear SDOF (ramp-invariant filters), rainflow (ASTM E1049-85) Miner damage of the relative displacement, times service time over record length, summed over groups; test FDS narrow-band Miner damage of the profile (Rayleigh peaks); breakpoints fitted on log-log axes to cover the field's over the test duration"
          : "narrow-band Miner damage of a linear SDOF (relative displacement, Rayleigh peaks), field FDS = sum over groups of damage rate x service time; breakpoints fitted on log-log axes to cover it over the test duration",
      inputs: [
        ...recordings.map((r) => ({
          file: r.file,
          sha256: r.sha256,
          role: "recording",
          group: r.group,
          serviceHours: r.serviceS / 3600,
          durationS: r.durationS,
        })),
        ...(o.mix ? [{ file: o.mix.file, sha256: o.mix.sha256, role: "mix" }] : []),
      ],
      parameters,
    },
  };
  return document;
}

/**
 * The lines the recordings share, the band (fminHz/fmaxHz or the defaults, checked against the lines and the lowest
 * Nyquist), its natural frequencies and unit.
 */
function fieldBand(
  o: DeriveOptions,
  analysed: { a: RecordingAnalysis; c: RecordingAnalysis["channels"][number] }[],
  perOctave: number,
  df: number,
) {
  const first = analysed[0]!;
  const lines = Math.min(...analysed.map((x) => x.c.psd.frequencyHz.length));
  const frequencyHz = first.c.psd.frequencyHz.slice(0, lines);
  const topHz = frequencyHz[lines - 1]!;
  const minRate = Math.min(...analysed.map((x) => x.a.input.sampleRateHz));
  const fromHz = o.fminHz ?? Math.max(5, 4 * df);
  const toHz = o.fmaxHz ?? Math.min(2000, 0.4 * minRate);
  checkRange("fminHz", fromHz, fromHz >= 2 * df, `a lower band edge of at least 2 lines (${2 * df} Hz)`);
  checkRange(
    "fmaxHz",
    toHz,
    toHz > fromHz * 1.5 && toHz <= topHz - df,
    `an upper band edge above 1.5 x \`fminHz\` (${fromHz} Hz) and at most ${topHz - df} Hz (below the lowest Nyquist frequency)`,
  );
  const fnHz = octaveGrid(fromHz, toHz, perOctave);
  const units = first.c.units;
  const toSi = accelFactor(units, "m/s2");
  return { lines, frequencyHz, fromHz, toHz, fnHz, units, toSi };
}

/** Step 2: each group's service time, and the analysed duration of its recordings (their share of it), and the life. */
function serviceShare(o: DeriveOptions, analysed: { r: FieldRecordingInput; a: RecordingAnalysis }[]) {
  const groupTime = new Map(o.groups.map((g) => [g.name, g.serviceS]));
  const groupDur = new Map<string, number>();
  for (const x of analysed)
    groupDur.set(x.r.group, (groupDur.get(x.r.group) ?? 0) + x.a.window.frames / x.a.input.sampleRateHz);
  const lifeS = o.groups.reduce((s, g) => s + g.serviceS, 0);
  checkRange("lifeS", lifeS, lifeS > 0, "a service life above 0");
  return { groupTime, groupDur, lifeS };
}

/** The `fieldDamage` option checked: where the field's FDS and ERS come from ("psd" unless "time" is given). */
function fieldDamageMode(o: DeriveOptions): "psd" | "time" {
  const fieldDamage = o.fieldDamage ?? "psd";
  if (fieldDamage !== "psd" && fieldDamage !== "time")
    throw new InputError("OPTION_INVALID", {
      option: "fieldDamage",
      expected: "psd or time",
      received: String(fieldDamage),
    });
  return fieldDamage;
}

/** A recording as step 1 analysed it: its input, its analysis and its one channel. */
type AnalysedRecording = { r: FieldRecordingInput; a: RecordingAnalysis; c: RecordingAnalysis["channels"][number] };

/**
 * What each recording's step 2 shares: the lines and band, the grid, the S-N curve, the service split and the damage in
 * time.
 */
interface FieldContext {
  lines: number;
  frequencyHz: Float64Array;
  df: number;
  fromHz: number;
  toHz: number;
  fnHz: Float64Array;
  q: number;
  sn: SnCurve;
  toSi: number;
  groupTime: Map<string, number>;
  groupDur: Map<string, number>;
  lifeS: number;
  timeDamage: Map<string, TimeDamage>;
}

/**
 * The field's sums, filled recording by recording: FDS, ERS, service-weighted mean PSD, envelope, notes and candidate
 * tones.
 */
interface FieldSums {
  fieldFatigue: Float64Array;
  fieldExtreme: Float64Array;
  mean: Float64Array;
  envelope: Float64Array;
  notes: Finding[];
  candidateTones: DeriveResult["candidateTones"];
}

/** No figures from no data: a recording with no vibration in the band (all zero, constant) has no damage to cover. */
function refuseSilentRecording(file: string, psd: Float64Array, g: FieldContext): void {
  const { lines, frequencyHz, fromHz, toHz } = g;
  let inBand = 0;
  for (let k = 0; k < lines; k++)
    if (frequencyHz[k]! >= fromHz && frequencyHz[k]! <= toHz && psd[k]! > 0 && Number.isFinite(psd[k]!)) inBand++;
  if (inBand === 0) {
    throw new InputError("NO_VIBRATION", {
      file,
      expected: `vibration between ${fromHz} and ${toHz} Hz to derive a profile from`,
      received: "a PSD of zero at every line in the band (a recording that is all zero or constant)",
    });
  }
}

/**
 * Field tones out of the random part: the lines within the kernel's reach of each candidate take the background around
 * it (psd changed in place).
 */
function removeFieldTones(
  { r, a, c }: AnalysedRecording,
  psd: Float64Array,
  g: FieldContext,
  candidateTones: DeriveResult["candidateTones"],
): void {
  const { lines, fromHz, toHz, df } = g;
  const reach =
    Math.ceil(
      spectralKernel(a.settings.window, spectralWindow(a.settings.window, a.settings.segmentLength), a.settings.detrend)
        .halfWidthBins,
    ) + 1;
  for (const t of c.tones) {
    if (t.frequencyHz < fromHz || t.frequencyHz > toHz) continue;
    candidateTones.push({
      file: r.file,
      frequencyHz: t.frequencyHz,
      peak: t.peak,
      aboveBackgroundDb: t.aboveBackgroundDb,
    });
    const k0 = Math.round(t.frequencyHz / df);
    for (let k = Math.max(1, k0 - reach); k <= Math.min(lines - 1, k0 + reach); k++)
      psd[k] = Math.min(psd[k]!, t.backgroundDensity);
  }
}

/**
 * Step 2 for one recording: its service time, its PSD without field tones, its damage and largest response (added to
 * the field's sums), its notes.
 */
function fieldRecording(x: AnalysedRecording, g: FieldContext, sums: FieldSums): FieldRecordingResult {
  const { r, a, c } = x;
  const { lines, frequencyHz, fromHz, toHz, fnHz, lifeS, df } = g;
  const n = fnHz.length;
  const durationS = a.window.frames / a.input.sampleRateHz;
  const serviceS = (g.groupTime.get(r.group) ?? 0) * (durationS / g.groupDur.get(r.group)!);
  const psd = c.psd.psd.slice(0, lines);
  refuseSilentRecording(r.file, psd, g);
  removeFieldTones(x, psd, g, sums.candidateTones);
  const ds0 = damageSpectra(clippedSpectrum(lineSpectrum(frequencyHz, psd, fromHz, toHz), fromHz, toHz), {
    fnHz,
    q: g.q,
    durationS: serviceS,
    sn: g.sn,
    toSi: g.toSi,
  });
  const timeFigures = g.timeDamage.get(r.file + "\u0000" + (r.fromS ?? "") + "\u0000" + (r.toS ?? ""));
  const ds = timeFigures
    ? { damage: timeFigures.damage.map((d) => d * serviceS), extreme: timeFigures.extreme(serviceS) }
    : ds0;
  for (let i = 0; i < n; i++) {
    sums.fieldFatigue[i] = sums.fieldFatigue[i]! + ds.damage[i]!;
    sums.fieldExtreme[i] = Math.max(sums.fieldExtreme[i]!, ds.extreme[i]!);
  }
  for (let k = 0; k < lines; k++) {
    sums.mean[k] = sums.mean[k]! + (psd[k]! * serviceS) / lifeS;
    sums.envelope[k] = Math.max(sums.envelope[k]!, psd[k]!);
  }
  const note = stationarityNote(c.stationarity);
  if (note) sums.notes.push({ ...note, about: { file: r.file } });
  // The pass's data doubts on this recording (a dead channel, NaN runs, clipping, a Parseval mismatch, the amplitude
  // gates), and a stretch with no signal at all (a logger that froze or dropped out): the field PSD, damage and largest
  // response take the recording as it is, so each is said, named by file, as psdgate psd and ride say it.
  for (const d of c.doubts) sums.notes.push({ ...d, about: { ...d.about, file: r.file } });
  const dead =
    c.stretchMeanSquares && !c.doubts.some((d) => d.code === "NO_SIGNAL")
      ? longestDeadRun(c.stretchMeanSquares)
      : undefined;
  if (dead) {
    const s = c.stationarity.stretchS;
    sums.notes.push({
      code: "DEAD_STRETCH",
      values: { fromS: a.window.fromS + dead.from * s, toS: a.window.fromS + dead.to * s },
      about: { file: r.file },
    });
  }
  if (c.reading.fullScaleAssumed)
    sums.notes.push({ code: "FULL_SCALE_ASSUMED", values: {}, about: { file: r.file, unit: c.reading.fileUnit } });
  return {
    file: r.file,
    sha256: a.input.sha256,
    group: r.group,
    channel: c.name,
    durationS,
    serviceS,
    sampleRateHz: a.input.sampleRateHz,
    dof: c.psd.dof,
    averages: c.psd.averages,
    bandRms: bandRms({ psd, frequencyHz, lineSpacingHz: df }, fromHz, toHz),
    stationary: c.stationarity.tested ? c.stationarity.stationary : undefined,
    stationarityNote: note,
    psd,
    damage: ds.damage,
    extreme: ds.extreme,
    fromPsd: timeFigures ? { damage: ds0.damage, extreme: ds0.extreme, kurtosis: c.stats.kurtosis } : undefined,
  };
}

/**
 * The field's damage and largest response must be finite and above 0 at every natural frequency, or the life is named
 * (or b, where the damage underflowed while the response is there).
 */
function checkFieldDamage(sums: FieldSums, fnHz: Float64Array, lifeS: number, b: number): void {
  const { fieldFatigue, fieldExtreme } = sums;
  for (let i = 0; i < fnHz.length; i++) {
    if (fieldExtreme[i]! > 0 && Number.isFinite(fieldExtreme[i]!))
      refuseDamageUnderflow(fieldFatigue[i]!, fnHz[i]!, b, "the field's damage", "fmaxHz");
    if (
      !(
        fieldFatigue[i]! > 0 &&
        Number.isFinite(fieldFatigue[i]!) &&
        fieldExtreme[i]! > 0 &&
        Number.isFinite(fieldExtreme[i]!)
      )
    ) {
      throw new InputError("OPTION_INVALID", {
        option: "lifeS",
        expected: "a service life over which the field's damage is a finite number above 0 at every natural frequency",
        received: `${lifeS} s (at ${Number(fnHz[i]!.toPrecision(4))} Hz: damage ${fieldFatigue[i]}, largest response ${fieldExtreme[i]})`,
        hint: "give the life in hours of real service (a mix file's hours, or `lifeS`)",
      });
    }
  }
}

/** Each group's share of the field's damage, per natural frequency. */
function groupShares(
  groups: DeriveOptions["groups"],
  recordings: FieldRecordingResult[],
  fieldFatigue: Float64Array,
): DeriveResult["groups"] {
  const n = fieldFatigue.length;
  return groups.map((g) => {
    const share = new Float64Array(n);
    for (const r of recordings)
      if (r.group === g.name) for (let i = 0; i < n; i++) share[i] = share[i]! + r.damage[i]! / fieldFatigue[i]!;
    return { name: g.name, serviceS: g.serviceS, damageShare: share };
  });
}

/** Step 3: the statistical upper limit across recordings, or why there is none (a note). */
function fieldTolerance(
  recordings: FieldRecordingResult[],
  coverage: number,
  confidence: number,
  notes: Finding[],
): DeriveResult["tolerance"] {
  const tl = logToleranceLimit(
    recordings.map((r) => r.psd),
    coverage,
    confidence,
  );
  const missing: Finding = {
    code: "TOLERANCE_LIMIT_MISSING",
    values: { required: MIN_TOLERANCE_SAMPLES, recordings: recordings.length },
  };
  const tolerance = tl ?? { n: recordings.length, coverage, confidence, missing };
  if (!tl) notes.push(missing);
  return tolerance;
}

/**
 * Steps 1 to 3: the recordings analysed, the band and grid, the service share, each recording's figures, the field's
 * sums, the groups' shares and the tolerance limit.
 */
async function fieldFigures(o: DeriveOptions, settings: ReturnType<typeof deriveSettings>) {
  const { q, perOctave, coverage, confidence, sn } = settings;
  // 1. Each recording's PSD, one channel, on one resolution, in one unit.
  const { channel, base, analysed, first, df } = await analyseField(o);
  const band = fieldBand(o, analysed, perOctave, df);
  const { lines, fromHz, toHz, fnHz } = band;
  // 2. Service share: each group's time split among its recordings by their analysed durations.
  const { groupTime, groupDur, lifeS } = serviceShare(o, analysed);
  const n = fnHz.length;
  // The field's damage in time (fieldDamage "time"): per recording, the rainflow damage per second of record and a
  // function giving its largest response grown to a service time (Davenport's factor at nu0+ T over the one at nu0+
  // T_record, nu0+ from the PSD).
  const fieldDamage = fieldDamageMode(o);
  const timeDamage =
    fieldDamage === "time"
      ? await fieldTimeDamage(analysed, base, channel, { fromHz, toHz }, fnHz, q, sn)
      : new Map<string, TimeDamage>();
  const sums: FieldSums = {
    fieldFatigue: new Float64Array(n),
    fieldExtreme: new Float64Array(n),
    mean: new Float64Array(lines),
    envelope: new Float64Array(lines),
    notes: fieldDamage === "time" ? [{ code: "FIELD_DAMAGE_IN_TIME", values: {} }] : [],
    candidateTones: [],
  };
  const context: FieldContext = { ...band, df, q, sn, groupTime, groupDur, lifeS, timeDamage };
  const recordings = analysed.map((x) => fieldRecording(x, context, sums));
  checkFieldDamage(sums, fnHz, lifeS, sn.basquinB);
  if (sums.candidateTones.length > 0) {
    sums.notes.push({ code: "FIELD_TONES", values: { tones: sums.candidateTones.length } });
  }
  const groups = groupShares(o.groups, recordings, sums.fieldFatigue);
  // 3. The statistical upper limit across recordings.
  const tolerance = fieldTolerance(recordings, coverage, confidence, sums.notes);
  return { channel, base, analysed, first, df, ...band, lifeS, fieldDamage, recordings, groups, tolerance, ...sums };
}

/**
 * Where the test's expected largest response exceeds the field's by more than `extremeLimit` (a note when anywhere).
 */
function extremeCheck(
  testExtreme: Float64Array,
  fieldExtreme: Float64Array,
  fnHz: Float64Array,
  extremeLimit: number,
  notes: Finding[],
) {
  const n = fnHz.length;
  const extremeRatio = testExtreme.map((v, i) => v / fieldExtreme[i]!);
  const extremeWarnings = [...fnHz].filter((_, i) => extremeRatio[i]! > extremeLimit);
  if (extremeWarnings.length) {
    notes.push({
      code: "TEST_EXTREME_ABOVE_FIELD",
      values: { limit: extremeLimit, frequencies: extremeWarnings.length },
      about: { every: extremeWarnings.length === n, frequenciesHz: extremeWarnings },
    });
  }
  return { extremeRatio, extremeWarnings };
}

/**
 * Step 4b: the field's shocks against the test's largest response: the recordings' own largest SDOF responses (shock
 * response spectra of the whole records, which keep the shocks a Gaussian PSD hides) beside the random test's ERS.
 * Where the test falls short, the random test does not reach the field's shocks and a shock test is needed for them (a
 * note).
 */
async function fieldShocks(
  f: { analysed: AnalysedRecording[]; base: AnalysisOptions; channel: ChannelName; fnHz: Float64Array },
  q: number,
  testExtreme: Float64Array,
  notes: Finding[],
): Promise<FieldShocks> {
  const { fnHz } = f;
  const { fieldSrs, events, eventsPerRecording } = await fieldShockSpectra(
    f.analysed,
    f.base,
    f.channel,
    fnHz,
    q,
    notes,
  );
  const shortfallHz = [...fnHz].filter((_, i) => testExtreme[i]! < fieldSrs[i]!);
  if (shortfallHz.length) {
    notes.push({
      code: "SHOCK_TEST_NEEDED",
      values: { frequencies: shortfallHz.length },
      about: { frequenciesHz: shortfallHz },
    });
  }
  return { fieldSrs, largestEvents: events.slice(0, 5), eventsPerRecording, shortfallHz };
}

export async function deriveProfile(o: DeriveOptions): Promise<DeriveResult> {
  const settings = deriveSettings(o);
  const { q, b, nMax, margin, perOctave, coverage, confidence, extremeLimit, sn } = settings;
  // 1 to 3. The field: its recordings' PSDs, their service share and damage, the field's sums and tolerance limit.
  const f = await fieldFigures(o, settings);
  const { units, lifeS, frequencyHz, df, fromHz, toHz, fnHz, mean, fieldFatigue, fieldExtreme, notes } = f;

  // 4. The profile: fit against the field's damage times the margin, over the test duration.
  const { fit, test } = fitProfile({ ...f, perOctave, margin, q, b, sn, nMax, testDurationS: o.testDurationS });
  const testSpectra = damageSpectra(powerLawSpectrum(segmentsOf(fit.points)), test);
  const testFatigue = testSpectra.damage;
  const { extremeRatio, extremeWarnings } = extremeCheck(testSpectra.extreme, fieldExtreme, fnHz, extremeLimit, notes);

  // 4b. The field's shocks against the test's largest response.
  const shocks = await fieldShocks(f, q, testSpectra.extreme, notes);

  // 5. The profile document: tolerances, DOF, resolution, duration and provenance.
  const document = profileDocumentOf(o, {
    ...f,
    q,
    b,
    margin,
    nMax,
    perOctave,
    settings: f.first.a.settings,
    coverage,
    confidence,
    extremeLimit,
    fit,
  });
  // Read back exactly as `check` and `profile` will (a document psdgate cannot read is a bug, caught here).
  const profile = parseProfile(JSON.stringify(document), o.outFile ?? "derived.json");
  const meanFieldRms = bandRms({ psd: mean, frequencyHz, lineSpacingHz: df }, fromHz, toHz);
  return {
    units,
    lifeS,
    lifeRule: o.lifeRule,
    testDurationS: o.testDurationS,
    groups: f.groups,
    recordings: f.recordings,
    frequencyHz,
    lineSpacingHz: df,
    band: { fromHz, toHz },
    envelope: f.envelope,
    mean,
    tolerance: f.tolerance,
    fnHz,
    q,
    sn,
    margin,
    fieldFatigue,
    testFatigue,
    fieldExtreme,
    testExtreme: testSpectra.extreme,
    extremeRatio,
    extremeLimit,
    extremeWarnings,
    fit: {
      maxBreakpoints: nMax,
      minRatio: fit.minRatio,
      minRatioHz: fit.minRatioHz,
      maxRatio: fit.maxRatio,
      medianRatio: fit.medianRatio,
      scale: fit.scale,
    },
    shocks,
    compression: {
      flatFactor: (lifeS / o.testDurationS) ** (2 / b),
      profileRms: profile.rms,
      meanFieldRms,
      rmsRatio: profile.rms / meanFieldRms,
    },
    notes,
    candidateTones: f.candidateTones,
    document,
    profile,
    ...strokeOf(profile, o.strokeMm),
  };
}

/** The profile's velocity and displacement (closed form) and, with a rated stroke, the check against it. */
export function strokeOf(profile: TestProfile, strokeMm: number | undefined): Pick<DeriveResult, "motion" | "stroke"> {
  const motion = profileMotion(profile);
  if (strokeMm === undefined) return { motion, stroke: undefined };
  checkRange(
    "strokeMm",
    strokeMm,
    strokeMm > 0 && Number.isFinite(strokeMm),
    "a rated peak-to-peak stroke in mm above 0",
  );
  const est = motion.displacementPeakToPeak * 1000;
  return {
    motion,
    stroke: { ratedMm: strokeMm, estimateMm: est, margin: strokeMm / est, withinRating: est <= strokeMm },
  };
}

/** The groups and recordings of a mix file, as deriveProfile takes them. */
export function mixInputs(mix: ServiceMix): Pick<DeriveOptions, "recordings" | "groups" | "lifeRule" | "mix"> {
  return {
    recordings: mix.groups.flatMap((g) =>
      g.recordings.map((r) => ({ file: r.file, group: g.name, fromS: r.fromS, toS: r.toS })),
    ),
    groups: mix.groups.map((g) => ({ name: g.name, serviceS: g.hours * 3600 })),
    lifeRule: "mix file hours",
    mix: { file: mix.file, sha256: mix.sha256 },
  };
}

/** Plain recordings sharing a life by their recorded durations: one group, "field". */
export function plainInputs(files: string[], lifeS: number): Pick<DeriveOptions, "recordings" | "groups" | "lifeRule"> {
  return {
    recordings: files.map((file) => ({ file, group: "field" })),
    groups: [{ name: "field", serviceS: lifeS }],
    lifeRule: "recorded durations",
  };
}
