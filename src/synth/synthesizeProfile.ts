import { InputError } from "../errors.js";
import { profileLevel, type TestProfile } from "../compare/testProfile.js";
import { RealFft } from "../estimate/spectral/realFft.js";
import { RunningMoments, type SampleStatistics } from "../estimate/statistics/runningMoments.js";
import { spectralWindow } from "../estimate/spectral/windows.js";
import { GaussianNoise } from "./gaussianNoise.js";

/**
 * A stationary Gaussian time history whose one-sided PSD follows a profile: white Gaussian noise of
 * unit variance (density 2/fs) through a linear-phase FIR filter with |H(f)|^2 = G(f) fs / 2,
 * designed by frequency sampling and a Hann taper on the impulse response, applied by FFT overlap-add
 * (Oppenheim & Schafer, Discrete-Time Signal Processing, 3rd ed. 2010, sec. 8.7). A linear filter of
 * Gaussian noise stays Gaussian, and the output streams block by block in constant memory.
 * The shaped band runs a few filter lines past the profile's ends (each end segment's slope is
 * continued), so the edge lines of the analysis are not pulled down by the filter's transition.
 */
export interface SynthOptions {
  durationS: number;
  sampleRateHz: number;
  seed: number;
  channels?: number | undefined;
  /** Multiply the profile by this factor in level (10^(dB/10)) before shaping: to make a hot or cold run. */
  levelFactor?: number | undefined;
  /**
   * Sine tones added to every channel (sine-on-random): peak * cos(2 pi hz t + phaseRad), t from the first
   * output sample. The random part is unchanged by them.
   */
  tones?: { hz: number; peak: number; phaseRad: number }[] | undefined;
}

export interface SynthResult {
  frames: number;
  filterTaps: number;
  stats: SampleStatistics[];
}

export function synthesisFilterLength(profile: TestProfile, sampleRateHz: number): number {
  const f0 = profile.breakpoints[0]!.hz;
  let n = 1024;
  while (sampleRateHz / n > f0 / 16 && n < 1 << 18) n *= 2;
  return n;
}

/** Extended profile level: the end segments' power laws continued `extraHz` past the ends. */
function shapedLevel(profile: TestProfile, f: number, extraHz: number): number {
  const segs = profile.segments;
  const first = segs[0]!;
  const last = segs[segs.length - 1]!;
  if (f < first.f1) return f >= first.f1 - extraHz && f > 0 ? first.g1 * Math.pow(f / first.f1, first.exponent) : 0;
  if (f > last.f2) return f <= last.f2 + extraHz ? last.g2 * Math.pow(f / last.f2, last.exponent) : 0;
  return profileLevel(profile, f);
}

export function synthesizeProfile(
  profile: TestProfile,
  o: SynthOptions,
  sink: (channels: Float64Array[], frames: number) => Promise<void> | void,
): Promise<SynthResult> {
  return run(profile, o, sink);
}

async function run(
  profile: TestProfile,
  o: SynthOptions,
  sink: (channels: Float64Array[], frames: number) => Promise<void> | void,
): Promise<SynthResult> {
  const fs = o.sampleRateHz;
  const fTop = profile.breakpoints[profile.breakpoints.length - 1]!.hz;
  if (!(fs > 2 * fTop)) {
    throw new InputError("OPTION_INVALID", {
      option: "sampleRateHz",
      expected: `a sample rate above twice the profile's top frequency (> ${2 * fTop} Hz)`,
      received: String(fs),
    });
  }
  if (!(o.durationS > 0))
    throw new InputError("OPTION_INVALID", {
      option: "durationS",
      expected: "a duration in s above 0",
      received: String(o.durationS),
    });
  const nch = o.channels ?? 1;
  const total = Math.round(o.durationS * fs);
  const L = synthesisFilterLength(profile, fs);
  const df = fs / L;
  const extra = 4 * df;
  const gain = o.levelFactor ?? 1;

  // Filter: zero-phase samples of sqrt(G fs / 2), to the time domain, centred, Hann-tapered.
  const fftL = new RealFft(L);
  const half = new Float64Array(L + 2);
  for (let k = 0; k <= L / 2; k++) half[2 * k] = Math.sqrt((gain * shapedLevel(profile, k * df, extra) * fs) / 2);
  const h0 = new Float64Array(L);
  fftL.inverseReal(half, h0);
  const taper = spectralWindow("hann", L);
  const M = 2 * L;
  const h = new Float64Array(M);
  for (let i = 0; i < L; i++) h[i] = h0[(i + L / 2) % L]! * taper[i]!;
  const fftM = new RealFft(M);
  const H = Float64Array.from(fftM.forward(h).subarray(0, M + 2));

  const noise = Array.from({ length: nch }, (_, c) => new GaussianNoise(o.seed, c));
  const tails = Array.from({ length: nch }, () => new Float64Array(L));
  const blocks = Array.from({ length: nch }, () => new Float64Array(L));
  const stats = Array.from({ length: nch }, () => new RunningMoments());
  const x = new Float64Array(M);
  const spec = new Float64Array(M + 2);
  const y = new Float64Array(M);
  const xin = new Float64Array(L);
  // The first L outputs carry the filter's start-up transient; they are computed and dropped.
  let warm = L;
  let done = 0;
  while (done < total) {
    for (let c = 0; c < nch; c++) {
      noise[c]!.fill(xin);
      x.set(xin, 0);
      x.fill(0, L);
      const X = fftM.forward(x);
      for (let k = 0; k <= L; k++) {
        const re = X[2 * k]!;
        const im = X[2 * k + 1]!;
        const hr = H[2 * k]!;
        const hi = H[2 * k + 1]!;
        spec[2 * k] = re * hr - im * hi;
        spec[2 * k + 1] = re * hi + im * hr;
      }
      fftM.inverseReal(spec, y);
      const tail = tails[c]!;
      const out = blocks[c]!;
      for (let i = 0; i < L; i++) {
        out[i] = y[i]! + tail[i]!;
        tail[i] = y[i + L]!;
      }
    }
    if (warm > 0) {
      warm = 0;
      continue;
    }
    const n = Math.min(L, total - done);
    for (const t of o.tones ?? []) {
      // The phase from the sample index in cycles (exact over long records), then rotated sample by sample.
      const cyc = (t.hz * done) / fs;
      const ph = 2 * Math.PI * (cyc - Math.floor(cyc)) + t.phaseRad;
      const w = (2 * Math.PI * t.hz) / fs;
      const cw = Math.cos(w);
      const sw = Math.sin(w);
      let cr = Math.cos(ph);
      let ci = Math.sin(ph);
      for (let i = 0; i < n; i++) {
        const v = t.peak * cr;
        for (let c = 0; c < nch; c++) blocks[c]![i] = blocks[c]![i]! + v;
        const t2 = cr * cw - ci * sw;
        ci = ci * cw + cr * sw;
        cr = t2;
      }
    }
    for (let c = 0; c < nch; c++) stats[c]!.push(blocks[c]!, n);
    await sink(blocks, n);
    done += n;
  }
  return { frames: total, filterTaps: L, stats: stats.map((s) => s.result()) };
}
