import { readFileSync } from "node:fs";
import type { ChannelCompliance } from "../../src/compare/complianceCheck.js";
import { parseProfile, type TestProfile } from "../../src/compare/testProfile.js";
import { judgeMixedMode } from "../../src/compare/toneCheck.js";
import { welchPsd } from "../../src/estimate/spectral/psdEstimate.js";
import { ToneFitAccumulator } from "../../src/estimate/spectral/toneEstimate.js";
import { toneSearchHalfWidthHz } from "../../src/compare/toneCheck.js";

/**
 * Mixed-mode test helpers: the KB-210 sample profile (20-2000 Hz, ±1.5 dB to 1 kHz, ±3 dB above, RMS ±1 dB)
 * with three tones added, one of them exactly between two 2.5 Hz lines (the window's worst scalloping), and
 * the judgement of a record the test made (tests/shapedRecords.ts plus the test's own sines).
 */
export const FS = 5120;
export const N = 2048;
// The sample's 40 s duration is dropped: the test's records are shorter.
const { durationS: _unused, ...base } = JSON.parse(readFileSync("samples/profiles/kb210-controller.json", "utf8"));
export const TONES = [
  { name: "shaft", hz: 60, peak: 3, toleranceDb: 1, toleranceHz: 0.3 },
  { name: "gear mesh", hz: 101.25, peak: 5, toleranceDb: 1, toleranceHz: 0.5 },
  { name: "vane pass", hz: 333.3, peak: 2, toleranceDb: 1, toleranceHz: 1 },
];
export const mixedProfile: TestProfile = parseProfile(JSON.stringify({ ...base, tones: TONES }), "kb210-mixed.json");

/** Add peak * cos(2 pi f t + phase) for each tone to x (in place). */
export function addTones(x: Float64Array, tones: { hz: number; peak: number; phase: number }[]): Float64Array {
  for (const t of tones) {
    const w = (2 * Math.PI * t.hz) / FS;
    for (let i = 0; i < x.length; i++) x[i] = x[i]! + t.peak * Math.cos(w * i + t.phase);
  }
  return x;
}

export function judgeMixed(x: Float64Array, profile: TestProfile = mixedProfile): ChannelCompliance {
  const p = welchPsd(x, FS, { segmentLength: N });
  const acc = new ToneFitAccumulator(
    profile.tones.map((t, i) => ({ hz: t.hz, searchHalfWidthHz: toneSearchHalfWidthHz(profile, i) })),
  );
  acc.start(FS);
  acc.push([x], x.length);
  const fits = acc.finish(FS)[0]!;
  return judgeMixedMode(
    {
      name: "mc",
      frequencyHz: p.frequencyHz,
      psd: p.psd,
      dof: p.dof,
      lineSpacingHz: p.lineSpacingHz,
      sampleRateHz: FS,
      durationS: x.length / FS,
      window: "hann",
      segmentLength: N,
      detrend: "mean",
      confidence: 0.9,
    },
    profile,
    fits,
  );
}
