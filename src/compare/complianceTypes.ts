import type { Detrend } from "../estimate/spectral/welchPsd.js";
import type { WindowName } from "../estimate/spectral/windows.js";
import type { Finding } from "../findings.js";
import type { PowerAt, PowerRequirement } from "./decisionRule.js";

/**
 * What judgeSpectrum (complianceCheck.ts) takes and gives: the spectrum under test, each judged line, the
 * excursions, the rule as it applied, and the channel's verdict with its findings. Types only, so that the parts
 * of the judgement (judgedGrid, lineTests, excursions, rmsTest, runLength) share them without a circle.
 */
export type Verdict = "pass" | "fail" | "inconclusive";

export interface LineDeviation {
  frequencyHz: number;
  /** The estimate as judged (the Nyquist line at twice its stored one-sided value). */
  measured: number;
  /** The profile seen through the analysis window's spectral kernel: what the estimate should show. */
  required: number;
  /** 10 log10(measured / required). */
  deviationDb: number;
  /** The band's limits at this line, dB, as seen through the same kernel. */
  upperDb: number;
  lowerDb: number;
  status: "within" | "above" | "below";
  /** Shown outside its band at the rule's family-wise level (not explained by chance among all lines). */
  shown: boolean;
  /** Shown beyond an outer limit. */
  beyondOuter: boolean;
  /** The outer limits at this line, dB, as seen through the kernel (when the profile has them). */
  outerUpperDb?: number | undefined;
  outerLowerDb?: number | undefined;
}

export interface Excursion {
  fromHz: number;
  toHz: number;
  direction: "above" | "below";
  lines: number;
  /** The largest deviation in the run, dB. */
  worstDb: number;
  worstHz: number;
  /** The band limit crossed at the worst line, dB (positive for above, negative for below). */
  limitDb: number;
  /** The worst line's own confidence interval (at the analysis confidence) lies wholly beyond the limit. */
  clear: boolean;
  /** Shown by the rule: a line of the run, or a stretch of lines around it, is outside at the family-wise level. */
  shown: boolean;
  /**
   * Bonferroni-adjusted p-value of the worst line: the chance of a line this far out among all tests if the PSD were on
   * the limit.
   */
  adjustedP: number;
  /**
   * For a run not shown: how many times longer a record would show its worst line with at least 90 %
   * probability, if the true spectrum is what was measured (read again through the window's kernel, as a
   * new run would show it). Undefined when that reading is inside the limit: no run length shows it.
   */
  longerRecordFactor: number | undefined;
  /** The same as a run length in seconds at this sample rate, segment and overlap. */
  secondsToShow: number | undefined;
}

export interface RuleReport {
  /** Upper bound of the false-fail rate for any true PSD inside the bands (Bonferroni). */
  falseFailBound: number;
  /** False-fail rate (union bound) if the true PSD equalled the profile, at the achieved DOF. */
  falseFailAtProfile: number;
  /** Per-line, per-direction test level against the band. */
  lineTestLevel: number;
  /** Stretches of neighbouring lines also tested, in lines. */
  stretchWidths: number[];
  /** Lines the profile allows outside the band. */
  allowanceLines: number;
  /** Power at the achieved DOF, each case, against the requirement that applies (the profile's or the default). */
  power: PowerAt;
  /** The DOF at which a pass has the stated power (0 when the profile asks none). */
  dofForPower: number;
  /** The power requirement that applies: psdgate's default, the profile's own, or none (null). */
  requirement: (PowerRequirement & { source: "default" | "profile" }) | null;
  /** Power at the achieved DOF against psdgate's default requirement, whatever the profile asks. */
  powerDefault: PowerAt;
  /** The DOF at which the default requirement is met. */
  dofForDefaultPower: number;
  /** The kernel's share on a departure of the requirement's width at its centre line (how much of it a line shows). */
  departureSeenShare: number;
  /** Spectra the record's verdict rests on; each is tested at falseFailBound / family. */
  family: number;
  /** With the largest of k control channels: k, the mean of the largest at the limit (dB), its moment-matched DOF. */
  largestOf: { channels: number; meanAllowanceDb: number; effectiveDof: number } | null;
}

/**
 * How long a run must be for the verdict to be decided (pass or fail) with `probability`, if the spectrum is what was
 * measured.
 */
export interface DecideEstimate {
  probability: number;
  /**
   * The DOF and the run length in seconds at this sample rate, segment and overlap; undefined when not within 1000x
   * this run.
   */
  dof: number | undefined;
  seconds: number | undefined;
  /** The decision most likely at that length. */
  likely: "pass" | "fail" | undefined;
}

export interface ChannelCompliance {
  channel: string;
  verdict: Verdict;
  /** Why the verdict is what it is, as findings (report/findingTexts.ts says them). */
  findings: Finding[];
  lines: LineDeviation[];
  excursions: Excursion[];
  /**
   * Lines in the profile's range that were not judged, and why (notch: the window's kernel is not modelled well enough
   * there; excluded: left out by the caller's mask).
   */
  unjudged: { edge: number; detrend: number; aboveRecord: number; notch: number; excluded: number };
  rms: {
    measured: number;
    required: number;
    deviationDb: number;
    upperDb: number | undefined;
    lowerDb: number | undefined;
    /** Within tolerance as measured. */
    ok: boolean;
    /** Shown outside its tolerance by the rule. */
    shown: boolean;
    /** Satterthwaite DOF of the mean square over the range. */
    dof: number;
  };
  dof: { achieved: number; required: number | undefined; forPower: number; ok: boolean };
  rule: RuleReport;
  /** For an inconclusive verdict that a longer run could decide: how long. Undefined otherwise. */
  decide?: DecideEstimate | undefined;
  /** Mixed mode: each required tone and its verdict (compare/toneCheck.ts). */
  tones?: ToneJudgement[] | undefined;
}

/** What the judgement needs of a measured spectrum. */
export interface SpectrumUnderTest {
  name: string;
  frequencyHz: Float64Array;
  psd: Float64Array;
  /** Equivalent DOF of the interior lines. */
  dof: number;
  lineSpacingHz: number;
  sampleRateHz: number;
  /** Length of what was analysed, s: the --from/--to window when there is one. */
  durationS: number;
  /** The --from/--to window (s from the record's first sample), when only part of the record was analysed. */
  analysedWindow?: { fromS: number; toS: number } | undefined;
  window: WindowName;
  segmentLength: number;
  detrend: Detrend;
  confidence: number;
  /**
   * With the largest of k control channels taken at each line, k (its upper tests use the largest's distribution); else
   * 1.
   */
  upperSharedBy?: number | undefined;
  /**
   * Spectra the record's verdict rests on (every judged channel, or the one control spectrum): the 5 % is split over
   * them. Default 1.
   */
  family?: number | undefined;
  /** Fraction of a segment shared with the next (for run lengths in seconds); default 0.5. */
  overlap?: number | undefined;
  /**
   * Lines left out of the judgement by the caller (index into psd, non-zero to leave out), e.g. the lines
   * of a sine tone on a sine-on-random profile. They are counted in `unjudged.excluded`; the RMS is not changed.
   */
  excludedLines?: Uint8Array | undefined;
}

/**
 * Mixed mode (compare/toneCheck.ts): the tones' lines come in `excludedLines`; here the tones' mean square is added to
 * the required RMS (the RMS is the total) and the tones' share of the family-wise budget is taken from the lines'.
 */
export interface ToneAllowance {
  /** Sum of peak^2 / 2 of the required tones inside the compared range. */
  toneMeanSquare: number;
  /** Alpha taken from the lines' share for the tones. */
  toneShare: number;
}

/** One sine tone of a mixed-mode profile as judged (compare/toneCheck.ts). */
export interface ToneJudgement {
  name: string;
  /** Nominal frequency, Hz, and how far the tone may lie from it. */
  hz: number;
  toleranceHz: number;
  requiredPeak: number;
  /** Fitted peak and frequency. */
  measuredPeak: number;
  measuredHz: number;
  lowerPeak: number;
  upperPeak: number;
  /** 20 log10(measured / required). */
  deviationDb: number;
  /** Standard deviation of the fitted peak and frequency, and the background density they rest on. */
  peakSd: number;
  frequencySd: number;
  backgroundDensity: number;
  /** The lines the tone occupies (left out of the background's judgement). */
  linesFromHz: number;
  linesToHz: number;
  status: "within" | "low" | "high" | "missing" | "off-frequency";
  /** Shown outside its tolerance (peak or frequency) at the tone's level. */
  shown: boolean;
  /** The tone lies at or above the record's Nyquist frequency (with its allowance): not seen, inconclusive. */
  unseen?: boolean | undefined;
  /** Per-test level (each of the tone's four tests), and the tone's share of the false-fail rate. */
  testLevel: number;
  falseFailRate: number;
  verdict: Verdict;
}
