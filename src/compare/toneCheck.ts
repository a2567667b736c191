import { normalQuantile } from "../estimate/statistics/distributions.js";
import { toneFrequencySd, toneLines, tonePeakSd, type ToneFit } from "../estimate/spectral/toneEstimate.js";
import { spectralWindow } from "../estimate/spectral/windows.js";
import type { Finding } from "../findings.js";
import {
  judgeSpectrum,
  type ChannelCompliance,
  type SpectrumUnderTest,
  type ToneJudgement,
  type Verdict,
} from "./complianceCheck.js";
import { DECISION_RULE } from "./decisionRule.js";
import { profileLevel, type ProfileTone, type TestProfile } from "./testProfile.js";

export type { ToneJudgement };

/**
 * Mixed mode (sine-on-random): the random background judged by the decision rule with the tones' lines left
 * out, and each tone judged against its tolerance.
 *
 * - **The lines a tone occupies**: every line on which the tone's leakage through the window's kernel, at the
 *   larger of its required upper limit and its measured peak, at its nominal and its measured frequency,
 *   exceeds 1 % of the profile's level (0.04 dB; toneEstimate.ts toneLines). They are left out of the
 *   background's line and stretch tests, so a tone never makes a background excursion; the RMS test keeps
 *   them, against the total required RMS (random plus the tones' peak^2 / 2).
 * - **Each tone**: the fitted peak A (toneEstimate.ts: least-squares at the periodogram peak) has standard
 *   deviation s = sqrt(G / T) on a background of density G around it (the mean of the measured lines just
 *   outside its lines). It is shown below its lower limit L when A < L - z s and above its upper limit U when
 *   A > U + z s; its frequency is shown off when |f - f_nom| > toleranceHz + z s_f. z is the normal quantile
 *   at DECISION_RULE.tones / (4 n) for n tones: the tones' 1 % of the family-wise 5 % is shared equally over
 *   the tones and their four tests (Bonferroni), and taken from the lines' share, so the whole still holds
 *   at 5 %. For a tone well above the background A is normal about the true peak (Kay 1993, sec. 3.7 — from
 *   memory); a missing tone gives a Rayleigh A of scale s.
 * - **A pass** needs the power to see a tone `departureDb` (1.5 dB) beyond either limit with 95 % probability:
 *   (U (10^(1.5/20) - 1)) and (L (1 - 10^(-1.5/20))) at least (z + z_0.95) s. Below that, an unshown tone
 *   outside its limits, or inside them but unresolved, is inconclusive.
 */

const MISSING_SD = 5;

function limits(t: ProfileTone) {
  return { lo: t.peak * Math.pow(10, -t.lowerDb / 20), up: t.peak * Math.pow(10, t.upperDb / 20) };
}

/** The profile's level at f, held at its ends outside its range. */
function levelNear(p: TestProfile, f: number): number {
  const f0 = p.breakpoints[0]!.hz;
  const fN = p.breakpoints[p.breakpoints.length - 1]!.hz;
  return profileLevel(p, Math.min(fN, Math.max(f0, f)));
}

/** A tone's lines: the first and last line index it occupies. */
interface LineSpan {
  first: number;
  last: number;
}

/**
 * What every tone of one spectrum is tested with: the line spacing, the test level, its z, the power's z and the
 * departure's gain.
 */
interface ToneTest {
  df: number;
  level: number;
  z: number;
  zPower: number;
  g: number;
}

/**
 * Judge one spectrum of a mixed-mode profile: the background with the tones' lines left out, and each tone from
 * its fit (fits in the profile's tone order; a missing fit is judged as a tone of zero peak).
 */
export function judgeMixedMode(
  sp: SpectrumUnderTest,
  profile: TestProfile,
  fits: readonly (ToneFit | undefined)[],
): ChannelCompliance {
  const tones = profile.tones;
  if (tones.length === 0) return judgeSpectrum(sp, profile);
  const nLines = sp.psd.length;
  const excluded = new Uint8Array(nLines);
  const spans = toneSpans(sp, profile, fits, excluded);
  const toneMs = toneMeanSquare(sp, profile);
  // The caller's own mask (if any) and the tones' lines together.
  if (sp.excludedLines)
    for (let k = 0; k < nLines && k < sp.excludedLines.length; k++) if (sp.excludedLines[k]) excluded[k] = 1;
  const background = judgeSpectrum({ ...sp, excludedLines: excluded }, profile, {
    toneMeanSquare: toneMs,
    toneShare: DECISION_RULE.tones,
  });

  // Each spectrum of a record judged as several (sp.family) gets its share of the record's rate, as the lines do.
  const level = DECISION_RULE.tones / (4 * tones.length * Math.max(1, sp.family ?? 1));
  const test: ToneTest = {
    df: sp.lineSpacingHz,
    level,
    z: normalQuantile(1 - level),
    zPower: normalQuantile(DECISION_RULE.power),
    g: Math.pow(10, DECISION_RULE.departureDb / 20),
  };
  const judged: ToneJudgement[] = tones.map((t, i) => judgeTone(sp, profile, t, fits[i], spans[i]!, excluded, test));
  return mergeTones(background, judged);
}

/** The lines each tone occupies, at its nominal and at its fitted frequency, each marked in `excluded`. */
function toneSpans(
  sp: SpectrumUnderTest,
  profile: TestProfile,
  fits: readonly (ToneFit | undefined)[],
  excluded: Uint8Array,
): LineSpan[] {
  const window = spectralWindow(sp.window, sp.segmentLength);
  const df = sp.lineSpacingHz;
  const nLines = sp.psd.length;
  return profile.tones.map((t, i) => {
    const fit = fits[i];
    const a = Math.max(limits(t).up, fit?.peak ?? 0);
    const bg = (k: number) => levelNear(profile, k * df);
    const s1 = toneLines(window, df, nLines, t.hz, a, bg);
    const s2 = fit ? toneLines(window, df, nLines, fit.frequencyHz, a, bg) : s1;
    const span = { first: Math.min(s1.first, s2.first), last: Math.max(s1.last, s2.last) };
    for (let k = span.first; k <= span.last; k++) excluded[k] = 1;
    return span;
  });
}

/**
 * The tones' required mean square (peak^2 / 2 each) inside the profile's range and below the record's Nyquist
 * frequency.
 */
function toneMeanSquare(sp: SpectrumUnderTest, profile: TestProfile): number {
  const f0 = profile.breakpoints[0]!.hz;
  const top = Math.min(profile.breakpoints[profile.breakpoints.length - 1]!.hz, sp.sampleRateHz / 2);
  let toneMs = 0;
  for (const t of profile.tones) if (t.hz >= f0 && t.hz <= top) toneMs += (t.peak * t.peak) / 2;
  return toneMs;
}

/** Background density next to a tone's lines: the mean of up to 8 unexcluded lines each side (`fallback` when none). */
function backgroundDensity(psd: ArrayLike<number>, excluded: Uint8Array, span: LineSpan, fallback: number): number {
  const nLines = psd.length;
  let sum = 0;
  let count = 0;
  for (let k = span.first - 1, got = 0; k >= 1 && got < 8; k--)
    if (!excluded[k]) {
      sum += psd[k]!;
      count++;
      got++;
    }
  for (let k = span.last + 1, got = 0; k < nLines && got < 8; k++)
    if (!excluded[k]) {
      sum += psd[k]!;
      count++;
      got++;
    }
  return count > 0 ? sum / count : fallback;
}

/** One tone judged from its fit: shown low, high, missing or off its frequency, else within (resolved or not). */
function judgeTone(
  sp: SpectrumUnderTest,
  profile: TestProfile,
  t: ProfileTone,
  fit: ToneFit | undefined,
  span: LineSpan,
  excluded: Uint8Array,
  test: ToneTest,
): ToneJudgement {
  if (t.hz + t.toleranceHz >= sp.sampleRateHz / 2) return unseenTone(t, span, test);
  const { df, level, z, zPower, g } = test;
  const G = backgroundDensity(sp.psd, excluded, span, levelNear(profile, t.hz));
  const T = fit?.durationS ?? sp.durationS;
  const peak = fit?.peak ?? 0;
  const hz = fit?.frequencyHz ?? t.hz;
  const sd = tonePeakSd(G, T);
  const fSd = toneFrequencySd(G, peak, T);
  const { lo, up } = limits(t);
  const low = peak < lo - z * sd;
  const high = peak > up + z * sd;
  const missing = low && peak < MISSING_SD * sd;
  const off = !missing && Math.abs(hz - t.hz) > t.toleranceHz + z * fSd;
  const shown = low || high || off;
  const outsideAsMeasured = peak < lo || peak > up || Math.abs(hz - t.hz) > t.toleranceHz;
  const resolved = up * (g - 1) >= (z + zPower) * sd && lo * (1 - 1 / g) >= (z + zPower) * sd;
  const status: ToneJudgement["status"] = missing
    ? "missing"
    : low
      ? "low"
      : high
        ? "high"
        : off
          ? "off-frequency"
          : "within";
  const verdict: Verdict = shown ? "fail" : outsideAsMeasured || !resolved || !(sp.dof > 0) ? "inconclusive" : "pass";
  return {
    name: t.label,
    hz: t.hz,
    toleranceHz: t.toleranceHz,
    requiredPeak: t.peak,
    measuredPeak: peak,
    measuredHz: hz,
    lowerPeak: lo,
    upperPeak: up,
    deviationDb: 20 * Math.log10(peak / t.peak),
    peakSd: sd,
    frequencySd: fSd,
    backgroundDensity: G,
    linesFromHz: span.first * df,
    linesToHz: span.last * df,
    status,
    shown,
    testLevel: level,
    falseFailRate: 4 * level,
    verdict,
  };
}

/** A tone the record cannot hold (at or above its Nyquist frequency): nothing can be shown either way. */
function unseenTone(t: ProfileTone, span: LineSpan, test: ToneTest): ToneJudgement {
  const { lo, up } = limits(t);
  return {
    name: t.label,
    hz: t.hz,
    toleranceHz: t.toleranceHz,
    requiredPeak: t.peak,
    measuredPeak: NaN,
    measuredHz: NaN,
    lowerPeak: lo,
    upperPeak: up,
    deviationDb: NaN,
    peakSd: NaN,
    frequencySd: NaN,
    backgroundDensity: NaN,
    linesFromHz: span.first * test.df,
    linesToHz: span.last * test.df,
    status: "within",
    shown: false,
    testLevel: test.level,
    falseFailRate: 4 * test.level,
    verdict: "inconclusive",
    unseen: true,
  };
}

/**
 * The background's judgement with the tones' verdicts: a tone shown outside fails, an unresolved one keeps a pass from
 * standing.
 */
function mergeTones(c: ChannelCompliance, tones: ToneJudgement[]): ChannelCompliance {
  const fails: Finding[] = [];
  const blockers: Finding[] = [];
  for (const t of tones) {
    const about = { tone: t.name };
    if (t.unseen) {
      blockers.push({ code: "TONE_ABOVE_RECORD", values: { hz: t.hz, toleranceHz: t.toleranceHz }, about });
    } else if (t.status === "missing") {
      fails.push({
        code: "TONE_MISSING",
        values: { hz: t.hz, peak: t.measuredPeak, requiredPeak: t.requiredPeak, lowerPeak: t.lowerPeak },
        about,
      });
    } else if (t.status === "low" || t.status === "high") {
      fails.push({
        code: "TONE_OUTSIDE",
        values: {
          hz: t.hz,
          peak: t.measuredPeak,
          requiredPeak: t.requiredPeak,
          deviationDb: t.deviationDb,
          lowerPeak: t.lowerPeak,
          upperPeak: t.upperPeak,
        },
        about: { ...about, status: t.status },
      });
    } else if (t.status === "off-frequency") {
      fails.push({
        code: "TONE_OFF_FREQUENCY",
        values: { hz: t.hz, measuredHz: t.measuredHz, toleranceHz: t.toleranceHz },
        about,
      });
    } else if (t.verdict === "inconclusive") {
      const outside =
        t.measuredPeak < t.lowerPeak || t.measuredPeak > t.upperPeak || Math.abs(t.measuredHz - t.hz) > t.toleranceHz;
      blockers.push({
        code: "TONE_UNRESOLVED",
        values: {
          hz: t.hz,
          peak: t.measuredPeak,
          deviationDb: t.deviationDb,
          ...(outside
            ? {}
            : { peakSd: t.peakSd, departureDb: DECISION_RULE.departureDb, powerPercent: 100 * DECISION_RULE.power }),
        },
        about,
      });
    }
  }
  const findings = [
    ...fails,
    ...c.findings.filter((f) => f.code !== "PASS" || (fails.length === 0 && blockers.length === 0)),
    ...blockers,
  ];
  const verdict: Verdict =
    fails.length > 0 || c.verdict === "fail"
      ? "fail"
      : blockers.length > 0 || c.verdict === "inconclusive"
        ? "inconclusive"
        : "pass";
  if (verdict === "pass") {
    findings.push({
      code: "TONES_PASS",
      values: {
        tones: tones.length,
        departureDb: DECISION_RULE.departureDb,
        falseFailPercent: 100 * DECISION_RULE.tones,
      },
    });
  }
  return { ...c, verdict, findings, tones };
}

/**
 * The search half-width of a tone's fit: twice its frequency allowance, at least 0.5 Hz, and never reaching a
 * neighbouring tone's allowance (chosen here).
 */
export function toneSearchHalfWidthHz(profile: TestProfile, index: number): number {
  const t = profile.tones[index]!;
  let r = Math.max(2 * t.toleranceHz, 0.5);
  for (const o of profile.tones) if (o !== t) r = Math.min(r, Math.abs(o.hz - t.hz) - o.toleranceHz);
  return Math.max(t.toleranceHz, r);
}

/** One fit for a control spectrum of several channels: the mean of their peaks (average) or the largest (largest). */
export function combineFits(list: (ToneFit | undefined)[], rule: "average" | "largest"): ToneFit | undefined {
  const ok = list.filter((f): f is ToneFit => f !== undefined);
  if (ok.length === 0) return undefined;
  const pick = rule === "largest" ? ok.reduce((a, b) => (b.peak > a.peak ? b : a)) : ok[0]!;
  return rule === "largest"
    ? pick
    : {
        ...pick,
        peak: ok.reduce((a, b) => a + b.peak, 0) / ok.length,
        frequencyHz: ok.reduce((a, b) => a + b.frequencyHz, 0) / ok.length,
      };
}
