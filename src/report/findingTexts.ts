import { BASIC_METHOD_LIMITS, type BasicMethodCheck } from "../compare/wholeBodyExposure.js";
import type { Finding, FindingAbout, FindingCode } from "../findings.js";
import { srsShortfallBound } from "../estimate/response/shockResponse.js";

/**
 * Every finding's sentence, made from its code, values and `about` (src/findings.ts). The library makes
 * findings as data; the CLI and every writer (text, HTML, CSV, JSON) render them here, so a sentence is
 * written once. A finding about a channel, an axis or a file is said with that subject first
 * ("x (seat): …", "field-a.wav: …").
 */
export function findingText(f: Finding): string {
  return subject(f.about) + TEXTS[f.code](f.values, f.about ?? {});
}

/** The sentences of a list of findings, in order. */
export function findingTexts(fs: readonly Finding[]): string[] {
  return fs.map(findingText);
}

/** A finding as the JSON results print it: its code, its values and its sentence. */
export function findingJson(f: Finding): { code: string; values: Record<string, number>; text: string } {
  return { code: f.code, values: f.values, text: findingText(f) };
}

export function findingsJson(fs: readonly Finding[]): { code: string; values: Record<string, number>; text: string }[] {
  return fs.map(findingJson);
}

function subject(a: FindingAbout | undefined): string {
  if (a === undefined) return "";
  if (a.file !== undefined) return `${a.file}: `;
  if (a.axis !== undefined && a.channel !== undefined) return `${a.axis} (${a.channel}): `;
  if (a.channel !== undefined) return `${a.channel}: `;
  if (a.axis !== undefined) return `${a.axis}: `;
  return "";
}

type Values = Record<string, number>;
type Text = (v: Values, a: FindingAbout) => string;

/** Five significant digits, trailing zeros dropped (the pass's numbers). */
function fmt(x: number, digits = 5): string {
  return Number(x.toPrecision(digits)).toString();
}

function signed(x: number): string {
  return `${x >= 0 ? "+" : ""}${x.toFixed(2)}`;
}

/** A share kept in percent, to three significant digits. */
function pct(p: number): string {
  return `${Number(p.toPrecision(3))} %`;
}

function pctSmall(p: number): string {
  return p < 0.01 ? "below 0.01 %" : pct(p);
}

/** The false-fail rate of a verdict: per record, and per spectrum when several are judged. */
function rateWords(perRecordPercent: number, a: FindingAbout): string {
  const family = Number(a.family ?? 1);
  return `false-fail rate at most ${pct(perRecordPercent)} per record${family > 1 ? ` (${family} spectra judged, ${pct(perRecordPercent / family)} each)` : ""}`;
}

/** A tone of a mixed-mode profile by name and frequency. */
function tone(v: Values, a: FindingAbout): string {
  return `${a.tone} (${fmt(v.hz!, 6)} Hz)`;
}

/** What a failed stationarity test of ride's levels said (the weighted or the unweighted level). */
function movingText(v: Values, a: FindingAbout): string {
  const runs = a.test === "runs";
  return `the ${a.level} level is not stationary (${runs ? "run test: R" : "reverse arrangements A"} = ${v.statistic} outside ${v.acceptAbove} < ${runs ? "R" : "A"} <= ${v.acceptAtMost}, ${v.values} values)`;
}

/** A duration below a requirement, with the decimals that show it below (39.9998 s is not "40.00 s, shorter than 40 s"). */
function shorter(d: number, required: number): string {
  let k = 2;
  while (k < 9 && Number(d.toFixed(k)) >= required) k++;
  return d.toFixed(k);
}

const PASS_TEXTS = {
  NON_FINITE: (v) => `${v.samples} sample(s) are NaN or infinite; ${v.segmentsLeftOut} segment(s) left out of the PSD`,
  HELD_SAMPLES: (v) =>
    `held samples: values repeat in runs of ${v.meanRun!.toFixed(2)} on average (${v.heldPercent!.toFixed(1)} % of samples in runs of two or more): the sensor updated at about ${fmt(v.updateRateHz!)} Hz and the file repeats its readings to ${fmt(v.sampleRateHz!)} Hz; content above ${fmt(v.nyquistHz!)} Hz is the hold's images, not motion, and the clipping count takes each held extreme once`,
  CLIPPING: (v, a) =>
    `possible clipping: ${v.atMax} ${a.held === true ? "held reading(s)" : "sample(s)"} at the maximum ${fmt(v.max!)} and ${v.atMin} at the minimum ${fmt(v.min!)}`,
  NO_SIGNAL: (v) =>
    `no signal: all ${v.samples} finite sample(s) hold the one value ${fmt(v.value!)} (a dead or disconnected sensor?)`,
  TOO_SHORT: (v) => `record of ${v.samples} samples is shorter than one segment of ${v.segmentLength}`,
  FEW_AVERAGES: (v) =>
    `only ${v.averages} average(s): each line is uncertain by ±${v.lineErrorPercent!.toFixed(0)} % (1 sigma)`,
  DC_OFFSET: (v) =>
    `DC offset: mean ${fmt(v.mean!)} is ${v.meanPercentOfStd!.toFixed(0)} % of the standard deviation (sensor bias or gravity?)`,
  GRAVITY_AS_G: (v) =>
    `no unit is stated for this channel, so it was read as g, but its mean of ${fmt(v.mean!)} is 1 g of gravity written in m/s²: if the file holds m/s², give --units m/s2 (read as g, every level is 9.81 times too high)`,
  PARSEVAL_MISMATCH: (v, a) =>
    `Parseval mismatch: RMS from the PSD is ${v.offPercent!.toFixed(2)} % off the RMS of the same detrended segments (allowed ±${v.allowedPercent!.toPrecision(2)} %${a.toleranceFrom === "record" ? ", from the record's own spread" : ""})`,
  BELOW_FIRST_LINE: (v) =>
    `${v.sharePercent!.toFixed(1)} % of the record's mean square is slower than the first line (drift or a slow trend); the PSD leaves it out`,
  NOT_STATIONARY: (v) =>
    `not stationary: reverse arrangements A = ${v.statistic} outside ${v.acceptAbove} < A <= ${v.acceptAtMost} (${v.values} values, ${Number(v.testPercent!.toPrecision(3))} % test) on ${v.stretches} stretch mean squares of ${fmt(v.stretchS!)} s${v.pooled !== undefined ? ` pooled ${v.pooled} at a time` : ""}; the PSD averages unlike stretches${v.departingDb !== undefined ? `; most departing ${fmt(v.departingFromS!)}-${fmt(v.departingToS!)} s ${v.departingDb === -Infinity ? "with no signal at all (mean square 0)" : `at ${v.departingDb >= 0 ? "+" : ""}${v.departingDb.toFixed(1)} dB from the median`}` : ""}`,
  WINDOW_PAST_END: (v) =>
    `the window's end ${v.requestedToS} s lies past the end of the record; the window ends at ${fmt(v.recordEndS!)} s`,
  RATE_MOVED: (v) =>
    `the record's rate is ${String(v.sampleRateHz)} Hz from its whole time column, but the window and the rate-dependent analyses were set up for the ${String(v.designRateHz)} Hz its first rows gave`,
  CREST_LOW: (v) =>
    `crest factor ${v.crestFactor!.toFixed(2)} (max |x - trend| / rms) is far below a Gaussian record's: one this long would pass ±${v.crestFactor!.toFixed(2)} sigma about ${v.crossings!.toPrecision(3)} times (saturated or clipped signal?)`,
  KURTOSIS_LOW: (v) =>
    `kurtosis ${v.kurtosis!.toFixed(3)} is far below ${v.expected !== undefined ? `the ${v.expected.toFixed(3)} of a Gaussian record with the tones it shows` : "a Gaussian record's 3"} (±${v.spread!.toPrecision(2)} for this record): peaks cut off or a deterministic signal`,
  KURTOSIS_HIGH: (v) =>
    `kurtosis ${v.kurtosis!.toFixed(3)} is above ${v.expected !== undefined ? `the ${v.expected.toFixed(3)} of a Gaussian record with the tones it shows` : "a Gaussian record's 3"} (±${v.spread!.toPrecision(2)}): more large peaks than Gaussian (shocks, impacts); the PSD alone understates them`,
  CREST_HIGH: (v) =>
    `crest factor ${v.crestFactor!.toFixed(2)} is above what a Gaussian record this long reaches (shock or spike?)`,
  KURTOSIS_QUANTISED: (v) =>
    `kurtosis ${v.kurtosis!.toFixed(3)} is above a Gaussian record's 3 (±${v.spread!.toPrecision(2)}), but the standard deviation ${Number(v.std!.toPrecision(3))} is within 2 steps of the channel's quantisation step ${Number(v.quantum!.toPrecision(3))}: there the samples are not Gaussian by construction, and the kurtosis cannot tell shocks`,
  CREST_QUANTISED: (v) =>
    `crest factor ${v.crestFactor!.toFixed(2)} is above what a Gaussian record this long reaches, but the standard deviation ${Number(v.std!.toPrecision(3))} is within 2 steps of the channel's quantisation step ${Number(v.quantum!.toPrecision(3))}: there the samples are not Gaussian by construction, and the crest factor cannot tell a shock or spike`,
} satisfies Partial<Record<FindingCode, Text>>;

const VERDICT_TEXTS = {
  LINES_OUTSIDE: (v, a) =>
    `${v.lines} of ${v.judged} lines shown outside their tolerance band${v.allowance !== undefined ? ` (the profile allows ${v.allowance})` : ""}, beyond what chance among all lines explains (${rateWords(v.falseFailPercent!, a)})`,
  OUTER_LIMIT: (v) => `${v.lines} line(s) shown beyond the outer limits, which no line may cross`,
  RMS_OUTSIDE: (v) =>
    `RMS ${v.rms!.toPrecision(4)} is ${signed(v.deviationDb!)} dB from the required ${v.requiredRms!.toPrecision(4)}${v.toHz !== undefined ? ` (over the ${v.fromHz}–${v.toHz} Hz the record covers)` : ""}, shown outside the allowed +${v.upperDb!.toFixed(2)} / -${v.lowerDb!.toFixed(2)} dB`,
  RMS_UNRESOLVED: (v) =>
    `RMS ${signed(v.deviationDb!)} dB is outside the allowed +${v.upperDb!.toFixed(2)} / -${v.lowerDb!.toFixed(2)} dB as measured, but within what chance explains at ${v.dof!.toFixed(0)} DOF`,
  NO_LINES: () => "no spectral line of the record can be judged inside the profile's range",
  DOF_BELOW_PROFILE: (v) =>
    `degrees of freedom ${v.dof!.toFixed(1)} below the required ${v.requiredDof}: record too short for the statistical accuracy the profile asks${v.secondsForDof !== undefined ? ` (${v.requiredDof} DOF take a run of ${v.secondsForDof.toFixed(1)} s at this rate, segment and overlap)` : ""}`,
  DOF_BELOW_POWER: (v) =>
    `degrees of freedom ${v.dof!.toFixed(1)} below the ${v.dofForPower} at which a ${v.departureDb} dB departure beyond the band over ${pct(v.departurePercent!)} of the ${v.lines} lines, in runs of ${v.widthLines} line(s) or wider, would be seen with ${pct(v.powerPercent!)} probability (here ${pct(v.achievedPowerPercent!)})${v.secondsForPower !== undefined ? `; ${v.dofForPower} DOF take a run of ${v.secondsForPower.toFixed(1)} s` : ""}`,
  RANGE_ABOVE_RECORD: (v) =>
    `the profile runs to ${v.profileTopHz} Hz but the record's sample rate ${v.sampleRateHz} Hz shows only up to ${v.nyquistHz} Hz: ${v.linesUnseen} line(s) of the profile cannot be seen`,
  RANGE_BELOW_JUDGED: (v) =>
    `the first judged line is ${v.firstLineHz} Hz, ${v.gapHz!.toPrecision(3)} Hz above the profile's start (lines below are biased by detrending or leakage): the analysis cannot show the bottom of the range; use a finer resolution or no detrending`,
  RESOLUTION_COARSE: (v) =>
    `line spacing ${v.lineSpacingHz!.toPrecision(4)} Hz is coarser than the profile's resolution ${v.profileResolutionHz} Hz: narrow excursions could hide between lines`,
  DURATION_SHORT: (v) =>
    v.fromS !== undefined
      ? `the analysed window ${v.fromS.toFixed(3)} to ${v.toS!.toFixed(3)} s lasts ${shorter(v.durationS!, v.requiredDurationS!)} s, shorter than the ${v.requiredDurationS} s the profile requires: it cannot show the whole test`
      : `the record lasts ${shorter(v.durationS!, v.requiredDurationS!)} s, shorter than the ${v.requiredDurationS} s the profile requires: it cannot show the whole test`,
  RUN_TO_DECIDE: (v, a) =>
    v.seconds !== undefined
      ? `a run of ${v.seconds.toFixed(1)} s (${v.dof!.toFixed(0)} DOF) would decide this verdict with at least ${pct(v.probabilityPercent!)} probability if the spectrum is as measured (most likely ${a.likely === "pass" ? "a pass" : "a fail"})`
      : a.passPossible === true
        ? `no run up to 1024 times this one would decide this verdict with ${pct(v.probabilityPercent!)} probability if the spectrum is as measured (it sits on a limit)`
        : `a longer run alone cannot make this a pass (coverage or resolution); none up to 1024 times this one would show a failure with ${pct(v.probabilityPercent!)} probability`,
  NOTCH_LINES_LEFT_OUT: (v) =>
    `${v.lines} line(s) near the profile's ends left out: the profile changes too steeply there for the window's kernel to say what the line should show`,
  PASS: (v, a) =>
    `no line and not the RMS shown outside tolerance across ${v.lines} lines, ${a.requirement === "none" ? "with no power asked by the profile" : `with the power to see a ${v.departureDb} dB departure in runs of ${v.widthLines} line(s) or wider (${pct(v.powerPercent!)}${a.requirement === "profile" ? ", the profile's requirement" : ""})`}; against psdgate's default requirement ${pct(v.defaultPowerPercent!)}; ${rateWords(v.recordFalseFailPercent!, a)}, ${pctSmall(v.falseFailPercent!)} here if the PSD equals the profile`,
  FAIL_IN_DOUBT: () => "a failure was shown, but the data are in doubt (above), so it cannot stand as a verdict",
  LEVEL_SWING: (v) =>
    `the level swings over the run: ${v.fromS!.toFixed(0)}-${v.toS!.toFixed(0)} s ${v.levelDb === -Infinity ? "holds no signal at all (mean square 0)" : `sits ${v.levelDb! >= 0 ? "+" : ""}${v.levelDb!.toFixed(2)} dB from the run's mean`}, beyond the ±${v.toleranceDb!.toFixed(2)} dB the profile allows by more than chance explains (false-doubt rate at most ${v.falseDoubtPercent!.toFixed(0)} % on a stationary record): the average spectrum does not describe the run`,
  DRIFT_DOMINATES: (v) =>
    `${v.sharePercent!.toFixed(1)} % of the record's mean square lies below the profile's first frequency ${v.belowHz} Hz (drift or a slow swing), more than ${v.limitPercent!.toFixed(0)} %: the record is not the random vibration the profile describes`,
  TONE_ABOVE_RECORD: (v, a) =>
    `${tone(v, a)}: the tone (±${fmt(v.toleranceHz!, 4)} Hz) does not lie below the record's Nyquist frequency, so the record cannot show it`,
  TONE_MISSING: (v, a) =>
    `${tone(v, a)} is missing: fitted peak ${fmt(v.peak!, 4)} against the required ${fmt(v.requiredPeak!, 4)} (at least ${fmt(v.lowerPeak!, 4)}), no more than the background's own noise there`,
  TONE_OUTSIDE: (v, a) =>
    `${tone(v, a)}: peak ${fmt(v.peak!, 4)} is ${signed(v.deviationDb!)} dB from the required ${fmt(v.requiredPeak!, 4)}, shown ${a.status === "low" ? "below" : "above"} its limits ${fmt(v.lowerPeak!, 4)}–${fmt(v.upperPeak!, 4)}`,
  TONE_OFF_FREQUENCY: (v, a) =>
    `${tone(v, a)} lies at ${fmt(v.measuredHz!, 6)} Hz, shown further from ${fmt(v.hz!, 6)} Hz than the ±${fmt(v.toleranceHz!, 4)} Hz allowed`,
  TONE_UNRESOLVED: (v, a) =>
    `${tone(v, a)}: peak ${fmt(v.peak!, 4)} (${signed(v.deviationDb!)} dB) is ${v.peakSd === undefined ? "outside its tolerance as measured but not beyond what the background's noise explains" : `within its tolerance, but with a standard deviation of ${fmt(v.peakSd, 4)} the record could not show a ${v.departureDb} dB departure with ${Math.round(v.powerPercent!)} % probability`}`,
  TONES_PASS: (v) =>
    `${v.tones} tone(s) within their tolerance, each shown in place with the power to see a ${v.departureDb} dB departure (the tones' share of the false-fail rate ${v.falseFailPercent} %)`,
  HELD_BAND: (v) =>
    `the profile runs to ${v.profileTopHz} Hz, but the sensor behind this channel updated only up to ${v.nyquistHz} Hz (held samples): the lines above show the hold's images, not the motion`,
} satisfies Partial<Record<FindingCode, Text>>;

/** ISO 2631-1's basic-method figures by name, as the sentences say them. */
const BASIC_METHOD_FIGURES = [
  ["crestFactor", "crest factor"],
  ["mtvvRatio", "MTVV/a_w"],
  ["vdvRatio", "VDV/(a_w T^1/4)"],
] as const;

/**
 * The basic-method limits a ride axis exceeded, each with its figure ("crest factor 9.40 > 9; …"; ride's HTML table).
 */
export function basicMethodExceeded(b: BasicMethodCheck): string {
  return BASIC_METHOD_FIGURES.filter(([key]) => b.exceeded.includes(key))
    .map(([key, name]) => `${name} ${b[key].toFixed(2)} > ${BASIC_METHOD_LIMITS[key]}`)
    .join("; ");
}

const RIDE_TEXTS = {
  NO_PSD_ROUTE: (v) =>
    `the window holds no whole Welch segment of ${v.segmentLength} samples, so there is no a_w from the PSD to check against (a coarser resolution or a shorter segment gives one)`,
  ROUTES_DIFFER: (v) =>
    `a_w from the PSD is ${signed(v.offPercent!)} % off a_w in time over the same samples of a stationary record (allowed ±${v.allowedPercent} %): the weighting or the spectrum is in question`,
  ROUTES_DIFFER_NOT_STATIONARY: (v, a) =>
    `a_w from the PSD is ${signed(v.offPercent!)} % off a_w in time over the same samples (±${v.allowedPercent} % on a stationary record); ${movingText(v, a)}, and Welch's segments and the weighting filter's memory share a changing level out unlike each other; a_w is the time-domain value`,
  PSD_VS_PLAIN: (v) =>
    `a_w from the PSD is ${signed(v.offPercent!)} % off the plain time average because Welch tapers the record's ends and drops its last partial segment, which matters on a non-stationary record; a_w is the time-domain value`,
  NON_FINITE_HELD: (v) => `${v.samples} non-finite sample(s) were held at the last finite value before weighting`,
  DEAD_STRETCH: (v, a) =>
    a.file !== undefined
      ? `${fmt(v.fromS!)}-${fmt(v.toS!)} s holds no signal at all (mean square 0: a logger that froze or dropped out?): the field PSD, damage and largest response count it as no vibration and may be understated; give this recording's live part (its from and to)`
      : `${fmt(v.fromS!)}-${fmt(v.toS!)} s holds no signal at all (mean square 0: a logger that froze or dropped out?): a_w, VDV, MTVV and A(8) count it as no vibration and may be understated; analyse the live part with --from/--to`,
  LEVEL_NOT_STATIONARY: (v, a) =>
    `weighted level not stationary (reverse arrangements A = ${v.statistic} outside ${v.acceptAbove} < A <= ${v.acceptAtMost}, ${v.values} values)${v.departingDb !== undefined ? `; most departing ${v.departingFromS!.toFixed(0)}-${v.departingToS!.toFixed(0)} s ${v.departingDb === -Infinity ? "with no signal at all" : `at ${v.departingDb >= 0 ? "+" : ""}${v.departingDb.toFixed(1)} dB`}` : ""}: a_w averages unlike stretches${a.exposure === true ? ", and A(8) assumes the recording stands for the whole exposure" : ""}`,
  PARSEVAL_NOT_STATIONARY: (v, a) =>
    `${PASS_TEXTS.PARSEVAL_MISMATCH(v, a)}; ${movingText(v, a)}: Hann segments weigh a changing level unlike a plain mean over the same samples, so this is expected of the ride and the PSD stands for its average`,
  BASIC_METHOD_EXCEEDED: (v) => {
    const items = BASIC_METHOD_FIGURES.map(
      ([key, name]) =>
        `${name} ${v[key]!.toFixed(2)}${v[key]! > BASIC_METHOD_LIMITS[key] ? ` > ${BASIC_METHOD_LIMITS[key]}` : ""}`,
    );
    return `the basic r.m.s. method may underestimate (${items.join(", ")}): judge by VDV and MTVV as well (ISO 2631-1 6.3)`;
  },
  WEIGHTING_ERROR: (v, a) => {
    const carriers = [
      "a_w",
      "crest factor",
      "VDV",
      "MTVV",
      "the total value",
      ...(a.exposure === true ? ["A(8)", "the daily VDV"] : []),
      ...(a.floor === true ? ["SEAT"] : []),
    ];
    return `at ${v.rateHz} Hz the time-domain weighting${Number(a.filters) > 1 ? "s are" : " is"} within ${v.maxErrorPercent} % of ISO 2631-1's |W(f)| at the one-third-octave centres to ${v.topCentreHz} Hz (largest at ${v.atHz} Hz): ${carriers.slice(0, -1).join(", ")} and ${carriers[carriers.length - 1]} carry it; a_w from the PSD applies |W(f)| exactly`;
  },
  WEIGHTING_ERROR_ON_RECORD: (v) =>
    `on this record's spectrum the time-domain weighting reads a_w ${signed(v.offPercent!)} % off |W(f)| applied exactly, beyond the ${v.statedPercent} % stated at the one-third-octave centres (the realisation departs most between the centres, in the top band and between ${v.topCentreHz} Hz and Nyquist ${v.nyquistHz} Hz): a_w, crest factor, VDV, MTVV and what is made from them carry it; a_w from the PSD applies |W(f)| exactly`,
  BAND_SHORT: (v) =>
    `the record holds nothing above its Nyquist frequency ${v.nyquistHz} Hz: the weighted figures cover ISO 2631-1's one-third-octave bands of 0.5-80 Hz whole to ${v.topCentreHz} Hz and the rest only to ${v.nyquistHz} Hz, and leave out any motion above`,
  EXPOSURE_NOT_GIVEN: () =>
    "no daily exposure stated: a_w, crest factor, VDV, MTVV, the total value and the comfort words are the recording's own; A(8), the daily VDV and their judgement against Directive 2002/44/EC and ISO 2631-1 Annex B need the daily exposure the recording stands for (--exposure)",
  AXES_MISSING: (_v, a) =>
    `only ${((a.axes ?? []) as string[]).join(", ")} measured: the vibration total value${a.exposure === true ? " and the daily exposure leave" : " leaves"} out the other axes`,
  POSTURE_RECUMBENT: () =>
    "recumbent: Directive 2002/44/EC states its axis factors for seated or standing workers and ISO 2631-1 Annex B guides seated exposure; the seated factors were used",
  POSTURE_NOT_SEATED: (_v, a) =>
    `${a.posture}: ISO 2631-1 Annex B health guidance is written for seated persons; the zone is shown for reference`,
  FLOOR_WITHOUT_Z: () => "a floor channel needs z on the seat for the seat's transmissibility (vertical, Wk on both)",
} satisfies Partial<Record<FindingCode, Text>>;

/** A list of natural frequencies as derive prints them (4 significant digits). */
function frequencies(a: FindingAbout): string {
  return ((a.frequenciesHz ?? []) as number[]).map((f) => f.toPrecision(4)).join(", ");
}

const DERIVE_TEXTS = {
  FIELD_DAMAGE_IN_TIME: () =>
    "the field's fatigue-damage and extreme-response spectra come from the recordings themselves (each filtered through each SDOF in time: rainflow damage scaled by service time, the largest response grown by Davenport's factors), while the test's come from the profile's PSD (narrow-band, Gaussian): on a Gaussian field the rainflow damage runs 5-17 % below narrow-band, so the test then over-tests by about that much (less in level: the 2/b power)",
  FULL_SCALE_ASSUMED: (_v, a) =>
    `integer WAV codes with no calibration, read as ±1 ${a.unit} full scale (no calibration chunk${a.unit === "V" ? " or scale; a sensitivity turns volts into acceleration, not codes into volts" : ", scale or sensitivity"}): every level rests on that`,
  FIELD_TONES: (v) =>
    `${v.tones} candidate sine tone(s) in the field recordings (listed): kept out of the random envelope, mean, tolerance limit and damage; give them to the lab profile as tones (mixed mode) if they are real`,
  TOLERANCE_LIMIT_MISSING: (v) =>
    `a normal tolerance limit needs at least ${v.required} recordings; ${v.recordings} given, so none is computed`,
  TEST_EXTREME_ABOVE_FIELD: (v, a) =>
    `the test's expected largest response exceeds the field's by more than ×${v.limit} ${a.every === true ? `at every natural frequency (${v.frequencies})` : `at ${v.frequencies} natural frequencies (${frequencies(a)} Hz)`}: a compressed test can break parts that the road never would`,
  SHOCK_TEST_NEEDED: (v, a) =>
    `the random test's expected largest response falls below the field's measured largest response (its SRS, shocks included) at ${v.frequencies} natural frequencies (${frequencies(a)} Hz): the random test does not reach the field's shocks there, so a shock test is needed for them`,
} satisfies Partial<Record<FindingCode, Text>>;

const SHOCK_TEXTS = {
  SRS_FEW_SAMPLES: (v) =>
    `the highest natural frequency ${v.highestFnHz} Hz has ${v.samplesPerPeriod!.toFixed(1)} samples per period (fewer than ${v.minimum}): its spectrum values can fall up to ${v.shortfallPercent!.toFixed(1)} % short of the continuous response's peak, which lies between samples, and up to ${(100 * srsShortfallBound(v.samplesPerPeriod!).bandLimited).toFixed(1)} % on a recorded (band-limited) input, which the filter reads as straight lines between samples`,
  THRESHOLD_LOW: (v) =>
    `the threshold is ${v.thresholdFactor!.toFixed(2)} x the background r.m.s.; on a Gaussian background of this level about ${v.expectedFalseEvents! >= 10 ? v.expectedFalseEvents!.toFixed(0) : v.expectedFalseEvents!.toPrecision(2)} event(s) would be found by chance (Rice)`,
  BASELINE_DRIFT: (v) =>
    `the 1 s means move from ${fmt(v.lowest!)} to ${fmt(v.highest!)}, up to ${fmt(v.largest!)} from their average (${v.thresholdPercent!.toFixed(0)} % of the threshold): where the drift is largest, events may be the drift (a sensor tilting through gravity, a creeping offset) and the background, not shocks, and their SRS take the drift in; analyse a window with --from/--to or give a threshold above it`,
  EVENT_CUT_SHORT: (v) =>
    `an event's SRS window ran past the end of the record (post window ${v.postS} s): its residual response may be cut short`,
} satisfies Partial<Record<FindingCode, Text>>;

const TRANSFER_TEXTS = {
  SEGMENTS_LEFT_OUT: (v) =>
    `${v.segments} segment(s) held a NaN or infinite sample in some channel and were left out of every spectrum`,
  FEW_AVERAGES_COHERENCE: (v) =>
    `only ${v.averages} average(s): coherence is biased upward by about 1/n_d (${v.coherenceBias!.toFixed(2)}) and H is uncertain`,
} satisfies Partial<Record<FindingCode, Text>>;

const TEXTS: Record<FindingCode, Text> = {
  ...PASS_TEXTS,
  ...VERDICT_TEXTS,
  ...RIDE_TEXTS,
  ...DERIVE_TEXTS,
  ...SHOCK_TEXTS,
  ...TRANSFER_TEXTS,
};
