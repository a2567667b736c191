import { judgeSpectrum, type ChannelCompliance, type SpectrumUnderTest } from "../../src/compare/complianceCheck.js";
import { parseProfile, profileLevel, type TestProfile } from "../../src/compare/testProfile.js";
import { combineSpectra, type ControlRule } from "../../src/analyses/checkRecording.js";
import { welchPsd } from "../../src/estimate/spectral/psdEstimate.js";
import { shapedRecord } from "../shapedRecords.js";
import { lower999, upper999 } from "../binomialBounds.js";
export { lower999, upper999 };

/**
 * Small, fast set-ups for the decision rule's Monte Carlo files (records made here: tests/shapedRecords.ts,
 * white Gaussian noise shaped by one FFT with fft.js; never psdgate's synth).
 *
 * Profile "slopes": 16-496 Hz, +12 dB/oct to 40 Hz, flat to 200 Hz, -6 dB/oct to 496 Hz; +-1 dB band, RMS
 * +-1 dB (a shape the sample profiles do not have). Analysis: 1024 Hz, 128-point Hann segments at 50 %
 * overlap (8 Hz lines, 58 judged), so a record long enough for 629 DOF is 21 k samples.
 */
export const FS = 1024;
export const N = 128;
export const LENGTH = 1 << 15;

export const slopes: TestProfile = parseProfile(
  JSON.stringify({
    title: "slopes (Monte Carlo)",
    units: "g2/Hz",
    points: [
      { hz: 16, level: 0.0025 },
      { hz: 40, level: 0.0025 * (40 / 16) ** 4 },
      { hz: 200, level: 0.0025 * (40 / 16) ** 4 },
      { hz: 496, slopeDbPerOctave: -6 },
    ],
    tolerance: { bands: [{ fromHz: 16, toHz: 496, upperDb: 1, lowerDb: 1 }], rmsDb: 1 },
  }),
  "slopes.json",
);

export const nominal = (f: number): number => (f >= 16 && f <= 496 ? profileLevel(slopes, f) : 0);
export const db = (x: number): number => 10 ** (x / 10);

/** Segments for a DOF target: a record of K Hann segments at 50 % has 36 K^2 / (19 K - 1) DOF (docs/REFERENCES.md sec. 2). */
export const dofOf = (k: number): number => (36 * k * k) / (19 * k - 1);
export const samplesFor = (k: number): number => (k - 1) * (N / 2) + N;
/** 28.5, 208.5 and 629.2 DOF. */
export const K28 = 15;
export const K208 = 110;
export const K629 = 332;

export function spectrumOfRecord(x: Float64Array, k: number, name = "mc"): SpectrumUnderTest {
  const p = welchPsd(x.subarray(0, samplesFor(k)), FS, { segmentLength: N });
  return {
    name,
    frequencyHz: p.frequencyHz,
    psd: p.psd,
    dof: p.dof,
    lineSpacingHz: p.lineSpacingHz,
    sampleRateHz: FS,
    durationS: Infinity,
    window: "hann",
    segmentLength: N,
    detrend: "mean",
    confidence: 0.9,
    overlap: 0.5,
  };
}

/**
 * k channels of one test: channel c = sqrt(rho) common + sqrt(1 - rho) own, both shaped to `level`
 * (so each channel's PSD is `level` and neighbouring channels' estimates are correlated through rho).
 */
export function channels(
  level: (f: number) => number,
  k: number,
  seed: number,
  rho = 0,
  length = LENGTH,
): Float64Array[] {
  const common = rho > 0 ? shapedRecord(level, FS, length, seed * 31 + 7) : undefined;
  const out: Float64Array[] = [];
  for (let c = 0; c < k; c++) {
    const own = shapedRecord(level, FS, length, seed * 31 + 11 + c);
    if (common) for (let i = 0; i < length; i++) own[i] = Math.sqrt(rho) * common[i]! + Math.sqrt(1 - rho) * own[i]!;
    out.push(own);
  }
  return out;
}

export function judgeControl(
  xs: Float64Array[],
  k: number,
  rule: ControlRule,
  profile: TestProfile = slopes,
): ChannelCompliance {
  return judgeSpectrum(
    combineSpectra(
      xs.map((x, i) => spectrumOfRecord(x, k, `c${i}`)),
      rule,
    ),
    profile,
  );
}

/** More records for a longer table (PSDGATE_MC_SCALE=10); CI runs the default. */
export const SCALE = Math.max(1, Number(process.env.PSDGATE_MC_SCALE ?? 1));
