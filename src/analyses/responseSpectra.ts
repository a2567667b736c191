import {
  analyzeRecording,
  recordTooShort,
  type AnalysisOptions,
  type PassAccumulator,
} from "../pass/analyzeRecording.js";
import type { ChannelReading } from "../condition/scaleSamples.js";
import { loadProfile } from "./checkRecording.js";
import { InputError } from "../errors.js";
import {
  SN_DEFAULTS,
  narrowBandDamage,
  refuseDamageUnderflow,
  type SnCurve,
} from "../estimate/response/fatigueDamage.js";
import { lineSpectrum, powerLawSpectrum, type InputSpectrum } from "../estimate/response/inputSpectrum.js";
import { displacementPsd, spectrumMotion, velocityPsd, type Motion } from "../estimate/response/kinematics.js";
import { davenportPeakFactor, riceRates } from "../estimate/response/peakStatistics.js";
import {
  absoluteTransmissibilitySquared,
  milesRelativeDisplacementRms,
  milesRms,
  relativeDisplacementSquared,
  sdofResponse,
} from "../estimate/response/sdofResponse.js";
import type { TimeResponse } from "../estimate/response/timeResponse.js";
import { responseThreads, timeResponseSink, type TimeResponseSink } from "./timeResponsePool.js";
import { looksLikePsdTable, readPsdTable } from "../read/psdTable.js";
import { channelIndex, type ChannelName } from "../read/channelChoice.js";
import { readHead } from "../read/regularFile.js";
import { accelFactor, type AccelUnit } from "../units.js";

/**
 * What a structure feels: the response of single-degree-of-freedom systems at a grid of natural
 * frequencies to an input spectrum (a recording's PSD, a profile, or a PSD table psdgate wrote),
 * with Miles' equation beside the exact integral, Rice's rates, Davenport's expected largest peak,
 * the narrow-band fatigue damage, and the input's velocity and displacement.
 */
export type SourceKind = "recording" | "profile" | "psd";

export interface SpectrumSource {
  kind: SourceKind;
  file: string;
  sha256: string;
  /** Channel name (recording, PSD table) or profile title. */
  label: string;
  units: AccelUnit;
  spectrum: InputSpectrum;
  /** Natural length: the recording's duration or the profile's durationS. */
  durationS: number | undefined;
  /** Frequencies at which the source is defined: lines (recording, table) or breakpoints (profile). */
  frequencyHz: Float64Array;
  level: Float64Array;
  /** A mixed-mode profile's sine tones inside the band (a recording's or table's tones are already in its lines). */
  tones?: { label: string; hz: number; peak: number }[] | undefined;
  /**
   * A recording's own SDOF responses in time (when SourceOptions.response asked for them), with its mean, kurtosis and
   * analysed length.
   */
  timeResponse?: (TimeResponse & { mean: number; kurtosis: number; recordS: number; sampleRateHz: number }) | undefined;
  /** The analysed window of a recording (--from/--to; the whole record without them), s. */
  window?: { fromS: number; toS: number; durationS: number; whole: boolean } | undefined;
  /** How a recording's numbers became accelerations. */
  reading?: ChannelReading | undefined;
  /** Welch settings, for a recording. */
  settings?: { segmentLength: number; resolutionHz: number; window: string; averages: number; dof: number } | undefined;
}

/**
 * How a source is read: the family's options (AnalysisOptions), where `channels` names the one channel of a
 * recording or PSD table (default the first) and `fminHz`/`fmaxHz` the band used as input (default: from
 * the first line above 0 Hz to the last, or the profile's own band).
 */
export interface SourceOptions extends AnalysisOptions {
  /** Read the file as this kind (default: by extension and first line). */
  as?: SourceKind | undefined;
  /** For a recording: also filter it through each SDOF of this grid in time (rainflow damage, largest response). */
  response?:
    | { fnHz: Float64Array | readonly number[]; q: number; basquinB: number; expectedSamples?: number | undefined }
    | undefined;
}

/** The time-domain SDOF responses as a listener on the recording's one pass (one channel). */
class TimeResponses implements PassAccumulator<TimeResponse | undefined> {
  private acc: TimeResponseSink | undefined;
  constructor(
    private readonly o: {
      fnHz: Float64Array | readonly number[];
      q: number;
      basquinB: number;
      expectedSamples?: number | undefined;
    },
  ) {}
  start(designRateHz: number): void {
    if (!(Number.isFinite(designRateHz) && designRateHz > 0)) return;
    const fn = Float64Array.from(this.o.fnHz);
    this.acc = timeResponseSink(
      fn,
      this.o.q,
      designRateHz,
      this.o.basquinB,
      responseThreads(fn.length, this.o.expectedSamples ?? Infinity),
    );
  }
  push(blocks: Float64Array[], frames: number): void {
    this.acc?.push(blocks[0]!, frames);
  }
  finish(): TimeResponse | undefined {
    return this.acc?.finish();
  }
}

async function firstLine(file: string): Promise<string> {
  return (await readHead(file, 256, "a readable file")).toString("utf8").split(/\r?\n/)[0] ?? "";
}

/**
 * The kind of a source file: .json/.yaml/.yml a profile, a CSV whose header starts frequency_hz a PSD table, else a
 * recording.
 */
export async function sourceKind(file: string): Promise<SourceKind> {
  if (/\.(json|ya?ml)$/i.test(file)) return "profile";
  if (/\.wave?$/i.test(file)) return "recording";
  return looksLikePsdTable(await firstLine(file)) ? "psd" : "recording";
}

function lineBand(file: string, f: Float64Array, o: SourceOptions): { lo: number; hi: number } {
  const lo = o.fminHz ?? f[1]!;
  const hi = o.fmaxHz ?? f[f.length - 1]!;
  if (!(lo > 0))
    throw new InputError("OPTION_INVALID", {
      file,
      option: "fminHz",
      expected: "a lower band edge above 0 Hz",
      received: String(lo),
    });
  if (!(hi > lo))
    throw new InputError("OPTION_INVALID", {
      file,
      option: "fmaxHz",
      expected: `an upper band edge above \`fminHz\` ${lo} Hz`,
      received: String(hi),
    });
  return { lo, hi };
}

/** A profile as a source: its power-law segments cut to `fminHz`/`fmaxHz`, and its tones inside that band. */
async function profileSource(file: string, o: SourceOptions): Promise<SpectrumSource> {
  const p = await loadProfile(file);
  // --fmin/--fmax cut the profile's own band (each segment keeps its power law).
  const lo = Math.max(o.fminHz ?? 0, p.segments[0]!.f1);
  const hi = Math.min(o.fmaxHz ?? Infinity, p.segments[p.segments.length - 1]!.f2);
  if (!(hi > lo))
    throw new InputError("OPTION_INVALID", {
      file,
      option: "fminHz",
      expected: `a band that overlaps the profile's ${p.segments[0]!.f1}–${p.segments[p.segments.length - 1]!.f2} Hz`,
      received: `${o.fminHz ?? ""}–${o.fmaxHz ?? ""} Hz`,
    });
  const segments = p.segments
    .filter((s) => s.f2 > lo && s.f1 < hi)
    .map((s) => {
      const f1 = Math.max(s.f1, lo);
      return { f1, f2: Math.min(s.f2, hi), g1: s.g1 * Math.pow(f1 / s.f1, s.exponent), exponent: s.exponent };
    });
  const spectrum = powerLawSpectrum(segments);
  const hz = Float64Array.from([segments[0]!.f1, ...segments.map((s) => s.f2)]);
  const tones = p.tones
    .filter((t) => t.hz >= lo && t.hz <= hi)
    .map((t) => ({ label: t.label, hz: t.hz, peak: t.peak }));
  return {
    kind: "profile",
    file,
    sha256: p.sha256,
    label: p.title,
    units: p.units,
    spectrum,
    durationS: p.durationS,
    frequencyHz: hz,
    level: hz.map((f) => spectrum.level(f)),
    ...(tones.length > 0 ? { tones } : {}),
  };
}

/** A PSD table psdgate wrote as a source: one channel's lines over the band. */
async function psdTableSource(
  file: string,
  o: SourceOptions,
  channel: ChannelName | undefined,
  channelOption: string,
): Promise<SpectrumSource> {
  const t = await readPsdTable(file);
  const ch =
    t.channels[channel === undefined ? 0 : channelIndex(t.channels, channel, { option: channelOption, file })]!;
  const { lo, hi } = lineBand(file, t.frequencyHz, o);
  return {
    kind: "psd",
    file,
    sha256: t.sha256,
    label: ch.name,
    units: ch.units,
    spectrum: lineSpectrum(t.frequencyHz, ch.psd, lo, hi),
    durationS: undefined,
    frequencyHz: t.frequencyHz,
    level: ch.psd,
  };
}

/**
 * A recording as a source: one channel's PSD through the one pass, with its SDOF responses in time when `response` asks
 * for them. `kind` is the kind asked for, kept as given (any kind but profile and psd is read as a recording).
 */
async function recordingSource(
  file: string,
  o: SourceOptions,
  kind: SourceKind,
  channel: ChannelName | undefined,
  channelOption: string,
): Promise<SpectrumSource> {
  const { response, ...reading } = o;
  const listener = response !== undefined ? new TimeResponses(response) : undefined;
  const a = await analyzeRecording(file, {
    ...reading,
    channels: [channel ?? "1"],
    fminHz: undefined,
    fmaxHz: undefined,
    accumulators: listener ? [listener] : undefined,
  }).catch((e: unknown) => {
    // The pass names its own key; the channel came from `channelOption` (respond's --against input: `againstChannel`).
    throw e instanceof InputError && e.code === "CHANNEL_NOT_FOUND" && e.details.option === "channels"
      ? new InputError(e.code, { ...e.details, option: channelOption })
      : e;
  });
  const c = a.channels[0]!;
  const tr = a.extras[0] as TimeResponse | undefined;
  const short = recordTooShort(a);
  if (short) throw short;
  const { lo, hi } = lineBand(file, c.psd.frequencyHz, o);
  return {
    kind,
    file,
    sha256: a.input.sha256,
    label: c.name,
    units: c.units,
    spectrum: lineSpectrum(c.psd.frequencyHz, c.psd.psd, lo, hi),
    // The natural length is the analysed window's (--from/--to), not the file's.
    durationS: a.window.frames / a.input.sampleRateHz,
    reading: c.reading,
    window: {
      fromS: a.window.fromS,
      toS: a.window.toS,
      durationS: a.window.frames / a.input.sampleRateHz,
      whole: a.window.frames === a.input.samples,
    },
    frequencyHz: c.psd.frequencyHz,
    level: c.psd.psd,
    timeResponse: tr
      ? {
          ...tr,
          mean: c.stats.mean,
          kurtosis: c.stats.kurtosis,
          recordS: tr.samples / a.input.sampleRateHz,
          sampleRateHz: a.input.sampleRateHz,
        }
      : undefined,
    settings: {
      segmentLength: a.settings.segmentLength,
      resolutionHz: a.settings.resolutionHz,
      window: a.settings.window,
      averages: c.psd.averages,
      dof: c.psd.dof,
    },
  };
}

/** A source read as its kind says (given, or by extension and first line): a profile, a PSD table or a recording. */
export async function loadSpectrumSource(
  file: string,
  o: SourceOptions = {},
  channelOption = "channels",
): Promise<SpectrumSource> {
  if ((o.channels?.length ?? 0) > 1)
    throw new InputError("OPTION_INVALID", {
      file,
      option: channelOption,
      expected: "one channel",
      received: o.channels!.join(", "),
    });
  const channel = o.channels?.[0];
  const kind = o.as ?? (await sourceKind(file));
  if (kind === "profile") return profileSource(file, o);
  if (kind === "psd") return psdTableSource(file, o, channel, channelOption);
  return recordingSource(file, o, kind, channel, channelOption);
}

export interface ResponseOptions {
  fnHz: Float64Array;
  q: number;
  /** Exposure for the extreme peak and the damage (default the source's own). */
  durationS?: number | undefined;
  sn?: Partial<SnCurve> | undefined;
  /** Rated peak-to-peak stroke of the exciter, mm, to check the displacement estimate against. */
  strokeMm?: number | undefined;
}

export interface ResponseSpectra {
  source: Omit<SpectrumSource, "spectrum" | "frequencyHz" | "level">;
  band: { fromHz: number; toHz: number };
  fnHz: Float64Array;
  q: number;
  /**
   * Exposure of the largest peak and the damage; undefined when neither the options nor the source give one (those
   * figures are then NaN).
   */
  durationS: number | undefined;
  sn: SnCurve;
  /** What the result leaves out for want of an exposure time (empty when it has one). */
  needsDuration: string[];
  /** Exact RMS of the absolute-acceleration response, in the source's unit. */
  accelRms: Float64Array;
  /** Miles' equation with the input's level at f_n (NaN where f_n is outside the input's band). */
  milesRms: Float64Array;
  /** Relative displacement RMS, exact and by Miles' form, metres. */
  relDispRms: Float64Array;
  relDispMilesRms: Float64Array;
  /** Rice's rates of the acceleration response. */
  upcrossingRateHz: Float64Array;
  peakRateHz: Float64Array;
  irregularity: Float64Array;
  /** Davenport's factor and the expected largest peak of the acceleration response over durationS. */
  peakFactor: Float64Array;
  extremePeak: Float64Array;
  /** Up-crossing rate of the relative displacement (the stress cycles' rate) and the narrow-band damage. */
  stressCycleRateHz: Float64Array;
  fatigueDamage: Float64Array;
  motion: Motion & { velocityPsd: Float64Array; displacementPsd: Float64Array; frequencyHz: Float64Array };
  stroke?: { ratedMm: number; estimateMm: number; margin: number; withinRating: boolean } | undefined;
  /**
   * A mixed-mode profile's tones: each tone's response is deterministic, its peak times |T(f)| (absolute
   * acceleration) and times |Z/A| (relative displacement), per natural frequency. Miles' equation does not apply
   * to a tone; the other columns (Miles, Rice's rates, the largest peak, the damage) are the random part alone.
   */
  tones?: { label: string; hz: number; peak: number; accelPeak: Float64Array; relDispPeak: Float64Array }[] | undefined;
  /** With tones: RMS of the whole acceleration response, sqrt(random^2 + sum (peak |T|)^2 / 2). */
  totalAccelRms?: Float64Array | undefined;
  /**
   * For a recording: fatigueDamage and extremePeak above come from the record itself (rainflow of the simulated
   * relative displacement; its largest |acceleration response|), and the PSD-based values move here.
   */
  fromPsd?: { fatigueDamage: Float64Array; extremePeak: Float64Array } | undefined;
  timeDomain?:
    | {
        recordS: number;
        kurtosis: number;
        sampleRateHz: number;
        /** Largest |absolute-acceleration response - mean| over the record, per f_n. */
        recordPeak: Float64Array;
        /** Rainflow damage over the record alone (before scaling to the exposure). */
        recordDamage: Float64Array;
        /** Natural frequencies above fs/4, left out (NaN): the sampled response cannot follow them. */
        skippedHz: number[];
        /** Natural frequencies between fs/10 and fs/4: the sampled peak can fall short by up to 1 - cos(pi fn / fs). */
        coarseHz: number[];
        heldSamples: number;
      }
    | undefined;
}

/**
 * The time-domain figures of a recording over the exposure T (record length T_r):
 * - damage: Miner's sum of the rainflow cycles of S = K z (z the relative displacement in m), D_r = sum n_i S_i^b / C,
 *   scaled by T / T_r (damage is linear in exposure, the record repeated);
 * - largest peak: the record's largest |response| times Davenport's factor at nu0+ T over the one at nu0+ T_r
 *   (Davenport 1964; nu0+ of the response from the PSD): the record's peak grown as a Gaussian tail would over a
 *   longer exposure (1 when T = T_r). This keeps the record's non-Gaussian excess; it does not know the shocks
 *   of a service longer than the record.
 */
function timeDomainFigures(
  src: SpectrumSource,
  o: ResponseOptions,
  sn: SnCurve,
  durationS: number,
  upcrossingRateHz: Float64Array,
) {
  const t = src.timeResponse!;
  const n = o.fnHz.length;
  const toSi = accelFactor(src.units, "m/s2");
  const damage = new Float64Array(n);
  const peak = new Float64Array(n);
  const recordDamage = new Float64Array(n);
  const recordPeak = new Float64Array(n);
  const skippedHz: number[] = [];
  const coarseHz: number[] = [];
  for (let i = 0; i < n; i++) {
    const fn = o.fnHz[i]!;
    if (fn > t.sampleRateHz / 4) {
      skippedHz.push(fn);
      damage[i] = peak[i] = recordDamage[i] = recordPeak[i] = NaN;
      continue;
    }
    if (fn > t.sampleRateHz / 10) coarseHz.push(fn);
    const p = Math.max(t.maxAccel[i]! - t.mean, t.mean - t.minAccel[i]!);
    recordPeak[i] = p;
    const sum = t.rainflowSum[i]!;
    // sum (K toSi range/2)^b / C, in logs (the sum is in input units x s^2).
    recordDamage[i] =
      sum > 0 ? Math.exp(Math.log(sum) + sn.basquinB * Math.log(sn.stressPerUnit * toSi) - Math.log(sn.snConstant)) : 0;
    damage[i] = recordDamage[i]! * (durationS / t.recordS);
    if (p > 0) refuseDamageUnderflow(damage[i]!, fn, sn.basquinB, "the record's damage", "fn");
    const grow =
      davenportPeakFactor(upcrossingRateHz[i]! * durationS) / davenportPeakFactor(upcrossingRateHz[i]! * t.recordS);
    peak[i] = p * (Number.isFinite(grow) ? grow : 1);
  }
  return { damage, peak, recordDamage, recordPeak, skippedHz, coarseHz };
}

/** Grid "A:B[:N]" (N per octave, default 6, geometric from A to B inclusive), a list "A,B,C" or one value. */
export function parseFnGrid(text: string, option = "fn"): Float64Array {
  const bad = (received: string): never => {
    throw new InputError("OPTION_INVALID", {
      option,
      expected:
        "A:B or A:B:N (N natural frequencies per octave, default 6) or a list A,B,C of frequencies in Hz above 0",
      received,
    });
  };
  const t = text.trim();
  if (t.includes(":")) {
    const parts = t.split(":").map(Number);
    if (parts.length < 2 || parts.length > 3 || parts.some((x) => !Number.isFinite(x))) bad(JSON.stringify(text));
    const [a, b, n = 6] = parts as [number, number, number?];
    if (!(a > 0 && b > a && Number.isInteger(n) && n >= 1 && n <= 96)) bad(JSON.stringify(text));
    const count = Math.floor(n * Math.log2(b / a) + 1e-9) + 1;
    if (count > 2000) bad(`${count} natural frequencies (at most 2000)`);
    const out = Array.from({ length: count }, (_, i) => a * 2 ** (i / n));
    if (b / out[count - 1]! > 1 + 1e-9) out.push(b);
    return Float64Array.from(out);
  }
  const list = t.split(",").map((s) => Number(s.trim()));
  if (list.length === 0 || list.some((x) => !(x > 0) || !Number.isFinite(x))) bad(JSON.stringify(text));
  return Float64Array.from(list).sort();
}

/**
 * responseSpectra's settings, each checked: Q, the exposure (the options', else the source's own; may be none) and the
 * S-N curve.
 */
function responseSettings(
  src: SpectrumSource,
  o: ResponseOptions,
): { q: number; durationS: number | undefined; sn: SnCurve } {
  const q = o.q;
  if (!(q > 0.5 && q <= 1000))
    throw new InputError("OPTION_INVALID", {
      option: "q",
      expected: "a quality factor Q above 0.5 and at most 1000 (Q = 1 / (2 zeta))",
      received: String(q),
    });
  // A profile without durationS or a PSD table has no length of its own: the response RMS, Miles, the
  // displacement and Rice's rates need none; the largest peak and the damage do, and stay NaN without it.
  const durationS = o.durationS ?? src.durationS;
  if (durationS !== undefined && (!(durationS > 0) || !Number.isFinite(durationS)))
    throw new InputError("OPTION_INVALID", {
      option: "durationS",
      expected: "an exposure time in s above 0",
      received: String(durationS),
    });
  const sn: SnCurve = {
    ...SN_DEFAULTS,
    ...Object.fromEntries(Object.entries(o.sn ?? {}).filter(([, v]) => v !== undefined)),
  };
  if (!(sn.basquinB >= 1 && sn.basquinB <= 30))
    throw new InputError("OPTION_INVALID", {
      option: "basquinB",
      expected: "a Basquin exponent b from 1 to 30",
      received: String(sn.basquinB),
    });
  return { q, durationS, sn };
}

/**
 * The random response at each natural frequency (exact RMS, Miles, relative displacement, Rice's rates, Davenport's
 * peak, narrow-band damage).
 */
function randomResponses(
  s: InputSpectrum,
  fnHz: Float64Array,
  settings: { q: number; durationS: number | undefined; sn: SnCurve; toSi: number },
) {
  const { q, durationS, sn, toSi } = settings;
  const n = fnHz.length;
  const out = (): Float64Array => new Float64Array(n);
  const r = {
    accelRms: out(),
    milesRms: out(),
    relDispRms: out(),
    relDispMilesRms: out(),
    upcrossingRateHz: out(),
    peakRateHz: out(),
    irregularity: out(),
    peakFactor: out(),
    extremePeak: out(),
    stressCycleRateHz: out(),
    fatigueDamage: out(),
  };
  for (let i = 0; i < n; i++) {
    const fn = fnHz[i]!;
    const resp = sdofResponse(s, fn, q);
    const a = resp.acceleration;
    const z = resp.relativeDisplacement;
    const inBand = fn >= s.fminHz && fn <= s.fmaxHz;
    const g = inBand ? s.level(fn) : NaN;
    r.accelRms[i] = Math.sqrt(a.m0);
    r.milesRms[i] = milesRms(fn, q, g);
    const zRms = Math.sqrt(z.m0) * toSi;
    r.relDispRms[i] = zRms;
    r.relDispMilesRms[i] = milesRelativeDisplacementRms(fn, q, g) * toSi;
    const rice = riceRates(a);
    r.upcrossingRateHz[i] = rice.upcrossingRateHz;
    r.peakRateHz[i] = rice.peakRateHz;
    r.irregularity[i] = rice.irregularity;
    r.peakFactor[i] = durationS === undefined ? NaN : davenportPeakFactor(rice.upcrossingRateHz * durationS);
    r.extremePeak[i] = r.peakFactor[i]! * r.accelRms[i]!;
    const nuZ = riceRates(z).upcrossingRateHz;
    r.stressCycleRateHz[i] = nuZ;
    r.fatigueDamage[i] = durationS === undefined ? NaN : narrowBandDamage(zRms, nuZ, durationS, sn);
    // A figure that overflows is not a result: name the settings that made it, rather than print Infinity.
    // (Without an exposure the figures that need one are left out, as NaN, by design.)
    if (durationS !== undefined && !Number.isFinite(r.extremePeak[i]!)) {
      throw new InputError("OPTION_INVALID", {
        option: "durationS",
        expected: "an exposure for which the largest peak is a finite number",
        received: `${durationS} s (largest peak ${r.extremePeak[i]} at ${fnHz[i]} Hz)`,
      });
    }
    if (durationS !== undefined && !Number.isFinite(r.fatigueDamage[i]!)) {
      throw new InputError("OPTION_INVALID", {
        option: "stressPerUnit",
        expected: "an S-N curve, stress per metre and exposure for which the damage is a finite number",
        received: `damage ${r.fatigueDamage[i]} at ${fnHz[i]} Hz (b ${sn.basquinB}, C ${sn.snConstant}, stress ${sn.stressPerUnit} per metre, ${durationS} s)`,
      });
    }
    // One that underflows to 0 (a quiet input, a large b) is no result either: b is named, as derive does.
    if (durationS !== undefined && zRms > 0)
      refuseDamageUnderflow(r.fatigueDamage[i]!, fnHz[i]!, sn.basquinB, "the damage", "fn");
  }
  return r;
}

/** The displacement estimate against the exciter's rated stroke, when one is given. */
function strokeCheck(m: Motion, strokeMm: number | undefined): ResponseSpectra["stroke"] {
  if (strokeMm === undefined) return undefined;
  if (!(strokeMm > 0) || !Number.isFinite(strokeMm))
    throw new InputError("OPTION_INVALID", {
      option: "strokeMm",
      expected: "a rated peak-to-peak stroke in mm above 0",
      received: String(strokeMm),
    });
  const est = m.displacementPeakToPeak * 1000;
  return { ratedMm: strokeMm, estimateMm: est, margin: strokeMm / est, withinRating: est <= strokeMm };
}

/**
 * A mixed-mode profile's tones: each one's deterministic peak responses, and the whole response's RMS with them (both
 * undefined without tones).
 */
function toneResponses(
  sourceTones: SpectrumSource["tones"],
  fnHz: Float64Array,
  q: number,
  toSi: number,
  accelRms: Float64Array,
): { tones: ResponseSpectra["tones"]; totalAccelRms: Float64Array | undefined } {
  const n = fnHz.length;
  // Tones: deterministic responses (standard SDOF steady state: peak x |T(f)|, docs/REFERENCES.md sec. 4 form).
  const tones = sourceTones?.map((t) => {
    const accelPeak = new Float64Array(n);
    const relDispPeak = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      accelPeak[i] = t.peak * Math.sqrt(absoluteTransmissibilitySquared(t.hz, fnHz[i]!, q));
      relDispPeak[i] = t.peak * toSi * Math.sqrt(relativeDisplacementSquared(t.hz, fnHz[i]!, q));
    }
    return { ...t, accelPeak, relDispPeak };
  });
  let totalAccelRms: Float64Array | undefined;
  if (tones) {
    totalAccelRms = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      let ms = accelRms[i]! ** 2;
      for (const t of tones) ms += t.accelPeak[i]! ** 2 / 2;
      totalAccelRms[i] = Math.sqrt(ms);
    }
  }
  return { tones, totalAccelRms };
}

/**
 * For a recording with its responses in time and an exposure: the record's own damage and largest peak replace the
 * PSD's in `r` (changed in place), which are returned as fromPsd beside the time-domain figures; otherwise both
 * undefined.
 */
function recordFigures(
  src: SpectrumSource,
  o: ResponseOptions,
  g: { q: number; durationS: number | undefined; sn: SnCurve },
  r: ReturnType<typeof randomResponses>,
): Pick<ResponseSpectra, "fromPsd" | "timeDomain"> {
  const { q, durationS, sn } = g;
  const n = o.fnHz.length;
  const t = src.timeResponse;
  if (t === undefined || durationS === undefined) return { fromPsd: undefined, timeDomain: undefined };
  if (t.q !== q || t.basquinB !== sn.basquinB || t.fnHz.length !== n || t.fnHz.some((f, i) => f !== o.fnHz[i]))
    throw new RangeError("the recording's time-domain responses were computed for another grid, Q or b");
  const td = timeDomainFigures(src, o, sn, durationS, r.upcrossingRateHz);
  const fromPsd = { fatigueDamage: r.fatigueDamage, extremePeak: r.extremePeak };
  r.fatigueDamage = td.damage;
  r.extremePeak = td.peak;
  return {
    fromPsd,
    timeDomain: {
      recordS: t.recordS,
      kurtosis: t.kurtosis,
      sampleRateHz: t.sampleRateHz,
      recordPeak: td.recordPeak,
      recordDamage: td.recordDamage,
      skippedHz: td.skippedHz,
      coarseHz: td.coarseHz,
      heldSamples: t.heldSamples,
    },
  };
}

/**
 * No figures from no data (as derive): a source with no vibration in its band (a dead channel: all zero or constant)
 * has no response; its NaN peak was reported as a bad --duration.
 */
function refuseSilentSource(src: SpectrumSource): void {
  const { fminHz, fmaxHz } = src.spectrum;
  for (let k = 0; k < src.frequencyHz.length; k++) {
    const f = src.frequencyHz[k]!;
    if (f >= fminHz && f <= fmaxHz && src.level[k]! > 0 && Number.isFinite(src.level[k]!)) return;
  }
  if ((src.tones ?? []).some((t) => t.peak > 0)) return;
  throw new InputError("NO_VIBRATION", {
    file: src.file,
    expected: `vibration between ${fminHz} and ${fmaxHz} Hz to respond to`,
    received: "a PSD of zero at every line in the band (a recording that is all zero or constant)",
  });
}

/**
 * The SDOF responses to a source at each natural frequency of the grid, with the input's motion, the stroke check and
 * any tones.
 */
export function responseSpectra(src: SpectrumSource, o: ResponseOptions): ResponseSpectra {
  const { q, durationS, sn } = responseSettings(src, o);
  const toSi = accelFactor(src.units, "m/s2");
  const s = src.spectrum;
  refuseSilentSource(src);
  const r = randomResponses(s, o.fnHz, { q, durationS, sn, toSi });
  const m = spectrumMotion(s, toSi);
  const keep = src.frequencyHz.map((f) => (f >= s.fminHz && f <= s.fmaxHz ? 1 : 0));
  const fk = src.frequencyHz.filter((_, k) => keep[k] === 1);
  const gk = src.level.filter((_, k) => keep[k] === 1);
  const stroke = strokeCheck(m, o.strokeMm);
  const { tones, totalAccelRms } = toneResponses(src.tones, o.fnHz, q, toSi, r.accelRms);
  const { fromPsd, timeDomain } = recordFigures(src, o, { q, durationS, sn }, r);
  const { spectrum: _s, frequencyHz: _f, level: _l, tones: _t, timeResponse: _tr, ...source } = src;
  return {
    source,
    band: { fromHz: s.fminHz, toHz: s.fmaxHz },
    fnHz: o.fnHz,
    q,
    durationS,
    sn,
    needsDuration: durationS === undefined ? ["the largest peak (Davenport)", "the fatigue damage"] : [],
    ...r,
    fromPsd,
    timeDomain,
    motion: {
      ...m,
      frequencyHz: fk,
      velocityPsd: velocityPsd(fk, gk, toSi),
      displacementPsd: displacementPsd(fk, gk, toSi),
    },
    stroke,
    ...(tones ? { tones, totalAccelRms } : {}),
  };
}

export interface ResponseComparison {
  /** 20 log10(B / A) of the response RMS and of the extreme peak, dB: below 0 where B under-tests A. */
  rmsRatioDb: Float64Array;
  extremeRatioDb: Float64Array;
  /** Damage of B over damage of A, each over its own duration: below 1 where B under-tests A. */
  damageRatio: Float64Array;
  /** Natural frequencies where B falls short of A, per measure. */
  underTestsHz: { rms: number[]; extreme: number[]; damage: number[] };
}

/** Where B (e.g. a lab profile) under- or over-tests A (e.g. a field recording), per natural frequency. */
export function compareResponses(a: ResponseSpectra, b: ResponseSpectra): ResponseComparison {
  const n = a.fnHz.length;
  const rmsRatioDb = new Float64Array(n);
  const extremeRatioDb = new Float64Array(n);
  const damageRatio = new Float64Array(n);
  const under = { rms: [] as number[], extreme: [] as number[], damage: [] as number[] };
  if (b.fnHz.length !== n || b.fnHz.some((f, i) => f !== a.fnHz[i]))
    throw new RangeError("the two response spectra have different natural-frequency grids");
  // Both in m/s^2 before the ratio (the damage is already in metres of relative displacement).
  const unit = accelFactor(b.source.units, "m/s2") / accelFactor(a.source.units, "m/s2");
  for (let i = 0; i < n; i++) {
    rmsRatioDb[i] = 20 * Math.log10((unit * b.accelRms[i]!) / a.accelRms[i]!);
    extremeRatioDb[i] = 20 * Math.log10((unit * b.extremePeak[i]!) / a.extremePeak[i]!);
    damageRatio[i] = b.fatigueDamage[i]! / a.fatigueDamage[i]!;
    if (rmsRatioDb[i]! < 0) under.rms.push(a.fnHz[i]!);
    if (extremeRatioDb[i]! < 0) under.extreme.push(a.fnHz[i]!);
    if (damageRatio[i]! < 1) under.damage.push(a.fnHz[i]!);
  }
  return { rmsRatioDb, extremeRatioDb, damageRatio, underTestsHz: under };
}

/**
 * What `respond` ran, as plain data: the grid as written, Q, exposure, S-N curve and stroke, the source's
 * reading options and the `--against` input with its own. `respond` and `verify` both run it through runResponse.
 */
export interface RespondRerun {
  fn: string;
  q: number;
  durationS?: number | undefined;
  sn?: Partial<SnCurve> | undefined;
  strokeMm?: number | undefined;
  source: SourceOptions;
  against?: { file: string; options: SourceOptions; durationS?: number | undefined } | undefined;
}

/** Run `respond` on a source (and its --against input, when given) with the options of a RespondRerun. */
export async function runResponse(
  source: string,
  o: RespondRerun,
  againstFile?: string,
): Promise<{ r: ResponseSpectra; against?: { b: ResponseSpectra; c: ResponseComparison } | undefined }> {
  const fnHz = parseFnGrid(o.fn);
  // A recording is also filtered through each SDOF in time: damage by rainflow, the largest response (the non-Gaussian
  // part the PSD hides).
  const response = { fnHz, q: o.q, basquinB: o.sn?.basquinB ?? SN_DEFAULTS.basquinB };
  const a = await loadSpectrumSource(source, { ...o.source, response });
  const r = responseSpectra(a, { fnHz, q: o.q, durationS: o.durationS, sn: o.sn, strokeMm: o.strokeMm });
  if (o.against === undefined) return { r };
  const bsrc = await loadSpectrumSource(
    againstFile ?? o.against.file,
    { ...o.against.options, response },
    "againstChannel",
  );
  const b = responseSpectra(bsrc, { fnHz, q: o.q, durationS: o.against.durationS, sn: o.sn });
  return { r, against: { b, c: compareResponses(r, b) } };
}
