/**
 * A finding: a stable code and the numbers it rests on, as data. `values` holds each number its
 * sentence states, under a plain name and in the unit the sentence gives it (a share shown in percent
 * is kept in percent, its key ending in `Percent`); `about` holds what else the sentence names that is
 * not a measured number: a channel, an axis, a tone's name, a posture, which case of the code it is.
 * The library makes findings and holds no prose for them: every sentence is rendered at the edge, from
 * the code and its values, by src/report/findingTexts.ts (one text per code, checked by
 * tests/findings.test.ts). The JSON results print `{ code, values, text }` (the rendered sentence);
 * `about` is not printed there, since the text says it.
 */
export interface Finding {
  code: FindingCode;
  values: Record<string, number>;
  about?: FindingAbout;
}

/** Names and cases a finding's sentence needs besides its numbers (never a sentence). */
export interface FindingAbout {
  /** The channel (recording channel name) and the axis (x, y, z) the finding is about: the sentence's subject. */
  channel?: string;
  axis?: string;
  /** The recording file a finding of a set (derive) is about. */
  file?: string;
  [key: string]: string | number | boolean | number[] | string[] | undefined;
}

/**
 * Every finding code psdgate makes, by the stage that makes it. A new code goes here and gets its
 * sentence in src/report/findingTexts.ts (the type checker holds the two lists together).
 */
export const FINDING_CODES = [
  // The pass (pass/analyzeRecording.ts): per channel, and the pass's own (the rate moved under it).
  "NON_FINITE",
  "HELD_SAMPLES",
  "CLIPPING",
  "NO_SIGNAL",
  "TOO_SHORT",
  "FEW_AVERAGES",
  "DC_OFFSET",
  "GRAVITY_AS_G",
  "PARSEVAL_MISMATCH",
  "BELOW_FIRST_LINE",
  "NOT_STATIONARY",
  "WINDOW_PAST_END",
  "RATE_MOVED",
  // Amplitude gates (compare/amplitudeGates.ts).
  "CREST_LOW",
  "KURTOSIS_LOW",
  "KURTOSIS_HIGH",
  "CREST_HIGH",
  "KURTOSIS_QUANTISED",
  "CREST_QUANTISED",
  // The verdict on a spectrum (compare/complianceCheck.ts), the level gate, tones, held bands (check).
  "LINES_OUTSIDE",
  "OUTER_LIMIT",
  "RMS_OUTSIDE",
  "RMS_UNRESOLVED",
  "NO_LINES",
  "DOF_BELOW_PROFILE",
  "DOF_BELOW_POWER",
  "RANGE_ABOVE_RECORD",
  "RANGE_BELOW_JUDGED",
  "RESOLUTION_COARSE",
  "DURATION_SHORT",
  "RUN_TO_DECIDE",
  "NOTCH_LINES_LEFT_OUT",
  "PASS",
  "FAIL_IN_DOUBT",
  "LEVEL_SWING",
  "DRIFT_DOMINATES",
  "TONE_ABOVE_RECORD",
  "TONE_MISSING",
  "TONE_OUTSIDE",
  "TONE_OFF_FREQUENCY",
  "TONE_UNRESOLVED",
  "TONES_PASS",
  "HELD_BAND",
  // ride (analyses/rideRecording.ts).
  "NO_PSD_ROUTE",
  "ROUTES_DIFFER",
  "ROUTES_DIFFER_NOT_STATIONARY",
  "PSD_VS_PLAIN",
  "NON_FINITE_HELD",
  "DEAD_STRETCH",
  "LEVEL_NOT_STATIONARY",
  "PARSEVAL_NOT_STATIONARY",
  "BASIC_METHOD_EXCEEDED",
  "WEIGHTING_ERROR",
  "WEIGHTING_ERROR_ON_RECORD",
  "BAND_SHORT",
  "EXPOSURE_NOT_GIVEN",
  "AXES_MISSING",
  "POSTURE_RECUMBENT",
  "POSTURE_NOT_SEATED",
  "FLOOR_WITHOUT_Z",
  // derive (analyses/deriveProfile.ts; NOT_STATIONARY of a recording there too, said of its file).
  "FIELD_DAMAGE_IN_TIME",
  "FULL_SCALE_ASSUMED",
  "FIELD_TONES",
  "TOLERANCE_LIMIT_MISSING",
  "TEST_EXTREME_ABOVE_FIELD",
  "SHOCK_TEST_NEEDED",
  // shock (analyses/shockRecording.ts; the pass's doubts carry over, said of their channel).
  "SRS_FEW_SAMPLES",
  "THRESHOLD_LOW",
  "BASELINE_DRIFT",
  "EVENT_CUT_SHORT",
  // transfer (analyses/analyzeTransfer.ts).
  "SEGMENTS_LEFT_OUT",
  "FEW_AVERAGES_COHERENCE",
] as const;

export type FindingCode = (typeof FINDING_CODES)[number];
