/**
 * What each psdgate version changed in the numbers or findings a record holds. A record made by an earlier version
 * that no longer reproduces is still reported as differing (its numbers are not this version's); the re-run's line
 * names the changes made since its version, so a reviewer can tell a corrected method from an edited record. To
 * reproduce it exactly, re-run it with the psdgate version it names.
 */
export interface MethodChange {
  version: string;
  /** Record kinds whose results the change can move ("*": every kind built on the shared pass). */
  kinds: readonly string[];
  what: string;
}

export const METHOD_CHANGES: readonly MethodChange[] = [
  { version: "0.3.0", kinds: ["transfer"], what: "the |H1| confidence bounds (Student's t, Goodman 1965)" },
  {
    version: "0.3.0",
    kinds: ["*"],
    what: "the amplitude gates (crest chance by Owen's T function; about each segment's mean with detrend none)",
  },
  { version: "0.3.0", kinds: ["*"], what: "the clipping hint on integer codes near the quantisation step" },
  {
    version: "0.3.0",
    kinds: ["*"],
    what: "doubts on a dead channel (NO_SIGNAL) or a stretch with no signal (LEVEL_SWING, DEAD_STRETCH)",
  },
  { version: "0.3.0", kinds: ["check"], what: "the drift share with detrend none (about the mean)" },
  { version: "0.3.0", kinds: ["shock", "derive"], what: "BASELINE_DRIFT (short shocks left out of the stretch means)" },
  { version: "0.3.0", kinds: ["derive"], what: "the tolerance factor k at high confidence with few recordings" },
  { version: "0.3.0", kinds: ["check"], what: "a dead channel's judgement (its NO_SIGNAL doubt alone)" },
  { version: "0.3.0", kinds: ["transfer"], what: "a dead output channel (refused: NO_VIBRATION)" },
  {
    version: "0.3.0",
    kinds: ["ride"],
    what: "a window shorter than the weighting filters' settling or one running r.m.s. (refused)",
  },
  { version: "0.3.0", kinds: ["respond"], what: "a fatigue damage that underflows to 0 (refused, naming b)" },
  {
    version: "0.3.0",
    kinds: ["*"],
    what: "kurtosis and crest notes near the quantisation step (KURTOSIS_QUANTISED, CREST_QUANTISED)",
  },
  {
    version: "0.3.0",
    kinds: ["*"],
    what: "the Parseval check's second reference (each segment's slow part weighed alike on both sides): no PARSEVAL_MISMATCH on content below the first line",
  },
  {
    version: "0.3.0",
    kinds: ["derive"],
    what: "each field recording's data doubts (NON_FINITE, CLIPPING, PARSEVAL_MISMATCH, the amplitude gates) and DEAD_STRETCH as notes",
  },
  {
    version: "0.4.0",
    kinds: ["ride"],
    what: "the weighting filters' start (settled on a past predicted from the record's start by Burg's method, not the start mirrored about its mean)",
  },
  {
    version: "0.4.0",
    kinds: ["ride"],
    what: "the weighting filter's error on the record's own spectrum (WEIGHTING_ERROR_ON_RECORD) and BAND_SHORT's words",
  },
  {
    version: "0.4.0",
    kinds: ["respond", "derive"],
    what: "the response computed from a recording (equalised for the ramp-invariant reading's sinc²)",
  },
  {
    version: "0.4.0",
    kinds: ["shock", "derive"],
    what: "the baseline removed (the mean without the 0.1 s stretches that reach the threshold) and the background of records under 3 s",
  },
  {
    version: "0.4.0",
    kinds: ["check"],
    what: "the power a pass claims with largest-of control (the largest of k channels) and the band at a shared edge of asymmetric bands (the tighter limit each side)",
  },
  {
    version: "0.4.0",
    kinds: ["*"],
    what: "the tone candidates (a peak wider than the window's kernel, a resonance of random vibration, is not a tone; derive no longer takes it out of the field spectrum)",
  },
  {
    version: "0.4.0",
    kinds: ["*"],
    what: "WAV: the quantisation step from WAVE_FORMAT_EXTENSIBLE's valid bits, the data size of a plain RIFF file over 4 GiB, full scale said as assumed (±1 V) when only a sensitivity is given",
  },
  {
    version: "0.4.0",
    kinds: ["*"],
    what: "the kurtosis gate on a record with sine tones (centred on 3 - 1.5 sum (s_k / V)^2, not 3)",
  },
  {
    version: "0.4.0",
    kinds: ["*"],
    what: "the reverse-arrangements count: values equal to 1e-9 of the largest are ties, each half an arrangement (a level that does not move is stationary)",
  },
  {
    version: "0.4.0",
    kinds: ["*"],
    what: "controls and bidi overrides in names and titles shown as escapes on the page",
  },
];

/** -1, 0 or 1 as version a is before, the same as or after version b (dotted numbers; anything else compares 0). */
export function compareVersions(a: string, b: string): number {
  const pa = a.split(".").map(Number);
  const pb = b.split(".").map(Number);
  if (![...pa, ...pb].every(Number.isInteger)) return 0;
  for (let i = 0; i < Math.max(pa.length, pb.length); i++) {
    const d = (pa[i] ?? 0) - (pb[i] ?? 0);
    if (d !== 0) return Math.sign(d);
  }
  return 0;
}

/**
 * The words added to a re-run's line when a record of an earlier version differs: the changes since its version that
 * can move a record of its kind ("" when there are none, or the record is not older).
 */
export function changesSince(recorded: string, running: string, kind: string): string {
  if (compareVersions(recorded, running) >= 0) return "";
  const since = METHOD_CHANGES.filter(
    (c) =>
      compareVersions(c.version, recorded) > 0 &&
      compareVersions(c.version, running) <= 0 &&
      (c.kinds.includes("*") || c.kinds.includes(kind)),
  );
  if (since.length === 0) return `; the report was made by psdgate ${recorded}, re-run by ${running}`;
  return `; the report was made by psdgate ${recorded}, and versions since changed ${since.map((c) => `${c.what} (${c.version})`).join("; ")}: re-run it with psdgate ${recorded} to reproduce it exactly`;
}
