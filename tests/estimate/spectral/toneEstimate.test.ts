import { describe, expect, it } from "vitest";
import { ToneFitAccumulator, spectralTones, tonePeakSd } from "../../../src/estimate/spectral/toneEstimate.js";
import { welchPsd } from "../../../src/estimate/spectral/psdEstimate.js";
import { spectralWindow } from "../../../src/estimate/spectral/windows.js";
import { spectralKernel } from "../../../src/estimate/spectral/spectralKernel.js";

/** Seeded uniform (mulberry32, common practice) and Box-Muller normals: the test's own records. */
function rng(seed: number) {
  let a = seed >>> 0;
  const u = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return () => Math.sqrt(-2 * Math.log(1 - u())) * Math.cos(2 * Math.PI * u());
}

/** White noise of one-sided density G (variance G fs / 2) plus tones A cos(2 pi f t + phi) plus an offset. */
function record(
  fs: number,
  seconds: number,
  G: number,
  tones: { hz: number; peak: number; phase: number }[],
  seed: number,
  offset = 0,
): Float64Array {
  const n = Math.round(fs * seconds);
  const x = new Float64Array(n);
  const g = rng(seed);
  const s = Math.sqrt((G * fs) / 2);
  for (let i = 0; i < n; i++) {
    let v = offset + s * g();
    for (const t of tones) v += t.peak * Math.cos(2 * Math.PI * t.hz * (i / fs) + t.phase);
    x[i] = v;
  }
  return x;
}

/** The test's own least-squares sine fit: [cos, sin, 1] by the 3x3 normal equations, at each frequency of a
 * scan, keeping the smallest residual (the nonlinear least-squares fit), refined by golden section. */
function lsFit(x: Float64Array, fs: number, f0: number, half: number): { hz: number; peak: number } {
  const solve = (f: number) => {
    let cc = 0,
      ss = 0,
      cs = 0,
      c1 = 0,
      s1 = 0,
      xc = 0,
      xs = 0,
      x1 = 0;
    const n = x.length;
    for (let i = 0; i < n; i++) {
      const ph = 2 * Math.PI * f * (i / fs);
      const c = Math.cos(ph);
      const s = Math.sin(ph);
      cc += c * c;
      ss += s * s;
      cs += c * s;
      c1 += c;
      s1 += s;
      xc += x[i]! * c;
      xs += x[i]! * s;
      x1 += x[i]!;
    }
    // Gaussian elimination of [[cc cs c1][cs ss s1][c1 s1 n]] [a b m] = [xc xs x1].
    const M = [
      [cc, cs, c1, xc],
      [cs, ss, s1, xs],
      [c1, s1, n, x1],
    ];
    for (let k = 0; k < 3; k++)
      for (let r = k + 1; r < 3; r++) {
        const q = M[r]![k]! / M[k]![k]!;
        for (let j = k; j < 4; j++) M[r]![j]! -= q * M[k]![j]!;
      }
    const m = M[2]![3]! / M[2]![2]!;
    const b = (M[1]![3]! - M[1]![2]! * m) / M[1]![1]!;
    const a = (M[0]![3]! - M[0]![2]! * m - M[0]![1]! * b) / M[0]![0]!;
    // Residual sum of squares falls as the explained energy a xc + b xs + m x1 rises.
    return { peak: Math.hypot(a, b), explained: a * xc + b * xs + m * x1 };
  };
  const T = x.length / fs;
  let best = f0;
  let bestE = -Infinity;
  for (let f = f0 - half; f <= f0 + half; f += 0.25 / T) {
    const e = solve(f).explained;
    if (e > bestE) {
      bestE = e;
      best = f;
    }
  }
  let a = best - 0.25 / T;
  let b = best + 0.25 / T;
  for (let it = 0; it < 40; it++) {
    const m1 = a + (b - a) / 3;
    const m2 = b - (b - a) / 3;
    if (solve(m1).explained > solve(m2).explained) b = m2;
    else a = m1;
  }
  const hz = (a + b) / 2;
  return { hz, peak: solve(hz).peak };
}

function fitOf(x: Float64Array, fs: number, tones: { hz: number; searchHalfWidthHz: number }[], block = 1000) {
  const acc = new ToneFitAccumulator(tones);
  acc.start(fs);
  for (let i = 0; i < x.length; i += block) {
    const b = x.slice(i, Math.min(x.length, i + block));
    acc.push([b], b.length);
  }
  return acc.finish(fs)[0]!;
}

describe("ToneFitAccumulator", () => {
  it("a tone off its nominal frequency on white noise: amplitude within 1 % of the test's own least-squares fit (and 0.1 % here)", () => {
    const fs = 2048;
    const x = record(
      fs,
      20,
      0.01,
      [
        { hz: 120.037, peak: 0.8, phase: 0.7 },
        { hz: 55.2, peak: 0.3, phase: -1.1 },
      ],
      11,
      0.9,
    );
    const fits = fitOf(x, fs, [
      { hz: 120, searchHalfWidthHz: 0.5 },
      { hz: 55, searchHalfWidthHz: 0.5 },
    ]);
    const ref1 = lsFit(x, fs, 120, 0.5);
    const ref2 = lsFit(x, fs, 55, 0.5);
    expect(Math.abs(fits[0]!.peak / ref1.peak - 1)).toBeLessThan(0.001);
    expect(Math.abs(fits[1]!.peak / ref2.peak - 1)).toBeLessThan(0.001);
    expect(Math.abs(fits[0]!.frequencyHz - ref1.hz)).toBeLessThan(0.002);
    expect(Math.abs(fits[1]!.frequencyHz - ref2.hz)).toBeLessThan(0.002);
    // And near the truth: sd sqrt(G/T) = 0.022 (Kay 1993 Example 3.14, from memory).
    expect(Math.abs(fits[0]!.peak - 0.8)).toBeLessThan(4 * tonePeakSd(0.01, 20));
    expect(Math.abs(fits[0]!.frequencyHz - 120.037)).toBeLessThan(0.01);
  });

  it("the same fit whatever the block size (streaming)", () => {
    const fs = 1000;
    const x = record(fs, 7.3, 0.02, [{ hz: 33.3, peak: 1, phase: 0.2 }], 5);
    const a = fitOf(x, fs, [{ hz: 33, searchHalfWidthHz: 1 }], 4096)[0]!;
    const b = fitOf(x, fs, [{ hz: 33, searchHalfWidthHz: 1 }], 97)[0]!;
    expect(b.peak).toBeCloseTo(a.peak, 12);
    expect(b.frequencyHz).toBeCloseTo(a.frequencyHz, 9);
  });

  it("the amplitude's spread over seeded records matches sqrt(G/T) (Cramer-Rao, Kay 1993 Example 3.14, from memory) within 20 %", () => {
    const fs = 512;
    const G = 0.01;
    const T = 10;
    const peaks: number[] = [];
    for (let s = 0; s < 60; s++) {
      const x = record(fs, T, G, [{ hz: 40, peak: 1, phase: s }], 1000 + s);
      peaks.push(fitOf(x, fs, [{ hz: 40, searchHalfWidthHz: 0.3 }], 4096)[0]!.peak);
    }
    const mean = peaks.reduce((a, b) => a + b, 0) / peaks.length;
    const sd = Math.sqrt(peaks.reduce((a, b) => a + (b - mean) ** 2, 0) / (peaks.length - 1));
    expect(Math.abs(mean - 1)).toBeLessThan((3 * tonePeakSd(G, T)) / Math.sqrt(peaks.length) + 0.002);
    expect(sd / tonePeakSd(G, T)).toBeGreaterThan(0.8);
    expect(sd / tonePeakSd(G, T)).toBeLessThan(1.2);
  });
});

describe("spectralTones", () => {
  it("finds a tone between lines in a Welch spectrum with its amplitude (no scalloping loss) and frequency", () => {
    const fs = 2048;
    const x = record(fs, 60, 0.001, [{ hz: 200.5 + 0.37 * 0.5, peak: 0.5, phase: 0 }], 3);
    const p = welchPsd(x, fs, { segmentLength: 1024 });
    const w = spectralWindow("hann", 1024);
    const k = spectralKernel("hann", w, "mean");
    const t = spectralTones(p, w, k.halfWidthBins);
    expect(t.length).toBe(1);
    expect(Math.abs(t[0]!.frequencyHz - (200.5 + 0.185))).toBeLessThan(0.05);
    expect(Math.abs(t[0]!.peak / 0.5 - 1)).toBeLessThan(0.03);
  });

  it("finds nothing in plain white noise", () => {
    const fs = 2048;
    const x = record(fs, 30, 0.001, [], 4);
    const p = welchPsd(x, fs, { segmentLength: 1024 });
    const w = spectralWindow("hann", 1024);
    expect(spectralTones(p, w, 2).length).toBe(0);
  });
});
