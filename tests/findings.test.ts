import { readdirSync, readFileSync, statSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { _channelFindings, analyzeRecording } from "../src/pass/analyzeRecording.js";
import { checkRecording, loadProfile } from "../src/analyses/checkRecording.js";
import { judgeSpectrum, withDoubts, type SpectrumUnderTest } from "../src/compare/complianceCheck.js";
import { levelGate } from "../src/compare/levelGate.js";
import { parseProfile } from "../src/compare/testProfile.js";
import { judgeMixedMode } from "../src/compare/toneCheck.js";
import { FINDING_CODES, type Finding, type FindingAbout, type FindingCode } from "../src/findings.js";
import { findingText } from "../src/report/findingTexts.js";
import { tempDir } from "./helpers.js";
import { shapedRecord } from "./shapedRecords.js";
import { wavBytes } from "./wavBytes.js";

/**
 * Findings are data: a code, its values and what else the sentence names (`about`); the sentences are
 * rendered at the edge by src/report/findingTexts.ts. This file holds (1) a table, one row per code, of
 * values and the sentence they render to; (2) that the library below report/ holds no prose for findings;
 * (3) that the library makes every code it can, and that each value it sets is a number the rendered
 * sentence states, as the sentence rounds it, so the two cannot drift apart.
 */

/** One row per code: its values, what else it names, and the sentence they render to (word for word what psdgate prints). */
const TABLE: [FindingCode, Record<string, number>, FindingAbout | undefined, string][] = [
  [
    "NON_FINITE",
    { samples: 17, segmentsLeftOut: 3 },
    undefined,
    "17 sample(s) are NaN or infinite; 3 segment(s) left out of the PSD",
  ],
  [
    "HELD_SAMPLES",
    { meanRun: 4, heldPercent: 99.8, updateRateHz: 50, sampleRateHz: 200, nyquistHz: 25 },
    undefined,
    "held samples: values repeat in runs of 4.00 on average (99.8 % of samples in runs of two or more): the sensor updated at about 50 Hz and the file repeats its readings to 200 Hz; content above 25 Hz is the hold's images, not motion, and the clipping count takes each held extreme once",
  ],
  [
    "CLIPPING",
    { atMax: 40, max: 2.5, atMin: 31, min: -2.5 },
    undefined,
    "possible clipping: 40 sample(s) at the maximum 2.5 and 31 at the minimum -2.5",
  ],
  [
    "NO_SIGNAL",
    { samples: 65536, value: 0 },
    undefined,
    "no signal: all 65536 finite sample(s) hold the one value 0 (a dead or disconnected sensor?)",
  ],
  [
    "TOO_SHORT",
    { samples: 900, segmentLength: 1024 },
    undefined,
    "record of 900 samples is shorter than one segment of 1024",
  ],
  [
    "FEW_AVERAGES",
    { averages: 3, lineErrorPercent: 57.74 },
    undefined,
    "only 3 average(s): each line is uncertain by ±58 % (1 sigma)",
  ],
  [
    "DC_OFFSET",
    { mean: 0.12345, meanPercentOfStd: 43.21 },
    undefined,
    "DC offset: mean 0.12345 is 43 % of the standard deviation (sensor bias or gravity?)",
  ],
  [
    "GRAVITY_AS_G",
    { mean: 9.8123 },
    undefined,
    "no unit is stated for this channel, so it was read as g, but its mean of 9.8123 is 1 g of gravity written in m/s²: if the file holds m/s², give --units m/s2 (read as g, every level is 9.81 times too high)",
  ],
  [
    "PARSEVAL_MISMATCH",
    { offPercent: 3.45, allowedPercent: 2 },
    undefined,
    "Parseval mismatch: RMS from the PSD is 3.45 % off the RMS of the same detrended segments (allowed ±2.0 %)",
  ],
  [
    "BELOW_FIRST_LINE",
    { sharePercent: 12.34 },
    undefined,
    "12.3 % of the record's mean square is slower than the first line (drift or a slow trend); the PSD leaves it out",
  ],
  [
    "NOT_STATIONARY",
    {
      statistic: 90,
      acceptAbove: 146,
      acceptAtMost: 233,
      values: 20,
      testPercent: 2,
      stretches: 20,
      stretchS: 0.8192,
      departingFromS: 6.5536,
      departingToS: 7.3728,
      departingDb: 4.76,
    },
    undefined,
    "not stationary: reverse arrangements A = 90 outside 146 < A <= 233 (20 values, 2 % test) on 20 stretch mean squares of 0.8192 s; the PSD averages unlike stretches; most departing 6.5536-7.3728 s at +4.8 dB from the median",
  ],
  [
    "WINDOW_PAST_END",
    { requestedToS: 100, recordEndS: 12.8 },
    undefined,
    "the window's end 100 s lies past the end of the record; the window ends at 12.8 s",
  ],
  [
    "RATE_MOVED",
    { sampleRateHz: 1000, designRateHz: 1024 },
    undefined,
    "the record's rate is 1000 Hz from its whole time column, but the window and the rate-dependent analyses were set up for the 1024 Hz its first rows gave",
  ],
  [
    "CREST_LOW",
    { crestFactor: 1.6, crossings: 12345 },
    undefined,
    "crest factor 1.60 (max |x - trend| / rms) is far below a Gaussian record's: one this long would pass ±1.60 sigma about 1.23e+4 times (saturated or clipped signal?)",
  ],
  [
    "KURTOSIS_LOW",
    { kurtosis: 1.9, spread: 0.061 },
    undefined,
    "kurtosis 1.900 is far below a Gaussian record's 3 (±0.061 for this record): peaks cut off or a deterministic signal",
  ],
  [
    "KURTOSIS_HIGH",
    { kurtosis: 7.5, spread: 0.061 },
    undefined,
    "kurtosis 7.500 is above a Gaussian record's 3 (±0.061): more large peaks than Gaussian (shocks, impacts); the PSD alone understates them",
  ],
  [
    "CREST_HIGH",
    { crestFactor: 40 },
    undefined,
    "crest factor 40.00 is above what a Gaussian record this long reaches (shock or spike?)",
  ],
  [
    "KURTOSIS_QUANTISED",
    { kurtosis: 10.5, spread: 0.061, std: 0.000153, quantum: 0.000305 },
    undefined,
    "kurtosis 10.500 is above a Gaussian record's 3 (±0.061), but the standard deviation 0.000153 is within 2 steps of the channel's quantisation step 0.000305: there the samples are not Gaussian by construction, and the kurtosis cannot tell shocks",
  ],
  [
    "CREST_QUANTISED",
    { crestFactor: 6.5, std: 0.000153, quantum: 0.000305 },
    undefined,
    "crest factor 6.50 is above what a Gaussian record this long reaches, but the standard deviation 0.000153 is within 2 steps of the channel's quantisation step 0.000305: there the samples are not Gaussian by construction, and the crest factor cannot tell a shock or spike",
  ],
  [
    "LINES_OUTSIDE",
    { lines: 80, judged: 383, allowance: 19, falseFailPercent: 5 },
    { family: 2 },
    "80 of 383 lines shown outside their tolerance band (the profile allows 19), beyond what chance among all lines explains (false-fail rate at most 5 % per record (2 spectra judged, 2.5 % each))",
  ],
  ["OUTER_LIMIT", { lines: 12 }, undefined, "12 line(s) shown beyond the outer limits, which no line may cross"],
  [
    "RMS_OUTSIDE",
    { rms: 2.345, deviationDb: 1.23, requiredRms: 2, fromHz: 20, toHz: 1280, upperDb: 1, lowerDb: 1 },
    undefined,
    "RMS 2.345 is +1.23 dB from the required 2.000 (over the 20–1280 Hz the record covers), shown outside the allowed +1.00 / -1.00 dB",
  ],
  [
    "RMS_UNRESOLVED",
    { deviationDb: 1.3, upperDb: 1, lowerDb: 1, dof: 383 },
    undefined,
    "RMS +1.30 dB is outside the allowed +1.00 / -1.00 dB as measured, but within what chance explains at 383 DOF",
  ],
  ["NO_LINES", {}, undefined, "no spectral line of the record can be judged inside the profile's range"],
  [
    "DOF_BELOW_PROFILE",
    { dof: 400, requiredDof: 1000, secondsForDof: 1500 },
    undefined,
    "degrees of freedom 400.0 below the required 1000: record too short for the statistical accuracy the profile asks (1000 DOF take a run of 1500.0 s at this rate, segment and overlap)",
  ],
  [
    "DOF_BELOW_POWER",
    {
      dof: 2,
      dofForPower: 116,
      departureDb: 3,
      departurePercent: 10,
      widthLines: 4,
      lines: 383,
      powerPercent: 90,
      achievedPowerPercent: 4.2,
      secondsForPower: 58,
    },
    undefined,
    "degrees of freedom 2.0 below the 116 at which a 3 dB departure beyond the band over 10 % of the 383 lines, in runs of 4 line(s) or wider, would be seen with 90 % probability (here 4.2 %); 116 DOF take a run of 58.0 s",
  ],
  [
    "RANGE_ABOVE_RECORD",
    { profileTopHz: 2000, sampleRateHz: 2560, nyquistHz: 1280, linesUnseen: 288 },
    undefined,
    "the profile runs to 2000 Hz but the record's sample rate 2560 Hz shows only up to 1280 Hz: 288 line(s) of the profile cannot be seen",
  ],
  [
    "RANGE_BELOW_JUDGED",
    { firstLineHz: 30, gapHz: 10 },
    undefined,
    "the first judged line is 30 Hz, 10.0 Hz above the profile's start (lines below are biased by detrending or leakage): the analysis cannot show the bottom of the range; use a finer resolution or no detrending",
  ],
  [
    "RESOLUTION_COARSE",
    { lineSpacingHz: 2.5, profileResolutionHz: 1 },
    undefined,
    "line spacing 2.500 Hz is coarser than the profile's resolution 1 Hz: narrow excursions could hide between lines",
  ],
  [
    "DURATION_SHORT",
    { durationS: 25, requiredDurationS: 40, fromS: 5, toS: 30 },
    undefined,
    "the analysed window 5.000 to 30.000 s lasts 25.00 s, shorter than the 40 s the profile requires: it cannot show the whole test",
  ],
  [
    "RUN_TO_DECIDE",
    { seconds: 1234.5, dof: 2469, probabilityPercent: 90 },
    { likely: "pass" },
    "a run of 1234.5 s (2469 DOF) would decide this verdict with at least 90 % probability if the spectrum is as measured (most likely a pass)",
  ],
  [
    "NOTCH_LINES_LEFT_OUT",
    { lines: 3 },
    undefined,
    "3 line(s) near the profile's ends left out: the profile changes too steeply there for the window's kernel to say what the line should show",
  ],
  [
    "PASS",
    {
      lines: 383,
      departureDb: 3,
      widthLines: 4,
      powerPercent: 99.9,
      defaultPowerPercent: 99.9,
      falseFailPercent: 0.004,
      recordFalseFailPercent: 5,
    },
    { requirement: "default" },
    "no line and not the RMS shown outside tolerance across 383 lines, with the power to see a 3 dB departure in runs of 4 line(s) or wider (99.9 %); against psdgate's default requirement 99.9 %; false-fail rate at most 5 % per record, below 0.01 % here if the PSD equals the profile",
  ],
  [
    "FAIL_IN_DOUBT",
    {},
    undefined,
    "a failure was shown, but the data are in doubt (above), so it cannot stand as a verdict",
  ],
  [
    "LEVEL_SWING",
    { fromS: 0, toS: 32, levelDb: 2.1, toleranceDb: 1, falseDoubtPercent: 1 },
    undefined,
    "the level swings over the run: 0-32 s sits +2.10 dB from the run's mean, beyond the ±1.00 dB the profile allows by more than chance explains (false-doubt rate at most 1 % on a stationary record): the average spectrum does not describe the run",
  ],
  [
    "DRIFT_DOMINATES",
    { sharePercent: 64, limitPercent: 50, belowHz: 20 },
    undefined,
    "64.0 % of the record's mean square lies below the profile's first frequency 20 Hz (drift or a slow swing), more than 50 %: the record is not the random vibration the profile describes",
  ],
  [
    "TONE_ABOVE_RECORD",
    { hz: 1500, toleranceHz: 1 },
    { tone: "hum" },
    "hum (1500 Hz): the tone (±1 Hz) does not lie below the record's Nyquist frequency, so the record cannot show it",
  ],
  [
    "TONE_MISSING",
    { hz: 120, peak: 0.01, requiredPeak: 2, lowerPeak: 1.783 },
    { tone: "hum" },
    "hum (120 Hz) is missing: fitted peak 0.01 against the required 2 (at least 1.783), no more than the background's own noise there",
  ],
  [
    "TONE_OUTSIDE",
    { hz: 120, peak: 1.5, requiredPeak: 2, deviationDb: -2.5, lowerPeak: 1.783, upperPeak: 2.244 },
    { tone: "hum", status: "low" },
    "hum (120 Hz): peak 1.5 is -2.50 dB from the required 2, shown below its limits 1.783–2.244",
  ],
  [
    "TONE_OFF_FREQUENCY",
    { hz: 120, measuredHz: 121.5, toleranceHz: 0.5 },
    { tone: "hum" },
    "hum (120 Hz) lies at 121.5 Hz, shown further from 120 Hz than the ±0.5 Hz allowed",
  ],
  [
    "TONE_UNRESOLVED",
    { hz: 120, peak: 1.95, deviationDb: -0.22, peakSd: 0.5, departureDb: 3, powerPercent: 90 },
    { tone: "hum" },
    "hum (120 Hz): peak 1.95 (-0.22 dB) is within its tolerance, but with a standard deviation of 0.5 the record could not show a 3 dB departure with 90 % probability",
  ],
  [
    "TONES_PASS",
    { tones: 1, departureDb: 3, falseFailPercent: 1 },
    undefined,
    "1 tone(s) within their tolerance, each shown in place with the power to see a 3 dB departure (the tones' share of the false-fail rate 1 %)",
  ],
  [
    "HELD_BAND",
    { profileTopHz: 80, nyquistHz: 25 },
    undefined,
    "the profile runs to 80 Hz, but the sensor behind this channel updated only up to 25 Hz (held samples): the lines above show the hold's images, not the motion",
  ],
  [
    "NO_PSD_ROUTE",
    { segmentLength: 4096 },
    { axis: "z" },
    "z: the window holds no whole Welch segment of 4096 samples, so there is no a_w from the PSD to check against (a coarser resolution or a shorter segment gives one)",
  ],
  [
    "ROUTES_DIFFER",
    { offPercent: 3.21, allowedPercent: 1.1 },
    { axis: "z", channel: "seat" },
    "z (seat): a_w from the PSD is +3.21 % off a_w in time over the same samples of a stationary record (allowed ±1.1 %): the weighting or the spectrum is in question",
  ],
  [
    "ROUTES_DIFFER_NOT_STATIONARY",
    { offPercent: -4.5, allowedPercent: 1.1, statistic: 40, acceptAbove: 41, acceptAtMost: 60, values: 100 },
    { axis: "y", channel: "1", level: "weighted", test: "runs" },
    "y (1): a_w from the PSD is -4.50 % off a_w in time over the same samples (±1.1 % on a stationary record); the weighted level is not stationary (run test: R = 40 outside 41 < R <= 60, 100 values), and Welch's segments and the weighting filter's memory share a changing level out unlike each other; a_w is the time-domain value",
  ],
  [
    "PSD_VS_PLAIN",
    { offPercent: -2.5 },
    { axis: "x" },
    "x: a_w from the PSD is -2.50 % off the plain time average because Welch tapers the record's ends and drops its last partial segment, which matters on a non-stationary record; a_w is the time-domain value",
  ],
  [
    "NON_FINITE_HELD",
    { samples: 1 },
    { axis: "z", channel: "1" },
    "z (1): 1 non-finite sample(s) were held at the last finite value before weighting",
  ],
  [
    "DEAD_STRETCH",
    { fromS: 20, toS: 30 },
    { axis: "z", channel: "1" },
    "z (1): 20-30 s holds no signal at all (mean square 0: a logger that froze or dropped out?): a_w, VDV, MTVV and A(8) count it as no vibration and may be understated; analyse the live part with --from/--to",
  ],
  [
    "LEVEL_NOT_STATIONARY",
    {
      statistic: 300,
      acceptAbove: 146,
      acceptAtMost: 233,
      values: 20,
      departingFromS: 120,
      departingToS: 150,
      departingDb: -3.2,
    },
    { axis: "z", exposure: true },
    "z: weighted level not stationary (reverse arrangements A = 300 outside 146 < A <= 233, 20 values); most departing 120-150 s at -3.2 dB: a_w averages unlike stretches, and A(8) assumes the recording stands for the whole exposure",
  ],
  [
    "PARSEVAL_NOT_STATIONARY",
    { offPercent: -19.2, allowedPercent: 2, statistic: 120, acceptAbove: 146, acceptAtMost: 233, values: 20 },
    { axis: "y", channel: "1", level: "unweighted", test: "reverse-arrangements" },
    "y (1): Parseval mismatch: RMS from the PSD is -19.20 % off the RMS of the same detrended segments (allowed ±2.0 %); the unweighted level is not stationary (reverse arrangements A = 120 outside 146 < A <= 233, 20 values): Hann segments weigh a changing level unlike a plain mean over the same samples, so this is expected of the ride and the PSD stands for its average",
  ],
  [
    "BASIC_METHOD_EXCEEDED",
    { crestFactor: 9.4, mtvvRatio: 1.2, vdvRatio: 1.8 },
    { axis: "z" },
    "z: the basic r.m.s. method may underestimate (crest factor 9.40 > 9, MTVV/a_w 1.20, VDV/(a_w T^1/4) 1.80 > 1.75): judge by VDV and MTVV as well (ISO 2631-1 6.3)",
  ],
  [
    "WEIGHTING_ERROR",
    { rateHz: 200, maxErrorPercent: 2.7, atHz: 80, topCentreHz: 80 },
    { filters: 4, exposure: true, floor: true },
    "at 200 Hz the time-domain weightings are within 2.7 % of ISO 2631-1's |W(f)| at the one-third-octave centres to 80 Hz (largest at 80 Hz): a_w, crest factor, VDV, MTVV, the total value, A(8), the daily VDV and SEAT carry it; a_w from the PSD applies |W(f)| exactly",
  ],
  [
    "WEIGHTING_ERROR_ON_RECORD",
    { offPercent: 6.154, statedPercent: 2, topCentreHz: 40, nyquistHz: 50 },
    { axis: "z" },
    "z: on this record's spectrum the time-domain weighting reads a_w +6.15 % off |W(f)| applied exactly, beyond the 2 % stated at the one-third-octave centres (the realisation departs most between the centres, in the top band and between 40 Hz and Nyquist 50 Hz): a_w, crest factor, VDV, MTVV and what is made from them carry it; a_w from the PSD applies |W(f)| exactly",
  ],
  [
    "BAND_SHORT",
    { nyquistHz: 50, topCentreHz: 40 },
    undefined,
    "the record holds nothing above its Nyquist frequency 50 Hz: the weighted figures cover ISO 2631-1's one-third-octave bands of 0.5-80 Hz whole to 40 Hz and the rest only to 50 Hz, and leave out any motion above",
  ],
  [
    "EXPOSURE_NOT_GIVEN",
    {},
    undefined,
    "no daily exposure stated: a_w, crest factor, VDV, MTVV, the total value and the comfort words are the recording's own; A(8), the daily VDV and their judgement against Directive 2002/44/EC and ISO 2631-1 Annex B need the daily exposure the recording stands for (--exposure)",
  ],
  [
    "AXES_MISSING",
    {},
    { axes: ["x", "z"], exposure: false },
    "only x, z measured: the vibration total value leaves out the other axes",
  ],
  [
    "POSTURE_RECUMBENT",
    {},
    undefined,
    "recumbent: Directive 2002/44/EC states its axis factors for seated or standing workers and ISO 2631-1 Annex B guides seated exposure; the seated factors were used",
  ],
  [
    "POSTURE_NOT_SEATED",
    {},
    { posture: "standing" },
    "standing: ISO 2631-1 Annex B health guidance is written for seated persons; the zone is shown for reference",
  ],
  [
    "FLOOR_WITHOUT_Z",
    {},
    undefined,
    "a floor channel needs z on the seat for the seat's transmissibility (vertical, Wk on both)",
  ],
  [
    "FIELD_DAMAGE_IN_TIME",
    {},
    undefined,
    "the field's fatigue-damage and extreme-response spectra come from the recordings themselves (each filtered through each SDOF in time: rainflow damage scaled by service time, the largest response grown by Davenport's factors), while the test's come from the profile's PSD (narrow-band, Gaussian): on a Gaussian field the rainflow damage runs 5-17 % below narrow-band, so the test then over-tests by about that much (less in level: the 2/b power)",
  ],
  [
    "FULL_SCALE_ASSUMED",
    {},
    { file: "field-a.wav", unit: "g" },
    "field-a.wav: integer WAV codes with no calibration, read as ±1 g full scale (no calibration chunk, scale or sensitivity): every level rests on that",
  ],
  [
    "FIELD_TONES",
    { tones: 2 },
    undefined,
    "2 candidate sine tone(s) in the field recordings (listed): kept out of the random envelope, mean, tolerance limit and damage; give them to the lab profile as tones (mixed mode) if they are real",
  ],
  [
    "TOLERANCE_LIMIT_MISSING",
    { required: 3, recordings: 2 },
    undefined,
    "a normal tolerance limit needs at least 3 recordings; 2 given, so none is computed",
  ],
  [
    "TEST_EXTREME_ABOVE_FIELD",
    { limit: 2, frequencies: 2 },
    { frequenciesHz: [12.5, 400] },
    "the test's expected largest response exceeds the field's by more than ×2 at 2 natural frequencies (12.50, 400.0 Hz): a compressed test can break parts that the road never would",
  ],
  [
    "SHOCK_TEST_NEEDED",
    { frequencies: 3 },
    { frequenciesHz: [5, 6.3, 8] },
    "the random test's expected largest response falls below the field's measured largest response (its SRS, shocks included) at 3 natural frequencies (5.000, 6.300, 8.000 Hz): the random test does not reach the field's shocks there, so a shock test is needed for them",
  ],
  [
    "SRS_FEW_SAMPLES",
    { highestFnHz: 400, samplesPerPeriod: 2.5, minimum: 10, shortfallPercent: 19.1 },
    undefined,
    "the highest natural frequency 400 Hz has 2.5 samples per period (fewer than 10): its spectrum values can fall up to 19.1 % short of the continuous response's peak, which lies between samples, and up to 82.3 % on a recorded (band-limited) input, which the filter reads as straight lines between samples",
  ],
  [
    "THRESHOLD_LOW",
    { thresholdFactor: 2, expectedFalseEvents: 1234.4 },
    { channel: "z" },
    "z: the threshold is 2.00 x the background r.m.s.; on a Gaussian background of this level about 1234 event(s) would be found by chance (Rice)",
  ],
  [
    "BASELINE_DRIFT",
    { lowest: -0.95, highest: 0.75, largest: 0.85, thresholdPercent: 70.8 },
    { channel: "z" },
    "z: the 1 s means move from -0.95 to 0.75, up to 0.85 from their average (71 % of the threshold): where the drift is largest, events may be the drift (a sensor tilting through gravity, a creeping offset) and the background, not shocks, and their SRS take the drift in; analyse a window with --from/--to or give a threshold above it",
  ],
  [
    "EVENT_CUT_SHORT",
    { postS: 0.5 },
    { channel: "z" },
    "z: an event's SRS window ran past the end of the record (post window 0.5 s): its residual response may be cut short",
  ],
  [
    "SEGMENTS_LEFT_OUT",
    { segments: 2 },
    undefined,
    "2 segment(s) held a NaN or infinite sample in some channel and were left out of every spectrum",
  ],
  [
    "FEW_AVERAGES_COHERENCE",
    { averages: 4, coherenceBias: 0.3333333333333333 },
    undefined,
    "only 4 average(s): coherence is biased upward by about 1/n_d (0.33) and H is uncertain",
  ],
];

function sources(dir: string): string[] {
  return readdirSync(dir).flatMap((f) => {
    const p = join(dir, f);
    return statSync(p).isDirectory() ? sources(p) : p.endsWith(".ts") ? [p] : [];
  });
}

/** Every finding code in src/: each `code: "…"` literal in a module that makes findings (imports findings.ts). */
function codesInSource(): Set<string> {
  const found = new Set<string>();
  for (const f of sources("src")) {
    const text = readFileSync(f, "utf8");
    if (!/from "\.{1,2}\/(\.\.\/)*findings\.js"/.test(text)) continue;
    for (const m of text.matchAll(/code: "([A-Z][A-Z0-9_]*)"/g)) found.add(m[1]!);
  }
  return found;
}

interface Stated {
  value: number;
  tol: number;
  below: boolean;
}

/** The numbers a text states, each with the half-unit of its last digit shown (what rounding can move it by). */
function statedNumbers(text: string): Stated[] {
  const out: Stated[] = [];
  for (const m of text.matchAll(/(?<![\w.])([-+]?)(\d+)(?:\.(\d+))?(?:e([-+]?\d+))?/g)) {
    const [whole, , int, frac, exp] = m;
    const e = exp === undefined ? 0 : Number(exp);
    // Integers of more than 5 digits come from 5-significant-digit formatting (fmt): their last places are not shown.
    const lastPlace = frac !== undefined ? -frac.length : Math.max(0, int!.replace(/^0+/, "").length - 5);
    const value = Number(whole);
    out.push({ value, tol: 0.5 * 10 ** (lastPlace + e), below: /below\s*$/.test(text.slice(0, m.index)) });
  }
  return out;
}

/** The value is one the text states: within the text's rounding (either sign: "-1.50 dB" for a lower limit of 1.5), or under a stated "below" bound. */
function stated(v: number, text: string): boolean {
  if (!Number.isFinite(v)) return text.includes(String(v));
  return statedNumbers(text).some(
    (s) =>
      Math.abs(Math.abs(s.value) - Math.abs(v)) <= s.tol * (1 + 1e-9) + 1e-12 * Math.abs(v) || (s.below && v < s.value),
  );
}

function wav(x: Float64Array, fs: number, name: string): string {
  const f = join(tempDir(), name);
  writeFileSync(f, wavBytes({ tag: 3, bits: 32, channels: 1, sampleRate: fs, samples: Array.from(x) }));
  return f;
}

/** A flat required PSD with a ±1.5 dB band and ±1 dB on the RMS (the shapes judgeSpectrum is tested on). */
const flat = (lo: number, hi: number, extra: Record<string, unknown> = {}, tolerance: Record<string, unknown> = {}) =>
  parseProfile(
    JSON.stringify({
      title: "flat",
      units: "g2/Hz",
      points: [
        { hz: lo, level: 0.01 },
        { hz: hi, level: 0.01 },
      ],
      tolerance: { bands: [{ fromHz: lo, toHz: hi, upperDb: 1.5, lowerDb: 1.5 }], rmsDb: 1, ...tolerance },
      ...extra,
    }),
    "flat.json",
  );

/** An exact spectrum (no estimation noise): level(f) at every line, the Nyquist line stored at half, as the estimate stores it. */
function exact(
  level: (f: number) => number,
  o: { fs?: number; n?: number; dof: number; durationS?: number; detrend?: "none" | "mean" | "linear" },
): SpectrumUnderTest {
  const fs = o.fs ?? 2560;
  const n = o.n ?? 1024;
  const df = fs / n;
  const frequencyHz = new Float64Array(n / 2 + 1).map((_, k) => k * df);
  const psd = frequencyHz.map((f, k) => (k === n / 2 ? 0.5 : 1) * level(f));
  return {
    name: "t",
    frequencyHz,
    psd,
    dof: o.dof,
    lineSpacingHz: df,
    sampleRateHz: fs,
    durationS: o.durationS ?? 600,
    window: "hann",
    segmentLength: n,
    detrend: o.detrend ?? "mean",
    confidence: 0.9,
  };
}

async function allFindings(): Promise<Finding[]> {
  const out: Finding[] = [];
  const fs = 5120;
  const broadband = (f: number) => (f >= 20 && f <= 2000 ? 0.01 : 0);

  // A record that changes level halfway, analysed to past its end: NOT_STATIONARY, WINDOW_PAST_END.
  const stepped = shapedRecord(broadband, fs, 1 << 16, 21);
  for (let i = stepped.length / 2; i < stepped.length; i++) stepped[i] = 3 * stepped[i]!;
  const a = await analyzeRecording(wav(stepped, fs, "stepped.wav"), { segmentLength: 1024, toS: 100 });
  out.push(...a.channels[0]!.notes, ...a.channels[0]!.doubts);

  // A phone-style CSV in m/s² with no unit anywhere, the sensor on gravity: read as g, GRAVITY_AS_G.
  const phone = join(tempDir(), "phone.csv");
  let rows = "timestamp_ms,az\n";
  for (let i = 0; i < 4096; i++) rows += `${(i * 5).toFixed(0)},${(9.81 + 0.3 * Math.sin(i * 0.7)).toFixed(4)}\n`;
  writeFileSync(phone, rows);
  out.push(...(await analyzeRecording(phone, { segmentLength: 256 })).channels[0]!.doubts);

  // One channel's notes and doubts with each figure pushed past its gate (the sentences and values are made from these inputs).
  const base = (
    await analyzeRecording(wav(shapedRecord(broadband, fs, 1 << 16, 22), fs, "plain.wav"), { segmentLength: 1024 })
  ).channels[0]!;
  const { stats: s, psd: p, parseval: pv } = base;
  const variants: Parameters<typeof _channelFindings>[] = [
    [{ ...s, nonFinite: 17, atMax: 40, atMin: 31 }, { ...p, skippedSegments: 3 }, pv, 65536, 1024, true, 12.8],
    [s, { ...p, averages: 0 }, pv, 900, 1024, true, 0.2],
    [{ ...s, mean: 0.4321 * s.std }, { ...p, averages: 3, randomError: 0.5774 }, pv, 4096, 1024, true, 0.8],
    [
      s,
      p,
      { ...pv, ok: false, ratio: 1.0345, belowFirstLineShare: 0.1234, slowPart: { ...pv.slowPart, ok: false } },
      65536,
      1024,
      true,
      12.8,
    ],
    [s, p, { ...pv, ok: false, ratio: 0.9512, toleranceFrom: "record" }, 65536, 1024, true, 12.8],
    [s, { ...p, detrendedCrestFactor: 1.6, detrendedKurtosis: 1.9 }, pv, 65536, 1024, true, 12.8],
    [s, { ...p, detrendedCrestFactor: 40, detrendedKurtosis: 7.5 }, pv, 65536, 1024, true, 12.8],
    // Near the quantisation step (a spread within 2 steps): KURTOSIS_QUANTISED, CREST_QUANTISED.
    [s, { ...p, detrendedCrestFactor: 40, detrendedKurtosis: 7.5 }, pv, 65536, 1024, true, 12.8, undefined, 0, s.std],
    [{ ...s, mean: 0, std: 0, min: 0, max: 0, count: 65536 }, p, pv, 65536, 1024, true, 12.8],
  ];
  for (const v of variants) {
    const f = _channelFindings(...v);
    out.push(...f.notes, ...f.doubts);
  }

  // The verdicts on exact spectra: each rule of the judgement met or missed on purpose.
  const on = (f: number) => (f >= 20 && f <= 1000 ? 0.01 : 0);
  const db = (x: number) => 10 ** (x / 10);
  const judged = [
    judgeSpectrum(exact(on, { dof: 400 }), flat(20, 1000)), // PASS
    judgeSpectrum(
      exact((f) => on(f) * (f > 300 && f < 500 ? 4 : 1), { dof: 200 }),
      flat(20, 1000),
    ), // LINES_OUTSIDE, RMS_OUTSIDE
    judgeSpectrum(
      exact((f) => on(f) * (f > 300 && f < 600 ? 4 : 1), { dof: 200 }),
      flat(20, 1000, {}, { allowedOutsidePercent: 5 }),
    ), // with an allowance
    judgeSpectrum(
      exact((f) => on(f) * (f > 400 && f < 430 ? 10 : 1), { dof: 200 }),
      flat(
        20,
        1000,
        {},
        { allowedOutsidePercent: 5, outerLimits: [{ fromHz: 20, toHz: 1000, upperDb: 6, lowerDb: 6 }] },
      ),
    ), // OUTER_LIMIT
    judgeSpectrum(
      exact((f) => on(f) * db(1.3), { dof: 2 }),
      flat(20, 1000),
    ), // RMS_UNRESOLVED, DOF_BELOW_POWER
    judgeSpectrum(exact(on, { dof: 400 }), flat(20, 1000, { minDof: 1000, durationS: 900, resolutionHz: 1 })), // DOF_BELOW_PROFILE, DURATION_SHORT, RESOLUTION_COARSE
    judgeSpectrum(
      { ...exact(on, { dof: 400, durationS: 25 }), analysedWindow: { fromS: 5, toS: 30 } },
      flat(20, 1000, { durationS: 40 }),
    ), // DURATION_SHORT of a --from/--to window
    judgeSpectrum(
      exact((f) => (f >= 20 ? 0.01 * db(3) : 0), { dof: 200 }),
      flat(20, 2000),
    ), // RANGE_ABOVE_RECORD, RMS over what the record covers
    judgeSpectrum(exact(on, { dof: 400 }), flat(20, 21)), // NO_LINES
    // NOTCH_LINES_LEFT_OUT: a 40 dB notch 35 Hz above the profile's start, where the wide kernel reaches past it.
    judgeSpectrum(
      exact(on, { dof: 400 }),
      parseProfile(
        JSON.stringify({
          title: "notch",
          units: "g2/Hz",
          points: [
            { hz: 20, level: 0.01 },
            { hz: 50, level: 0.01 },
            { hz: 55, level: 0.000001 },
            { hz: 60, level: 0.01 },
            { hz: 1000, level: 0.01 },
          ],
          tolerance: { bands: [{ fromHz: 20, toHz: 1000, upperDb: 1.5, lowerDb: 1.5 }], rmsDb: 1 },
        }),
        "notch.json",
      ),
    ),
  ];
  for (const c of judged) out.push(...c.findings);

  // Mixed mode on an exact spectrum with hand-made tone fits: pass, low, missing, off frequency, unresolved.
  const mixed = flat(20, 1000, { tones: [{ name: "hum", hz: 120, peak: 2, toleranceDb: 1, toleranceHz: 0.5 }] });
  const fit = (peak: number, hz = 120, durationS = 600) => [
    { nominalHz: 120, frequencyHz: hz, peak, phaseRad: 0, samples: 1, durationS, searchHalfWidthHz: 1 },
  ];
  for (const f of [fit(2), fit(1.5), fit(0.01), fit(2, 121.5), fit(1.95, 120, 0.01), fit(1.7, 120, 0.5)])
    out.push(...judgeMixedMode(exact(on, { dof: 400 }), mixed, f).findings);
  // A tone the record cannot hold (a profile to 2000 Hz, a record at 2560 Hz).
  out.push(
    ...judgeMixedMode(
      exact(on, { dof: 400 }),
      flat(20, 2000, { tones: [{ hz: 1500, peak: 1, toleranceDb: 1 }] }),
      fit(1),
    ).findings,
  );
  // The level gate: a run loud for its first half and quiet for its second, and drift that dominates.
  const step = Array.from({ length: 64 }, (_, i) => (i < 32 ? db(2) : db(-2.9)));
  out.push(...levelGate(step, 1, 1, 0.64, 20));
  out.push(
    ...withDoubts(judged[1]!, [{ code: "CLIPPING", values: { atMax: 3, max: 1, atMin: 0, min: -1 } }]).findings.filter(
      (f) => f.code === "FAIL_IN_DOUBT",
    ),
  );

  // And the real thing: the samples checked as a user would, control channels as one spectrum.
  const kb210 = await loadProfile("samples/profiles/kb210-controller.json");
  for (const file of ["samples/kb210-run.wav", "samples/kb210-run-short.wav", "samples/kb210-run-resonance.wav"]) {
    const r = await checkRecording(file, kb210, { histogram: false, control: { channels: ["1"], rule: "average" } });
    for (const c of [...r.channels, r.control!.judgement]) out.push(...c.findings);
  }
  // Held samples (a 50 Hz sensor written at 200 Hz): HELD_SAMPLES on the pass, HELD_BAND in a check above its Nyquist.
  const readings = shapedRecord((f) => (f >= 1 && f <= 20 ? 0.01 : 0), 50, 4096, 23);
  const heldX = Float64Array.from({ length: 4 * readings.length }, (_, i) => readings[Math.floor(i / 4)]!);
  const heldFile = wav(heldX, 200, "held.wav");
  const held = await checkRecording(heldFile, flat(5, 80), { histogram: false, segmentLength: 256 });
  out.push(...held.analysis.channels[0]!.notes, ...held.channels[0]!.findings);

  // ride: the weighting's error and band, exposure, axes, postures, the floor, a short window, held and NaN samples.
  const { rideRecording } = await import("../src/analyses/rideRecording.js");
  const ride = "samples/marlow-uv3-ride.wav";
  const rideBase = { inputUnits: "m/s2", scale: 40 } as const;
  const rides = [
    await rideRecording(ride, { ...rideBase, axes: { x: "1", z: "3" }, posture: "standing" }),
    await rideRecording(ride, { ...rideBase, axes: { x: "1" }, floor: "4", posture: "recumbent", exposureS: 3600 }),
    await rideRecording(ride, { ...rideBase, axes: { z: "3" }, posture: "seated", fromS: 10, toS: 16 }),
  ];
  const slow = Float64Array.from(
    { length: 100 * 60 },
    (_, i) => 9.8 + 0.3 * Math.sin(0.37 * i) + (i === 700 ? NaN : 0),
  );
  rides.push(
    await rideRecording(wav(slow, 100, "slow-ride.wav"), { inputUnits: "m/s2", axes: { z: "1" }, posture: "seated" }),
  );
  rides.push(await rideRecording(heldFile, { inputUnits: "m/s2", axes: { z: "1" }, posture: "seated" }));
  // Curves and a stop on a lateral axis (tests/analyses/rideRecording.test.ts): the NOT_STATIONARY notes of ride.
  const cn = shapedRecord((f) => (f >= 0.5 && f <= 80 ? 0.0005 : 0), 1000, 1 << 18, 24);
  const curves = Float64Array.from(
    cn,
    (v, i) => (Math.floor(i / 20000) % 2 === 1 ? 0.8 : -1) + (i > 100000 && i < 160000 ? 0.2 : 1) * v,
  );
  rides.push(
    await rideRecording(wav(curves, 1000, "curves.wav"), { inputUnits: "m/s2", axes: { y: "1" }, posture: "seated" }),
  );
  // A logger that froze for 10 s of 82: DEAD_STRETCH.
  const frozen = Float64Array.from(shapedRecord((f) => (f >= 0.5 && f <= 80 ? 0.01 : 0), 200, 1 << 14, 26));
  frozen.fill(frozen[3999]!, 4000, 6000);
  rides.push(
    await rideRecording(wav(frozen, 200, "frozen.wav"), { inputUnits: "m/s2", axes: { z: "1" }, posture: "seated" }),
  );
  // A phone record at 100 Hz with a 46 Hz tone, above the top covered band: WEIGHTING_ERROR_ON_RECORD.
  const nearNyquist = Float64Array.from({ length: 100 * 60 }, (_, i) => 1.5 * Math.sin((2 * Math.PI * 46 * i) / 100));
  rides.push(
    await rideRecording(wav(nearNyquist, 100, "near-nyquist.wav"), {
      inputUnits: "m/s2",
      axes: { x: "1" },
      posture: "seated",
    }),
  );
  for (const r of rides) out.push(...r.notes, ...r.doubts);

  // transfer: a short two-channel record with a NaN (a segment left out, few averages).
  const { analyzeTransfer } = await import("../src/analyses/analyzeTransfer.js");
  const pair = shapedRecord(broadband, fs, 2048, 25);
  const stereo = join(tempDir(), "pair.wav");
  writeFileSync(
    stereo,
    wavBytes({
      tag: 3,
      bits: 32,
      channels: 2,
      sampleRate: fs,
      samples: Array.from(pair).flatMap((v, i) => [v, i === 100 ? NaN : 0.5 * v]),
    }),
  );
  out.push(
    ...(await analyzeTransfer(stereo, { inputChannel: "1", outputChannels: ["2"], segmentLength: 512 })).warnings,
  );

  // shock: natural frequencies up to a third of the rate and a low threshold.
  const { shockRecording } = await import("../src/analyses/shockRecording.js");
  const shock = await shockRecording("samples/brackley-ft2-warehouse.csv", {
    channels: ["z"],
    fnHz: [5, 50, 400],
    q: 10,
    thresholdFactor: 2,
  });
  out.push(...shock.notes, ...shock.doubts);
  // shock on a sensor that tilts through gravity (-1 g to +0.8 g over 8 s) under 0.2 g of noise: BASELINE_DRIFT.
  const tilt = join(tempDir(), "tilt.csv");
  let seed = 7;
  const noise = () => {
    let u = 0;
    for (let k = 0; k < 12; k++) {
      seed = (seed * 1103515245 + 12345) % 2147483648;
      u += seed / 2147483648;
    }
    return u - 6;
  };
  let lines = "time,z [g]\n";
  for (let i = 0; i < 8000; i++)
    lines += `${(i / 1000).toFixed(3)},${(-1 + (1.8 * i) / 8000 + 0.2 * noise()).toFixed(5)}\n`;
  writeFileSync(tilt, lines);
  out.push(...(await shockRecording(tilt, { fnHz: [5, 50, 100], q: 10 })).doubts);

  // derive: from two 16-bit recordings without calibration, each with an engine tone (no tolerance limit, full
  // scale assumed, candidate tones), and from the forklift's shocks with the field's damage in time.
  const { deriveProfile, plainInputs } = await import("../src/analyses/deriveProfile.js");
  const toned = [1, 2].map((seed) => {
    const x = shapedRecord((f) => (f >= 5 && f <= 400 ? 0.0001 : 0), 1024, 1 << 15, 30 + seed);
    const f = join(tempDir(), `field${seed}.wav`);
    writeFileSync(
      f,
      wavBytes({
        tag: 1,
        bits: 16,
        channels: 1,
        sampleRate: 1024,
        samples: Array.from(x, (v, i) => Math.round(3000 * (v + 0.15 * Math.cos((2 * Math.PI * 123.4 * i) / 1024)))),
      }),
    );
    return f;
  });
  const dated = { testDurationS: 3600, version: "test", created: new Date(0) };
  out.push(...(await deriveProfile({ ...plainInputs(toned, 100 * 3600), ...dated, fminHz: 10, fmaxHz: 400 })).notes);
  out.push(
    ...(
      await deriveProfile({
        ...plainInputs(["samples/brackley-ft2-warehouse.csv"], 2 * 3600),
        ...dated,
        fminHz: 5,
        fmaxHz: 400,
        fieldDamage: "time",
      })
    ).notes,
  );
  return out;
}

/** The library modules below report/ (report/, cli/, queue/ and verify/ are the edges that render findings; index.ts, the public API, exports the texts with the writers). */
function libraryModules(): string[] {
  return sources("src").filter((f) => !/^src\/((report|cli|queue|verify)\/|index\.ts$)/.test(f.replace(/\\/g, "/")));
}

/** Each object literal in `text` that starts with `{ code: "…"` (a finding made in place), whole. */
function findingLiterals(text: string): string[] {
  const out: string[] = [];
  for (const m of text.matchAll(/\{\s*code: "[A-Z][A-Z0-9_]*"/g)) {
    let depth = 0;
    let end = m.index;
    for (; end < text.length; end++) {
      if (text[end] === "{") depth++;
      else if (text[end] === "}" && --depth === 0) break;
    }
    out.push(text.slice(m.index, end + 1));
  }
  return out;
}

describe("finding texts (src/report/findingTexts.ts): one row per code", () => {
  it("the table has one row for every code in src/findings.ts, and no other", () => {
    expect(TABLE.map((r) => r[0]).sort()).toEqual([...FINDING_CODES].sort());
    expect(new Set(FINDING_CODES).size).toBe(FINDING_CODES.length);
  });
  for (const [code, values, about, text] of TABLE) {
    it(`${code}: ${text.slice(0, 60)}…`, () => {
      const f: Finding = about === undefined ? { code, values } : { code, values, about };
      expect(findingText(f)).toBe(text);
      for (const [k, v] of Object.entries(values)) expect(stated(v, text), `${code}.${k} = ${v}`).toBe(true);
    });
  }
  it("a finding about a channel, an axis or a file says it first", () => {
    const f: Finding = { code: "NON_FINITE", values: { samples: 2, segmentsLeftOut: 1 } };
    expect(findingText({ ...f, about: { channel: "tip" } })).toBe(
      "tip: 2 sample(s) are NaN or infinite; 1 segment(s) left out of the PSD",
    );
    expect(findingText({ ...f, about: { axis: "z", channel: "seat" } })).toMatch(/^z \(seat\): 2 sample/);
    expect(findingText({ ...f, about: { axis: "z" } })).toMatch(/^z: 2 sample/);
    expect(
      findingText({
        code: "NOT_STATIONARY",
        values: TABLE.find((r) => r[0] === "NOT_STATIONARY")![1],
        about: { file: "a.wav" },
      }),
    ).toMatch(/^a\.wav: not stationary: /);
  });
  it("the cases a code's sentence takes from its values and about", () => {
    const row = (c: FindingCode) => TABLE.find((r) => r[0] === c)!;
    expect(findingText({ code: "CLIPPING", values: row("CLIPPING")[1], about: { held: true } })).toContain(
      "40 held reading(s) at the maximum",
    );
    expect(
      findingText({
        code: "PARSEVAL_MISMATCH",
        values: row("PARSEVAL_MISMATCH")[1],
        about: { toleranceFrom: "record" },
      }),
    ).toContain("(allowed ±2.0 %, from the record's own spread)");
    expect(
      findingText({ code: "RUN_TO_DECIDE", values: { probabilityPercent: 90 }, about: { passPossible: true } }),
    ).toBe(
      "no run up to 1024 times this one would decide this verdict with 90 % probability if the spectrum is as measured (it sits on a limit)",
    );
    expect(
      findingText({ code: "RUN_TO_DECIDE", values: { probabilityPercent: 90 }, about: { passPossible: false } }),
    ).toBe(
      "a longer run alone cannot make this a pass (coverage or resolution); none up to 1024 times this one would show a failure with 90 % probability",
    );
    expect(findingText({ code: "PASS", values: row("PASS")[1], about: { requirement: "none" } })).toContain(
      "across 383 lines, with no power asked by the profile; against",
    );
    expect(findingText({ code: "DURATION_SHORT", values: { durationS: 25, requiredDurationS: 40 } })).toBe(
      "the record lasts 25.00 s, shorter than the 40 s the profile requires: it cannot show the whole test",
    );
    // Just short: as many decimals as show it short.
    expect(findingText({ code: "DURATION_SHORT", values: { durationS: 39.9998, requiredDurationS: 40 } })).toBe(
      "the record lasts 39.9998 s, shorter than the 40 s the profile requires: it cannot show the whole test",
    );
    expect(
      findingText({
        code: "TONE_UNRESOLVED",
        values: { hz: 120, peak: 1.7, deviationDb: -1.41 },
        about: { tone: "hum" },
      }),
    ).toBe(
      "hum (120 Hz): peak 1.7 (-1.41 dB) is outside its tolerance as measured but not beyond what the background's noise explains",
    );
    expect(
      findingText({ code: "TEST_EXTREME_ABOVE_FIELD", values: { limit: 2, frequencies: 40 }, about: { every: true } }),
    ).toContain("by more than ×2 at every natural frequency (40): ");
    expect(findingText({ code: "AXES_MISSING", values: {}, about: { axes: ["z"], exposure: true } })).toBe(
      "only z measured: the vibration total value and the daily exposure leave out the other axes",
    );
  });
});

describe("the library holds no prose for findings", () => {
  it("no finding made below report/ carries a text or builds a sentence (a template or a string literal past its code)", () => {
    const prose: string[] = [];
    for (const f of libraryModules()) {
      const text = readFileSync(f, "utf8");
      for (const lit of findingLiterals(text)) {
        const strings = [...lit.matchAll(/"(?:[^"\\\n]|\\.)*"/g)].map((m) => m[0]);
        if (/\btext:|`/.test(lit) || strings.some((x) => / /.test(x))) prose.push(`${f}: ${lit.slice(0, 120)}`);
      }
      if (/from "[./]*report\/findingTexts\.js"/.test(text)) prose.push(`${f} imports the texts`);
    }
    expect(prose).toEqual([]);
  });
  it("every code a module makes is one of src/findings.ts's", () => {
    const known = new Set<string>(FINDING_CODES);
    expect([...codesInSource()].filter((c) => !known.has(c))).toEqual([]);
  });
});

describe("findings the library makes: values the rendered sentence states", () => {
  it("statedNumbers reads numbers as printed: signs, decimals, exponents, and what rounding hides", () => {
    expect(
      statedNumbers("RMS +1.23 dB, 5120 Hz, 1.23e+5 times, -0.50 %, 3-12 s, 123460").map((s) => [s.value, s.tol]),
    ).toEqual([
      [1.23, 0.005],
      [5120, 0.5],
      [123000, 500],
      [-0.5, 0.005],
      [3, 0.5],
      [12, 0.5],
      [123460, 5],
    ]);
    expect(stated(0.00003, "false-fail rate here below 0.01 %")).toBe(true);
    expect(stated(1.236, "RMS 1.23 dB")).toBe(false);
  });

  it("every finding code in src/ is made here, and each finding's values are numbers its text states", async () => {
    const all = await allFindings();
    const seen = new Set<string>(all.map((f) => f.code));
    const inSource = codesInSource();
    expect(inSource.size).toBeGreaterThan(20);
    const drift: string[] = [];
    for (const f of all) {
      expect(Object.keys(f).filter((k) => k !== "code" && k !== "values" && k !== "about")).toEqual([]);
      expect(typeof f.values).toBe("object");
      const text = findingText(f);
      for (const [k, v] of Object.entries(f.values)) {
        expect(typeof v).toBe("number");
        if (!stated(v, text)) drift.push(`${f.code}.${k} = ${v} not in "${text}"`);
      }
      // about holds names and cases, never a sentence.
      for (const v of Object.values(f.about ?? {}))
        if (typeof v === "string") expect(v.length, `${f.code} about ${v}`).toBeLessThan(40);
    }
    expect(drift).toEqual([]);
    // RANGE_BELOW_JUDGED needs more detrend-biased lines than the kernel's half-width + 1: no window and
    // segment length gives that with a line left to judge (rectangular, linear detrend, 16 points biases
    // all 9 lines), so no record can make it today; its values are held to its text by reading.
    // Ride's route check out of tolerance on a stationary record (ROUTES_DIFFER: a fault of the method, which no
    // seeded record here makes) and RATE_MOVED (a CSV whose time column moves the rate after the filters were
    // designed; no values) are held to their texts by reading: ROUTES_DIFFER's values and text come from the
    // same expressions as ROUTES_DIFFER_NOT_STATIONARY's, which is made here. PARSEVAL_NOT_STATIONARY (ride's
    // Parseval mismatch on a moving level) came from the curves record's gravity steps, content below the first line
    // that the Parseval check's slow-part reference now explains (0.3.0); its values are PARSEVAL_MISMATCH's, made
    // here, with the stationarity test's, as ROUTES_DIFFER_NOT_STATIONARY's are.
    expect([...inSource].filter((c) => !seen.has(c)).sort()).toEqual([
      "PARSEVAL_NOT_STATIONARY",
      "RANGE_BELOW_JUDGED",
      "RATE_MOVED",
      "ROUTES_DIFFER",
    ]);
    // Every code the table holds is made by some module (none is left in the list without a maker).
    expect([...FINDING_CODES].filter((c) => !inSource.has(c))).toEqual([]);
  }, 60_000);
});
