import {
  analyzeRecording,
  type AnalysisOptions,
  type ChannelAnalysis,
  type RecordingAnalysis,
} from "../pass/analyzeRecording.js";
import { levelGate } from "../compare/levelGate.js";
import { bandMeanSquare } from "../estimate/spectral/psdEstimate.js";
import {
  judgeSpectrum,
  overallVerdict,
  withDoubts,
  withGate,
  type ChannelCompliance,
  type SpectrumUnderTest,
  type Verdict,
} from "../compare/complianceCheck.js";
import { parseProfile, type TestProfile } from "../compare/testProfile.js";
import { combineFits, judgeMixedMode, toneSearchHalfWidthHz } from "../compare/toneCheck.js";
import { ToneFitAccumulator, type ToneFit } from "../estimate/spectral/toneEstimate.js";
import { channelIndex } from "../read/channelChoice.js";
import { InputError } from "../errors.js";
import type { Finding } from "../findings.js";
import { readProfileText } from "../read/profileFile.js";

/** How several control channels make one control spectrum (multipoint control). */
export type ControlRule = "average" | "largest";
export const CONTROL_RULES: readonly ControlRule[] = ["average", "largest"];

export interface CheckOptions extends AnalysisOptions {
  /** Judge these channels (names or 1-based positions) as one control spectrum; the others are monitoring channels. */
  control?: { channels: string[]; rule: ControlRule } | undefined;
}

export interface ControlJudgement {
  rule: ControlRule;
  /** Names of the control channels. */
  channels: string[];
  judgement: ChannelCompliance;
}

export interface CheckResult {
  verdict: Verdict;
  analysis: RecordingAnalysis;
  profile: TestProfile;
  /** One per analysed channel, in the analysis's order. */
  channels: ChannelCompliance[];
  /** "judged" without control channels; otherwise "control" or "monitor" (shown, not judged). */
  roles: ("judged" | "control" | "monitor")[];
  control?: ControlJudgement | undefined;
}

/** A channel's finding said of the control spectrum, which several channels make: the channel named first. */
function aboutChannel(f: Finding, channel: string): Finding {
  return { ...f, about: { ...f.about, channel } };
}

/**
 * A held channel (sample-and-hold, HELD_SAMPLES) shows above its sensor's Nyquist frequency only the hold's
 * images: where the profile reaches above it, those lines cannot support a verdict, so the check is in doubt.
 */
function heldBand(c: ChannelAnalysis, profile: TestProfile): Finding[] {
  const h = c.hold;
  const top = profile.breakpoints[profile.breakpoints.length - 1]!.hz;
  if (!h?.held || !(top > h.updateRateHz / 2)) return [];
  const nyq = Number((h.updateRateHz / 2).toPrecision(4));
  return [{ code: "HELD_BAND", values: { profileTopHz: top, nyquistHz: nyq } }];
}

/** Read and validate a profile file (JSON, YAML or two-column CSV). */
export async function loadProfile(file: string): Promise<TestProfile> {
  // A regular file of bounded size only (read/profileFile.ts): a FIFO never blocks, a huge file is refused.
  return parseProfile(await readProfileText(file), file);
}

/** What the judgement needs of one analysed channel. */
export function spectrumOf(c: ChannelAnalysis, a: RecordingAnalysis): SpectrumUnderTest {
  const s = a.settings;
  return {
    name: c.name,
    frequencyHz: c.psd.frequencyHz,
    psd: c.psd.psd,
    dof: c.psd.dof,
    lineSpacingHz: c.psd.lineSpacingHz,
    // The duration judged is the analysed window's (--from/--to), not the file's.
    sampleRateHz: a.input.sampleRateHz,
    durationS: a.window.frames / a.input.sampleRateHz,
    window: s.window,
    analysedWindow: a.window.frames !== a.input.samples ? { fromS: a.window.fromS, toS: a.window.toS } : undefined,
    segmentLength: s.segmentLength,
    detrend: s.detrend,
    confidence: s.confidence,
    overlap: s.overlap,
  };
}

/**
 * One control spectrum from several channels: the line-by-line average or the largest. Its DOF is
 * taken as the smallest of the channels' (the channels of one test are strongly correlated, so the
 * average is worth no more than one channel: conservative). With the largest, judgeSpectrum tests it
 * by the distribution of the largest of k (decisionRule.ts largestUpperFactor, largestOfMoments).
 */
export function combineSpectra(list: SpectrumUnderTest[], rule: ControlRule): SpectrumUnderTest {
  const first = list[0]!;
  const psd = new Float64Array(first.psd.length);
  for (let i = 0; i < psd.length; i++) {
    let v = rule === "average" ? 0 : -Infinity;
    for (const s of list) v = rule === "average" ? v + s.psd[i]! / list.length : Math.max(v, s.psd[i]!);
    psd[i] = v;
  }
  return {
    ...first,
    name: `${rule} of ${list.map((s) => s.name).join(", ")}`,
    psd,
    dof: Math.min(...list.map((s) => s.dof)),
    upperSharedBy: rule === "largest" ? list.length : 1,
  };
}

function controlPositions(a: RecordingAnalysis, wanted: string[]): number[] {
  const positions = a.channels.map((c) => c.position);
  const out = wanted.map((w) =>
    channelIndex(a.channels, w, { option: "control", file: a.input.file, positions, expected: "an analysed channel" }),
  );
  if (new Set(out).size !== out.length)
    throw new InputError("OPTION_INVALID", {
      option: "control",
      expected: "each control channel once",
      received: wanted.join(","),
    });
  return out;
}

/**
 * Analyse a recording at the profile's resolution (unless the options set one) and in the profile's
 * units, then judge every channel against the profile, or the control channels as one spectrum. The
 * amplitude histogram (for the report) is built unless `histogram: false`.
 */
export async function checkRecording(
  file: string,
  profile: TestProfile,
  options: CheckOptions = {},
): Promise<CheckResult> {
  const resolutionHz =
    options.segmentLength === undefined && options.resolutionHz === undefined
      ? profile.resolutionHz
      : options.resolutionHz;
  if (options.resultUnits !== undefined && options.resultUnits !== profile.units) {
    throw new InputError("OPTION_CONFLICT", {
      option: "resultUnits",
      expected: `the profile's unit ${profile.units} (or none)`,
      received: options.resultUnits,
    });
  }
  if (options.control && !CONTROL_RULES.includes(options.control.rule)) {
    throw new InputError("OPTION_INVALID", {
      option: "control.rule",
      expected: CONTROL_RULES.join(" or "),
      received: String(options.control.rule),
    });
  }
  // Control channels are always analysed, with any channels asked for besides.
  const channels =
    options.control && options.channels?.length
      ? [...new Set([...options.channels, ...options.control.channels])]
      : options.channels;
  // Mixed mode: the tones are fitted on the same pass (one more listener).
  const toneAcc =
    profile.tones.length > 0
      ? new ToneFitAccumulator(
          profile.tones.map((t, i) => ({ hz: t.hz, searchHalfWidthHz: toneSearchHalfWidthHz(profile, i) })),
        )
      : undefined;
  const analysis = await analyzeRecording(file, {
    ...options,
    channels,
    resolutionHz,
    resultUnits: profile.units,
    histogram: options.histogram ?? true,
    accumulators: [...(options.accumulators ?? []), ...(toneAcc ? [toneAcc] : [])],
  });
  // A record whose Nyquist frequency lies at or below the profile's first frequency shows none of its range: no line,
  // no RMS (0 against 0), nothing a verdict could rest on. An input error, as ride's and shock's rates too low.
  const firstHz = profile.breakpoints[0]!.hz;
  if (!(analysis.input.sampleRateHz / 2 > firstHz)) {
    throw new InputError("CHECK_RATE_TOO_LOW", {
      file,
      expected: `a sample rate above ${2 * firstHz} Hz (twice the profile's first frequency, ${firstHz} Hz)`,
      received: `${analysis.input.sampleRateHz} Hz`,
    });
  }
  const fits = toneAcc ? (analysis.extras[analysis.extras.length - 1] as ToneFit[][]) : undefined;
  if (toneAcc) analysis.extras = analysis.extras.slice(0, -1);
  const judge = (sp: SpectrumUnderTest, f: (ToneFit | undefined)[] | undefined) =>
    profile.tones.length > 0 ? judgeMixedMode(sp, profile, f ?? []) : judgeSpectrum(sp, profile);
  // Without control every channel is judged and the record's verdict rests on all of them: the record's 5 %
  // is split over them (family). With control only the control spectrum decides; the channels are judged
  // alone for the reader, each as if it were the record's one spectrum.
  const family = options.control ? 1 : analysis.channels.length;
  // The level gate (level swings beyond the tolerance over the run, drift dominating): a pass needs it clear.
  const tolDb = profile.rmsToleranceDb
    ? Math.min(profile.rmsToleranceDb.upper, profile.rmsToleranceDb.lower)
    : Math.min(...profile.bands.map((b) => Math.min(b.upperDb, b.lowerDb)));
  // The share of the record's mean square (about its mean) below the profile's first frequency: what the
  // segments' detrending removed plus the lines below it.
  const f0 = profile.breakpoints[0]!.hz;
  const belowShare = (c: ChannelAnalysis) => {
    // rmsTime keeps the mean with --detrend none: an offset (gravity, a sensor's bias) is no drift, so the total is
    // taken about the mean there (the population variance; with a trend removed, rmsTime is the smaller).
    const total = Math.min(c.parseval.rmsTime * c.parseval.rmsTime, c.stats.std * c.stats.std);
    return total > 0 ? Math.max(0, 1 - bandMeanSquare(c.psd, f0, analysis.input.sampleRateHz / 2) / total) : 0;
  };
  const gate = (c: ChannelAnalysis) =>
    levelGate(c.stretchMeanSquares, c.stationarity.stretchS, tolDb, belowShare(c), f0);
  const judged = analysis.channels.map((c, i) =>
    withDoubts(withGate(judge({ ...spectrumOf(c, analysis), family }, fits?.[i]), gate(c)), [
      ...c.doubts,
      ...heldBand(c, profile),
    ]),
  );
  if (!options.control) {
    return {
      verdict: overallVerdict(judged.map((c) => c.verdict)),
      analysis,
      profile,
      channels: judged,
      roles: judged.map(() => "judged"),
    };
  }
  const pos = controlPositions(analysis, options.control.channels);
  const combined = combineSpectra(
    pos.map((i) => spectrumOf(analysis.channels[i]!, analysis)),
    options.control.rule,
  );
  const doubts = pos.flatMap((i) =>
    [...analysis.channels[i]!.doubts, ...heldBand(analysis.channels[i]!, profile)].map((d) =>
      aboutChannel(d, analysis.channels[i]!.name),
    ),
  );
  const gates = pos.flatMap((i) => gate(analysis.channels[i]!).map((d) => aboutChannel(d, analysis.channels[i]!.name)));
  const controlFits = fits
    ? profile.tones.map((_, t) =>
        combineFits(
          pos.map((i) => fits[i]?.[t]),
          options.control!.rule,
        ),
      )
    : undefined;
  const judgement = withDoubts(withGate(judge(combined, controlFits), gates), doubts);
  return {
    verdict: judgement.verdict,
    analysis,
    profile,
    channels: judged,
    roles: analysis.channels.map((_, i) => (pos.includes(i) ? "control" : "monitor")),
    control: { rule: options.control.rule, channels: pos.map((i) => analysis.channels[i]!.name), judgement },
  };
}
