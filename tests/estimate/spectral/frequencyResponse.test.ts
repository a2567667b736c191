import { describe, expect, it } from "vitest";
import { crossSpectralDensity } from "../../../src/estimate/spectral/crossSpectrum.js";
import {
  findResonances,
  frequencyResponse,
  magnitudeBoundFactor,
} from "../../../src/estimate/spectral/frequencyResponse.js";
import { frequencyAxis } from "../../../src/estimate/spectral/psdEstimate.js";
import { welchDof } from "../../../src/estimate/spectral/welchDof.js";
import { gaussian, python } from "../../helpers.js";
import FFT from "fft.js";

const N = 1 << 18;
const fs = 1024;

function fr(x: Float64Array, y: Float64Array, seg = 256, overlap = 0.5) {
  const c = crossSpectralDensity(x, y, fs, { segmentLength: seg, overlap });
  const nd = welchDof(c.window, c.settings.hop, c.segments) / 2;
  return { c, nd, r: frequencyResponse(c.auto[0]!, c.auto[1]!, c.crossRe[1]!, c.crossIm[1]!, nd) };
}

/** Mean of a over interior lines 1..len-2. */
function interiorMean(a: Float64Array): number {
  let s = 0;
  for (let k = 1; k < a.length - 1; k++) s += a[k]!;
  return s / (a.length - 2);
}

describe("frequencyResponse known answers (docs/REFERENCES.md sec. 9, Bendat & Piersol ch. 9)", () => {
  it("y = x + n, n independent with the same variance: gamma^2 0.5, |H1| 1, |H2| 2 (within 2 %)", () => {
    const x = gaussian(N, 11);
    const n = gaussian(N, 12);
    const y = x.map((v, i) => v + n[i]!);
    const { r } = fr(x, y);
    expect(interiorMean(r.coherence)).toBeCloseTo(0.5, 1);
    expect(Math.abs(interiorMean(r.coherence) / 0.5 - 1)).toBeLessThan(0.02);
    expect(Math.abs(interiorMean(r.h1Magnitude) - 1)).toBeLessThan(0.02);
    expect(Math.abs(interiorMean(r.h2Magnitude) / 2 - 1)).toBeLessThan(0.02);
  });
  it("input noise: measured input x + m, output y = x: |H1| 0.5, |H2| 1 (within 2 %)", () => {
    const x = gaussian(N, 13);
    const m = gaussian(N, 14);
    const xm = x.map((v, i) => v + m[i]!);
    const { r } = fr(xm, x);
    expect(Math.abs(interiorMean(r.h1Magnitude) / 0.5 - 1)).toBeLessThan(0.02);
    expect(Math.abs(interiorMean(r.h2Magnitude) - 1)).toBeLessThan(0.02);
  });
  it("two independent noises, 20 disjoint segments: mean coherence near the 1/n_d bias, 0.05 (docs/REFERENCES.md sec. 9: 0.0501 simulated; Carter, Knapp & Nuttall 1973, from memory)", () => {
    // 10 seeded records x 127 interior lines: the mean's standard error is about 0.0015.
    let sum = 0;
    for (let seed = 0; seed < 10; seed++) {
      const x = gaussian(20 * 256, 300 + seed);
      const y = gaussian(20 * 256, 400 + seed);
      const c = crossSpectralDensity(x, y, fs, { segmentLength: 256, overlap: 0, window: "hann" });
      expect(c.segments).toBe(20);
      sum += interiorMean(frequencyResponse(c.auto[0]!, c.auto[1]!, c.crossRe[1]!, c.crossIm[1]!, 20).coherence);
    }
    expect(Math.abs(sum / 10 - 0.05)).toBeLessThan(0.005);
  });
  it("a pure delay y(t) = x(t - tau) gives phase -360 f tau degrees (tau = 5 samples, to 0.5 degree up to 300 Hz)", () => {
    const x = gaussian(N, 17);
    const d = 5;
    const y = new Float64Array(N);
    for (let i = d; i < N; i++) y[i] = x[i - d]!;
    const { r } = fr(x, y, 1024);
    const f = frequencyAxis(1024, fs);
    let worst = 0;
    for (let k = 1; f[k]! <= 300; k++) {
      const expected = -360 * f[k]! * (d / fs);
      const wrapped = ((((expected + 180) % 360) + 360) % 360) - 180;
      let diff = r.phaseDeg[k]! - wrapped;
      diff = ((((diff + 180) % 360) + 360) % 360) - 180;
      worst = Math.max(worst, Math.abs(diff));
    }
    expect(worst).toBeLessThan(0.5);
  });
  it("an output lagging 45 degrees has a cross-spectrum phase of -45 (scipy csd's conj(X) Y, docs/REFERENCES.md sec. 9)", () => {
    const n = 1 << 14;
    const x = new Float64Array(n);
    const y = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      x[i] = Math.sin((2 * Math.PI * 64 * i) / fs);
      y[i] = Math.sin((2 * Math.PI * 64 * i) / fs - Math.PI / 4);
    }
    const { r } = fr(x, y, 256);
    expect(r.phaseDeg[16]!).toBeCloseTo(-45, 6);
  });
  it("the random-error bound of |H1| matches the scatter of seeded estimates within 15 % (Bendat & Piersol, 2nd ed., p. 317)", () => {
    // y = x + n (gamma^2 = 0.5): each interior line's |H1| is an estimate of 1; their spread over lines and
    // seeds against eps[|H|] = sqrt(1 - g2) / (|g| sqrt(2 n_d)) with n_d = half the Welch DOF.
    let sumSq = 0;
    let count = 0;
    let eps = 0;
    for (let seed = 0; seed < 8; seed++) {
      const x = gaussian(64 * 256, 100 + seed);
      const n = gaussian(64 * 256, 200 + seed);
      const y = x.map((v, i) => v + n[i]!);
      const { r, nd } = fr(x, y, 256, 0.5);
      for (let k = 2; k < 127; k++) {
        sumSq += (r.h1Magnitude[k]! - 1) ** 2;
        count++;
      }
      eps = Math.sqrt(0.5) / (Math.sqrt(0.5) * Math.sqrt(2 * nd));
    }
    const spread = Math.sqrt(sumSq / count);
    expect(Math.abs(spread / eps - 1)).toBeLessThan(0.15);
  });
});

/** Base-excitation SDOF response by circular filtering in the frequency domain (fft.js as the reference transform). */
function sdofFilter(x: Float64Array, fnHz: number, q: number, rate: number): Float64Array {
  const n = x.length;
  const f = new FFT(n);
  const spec = f.createComplexArray();
  f.realTransform(spec, x);
  f.completeSpectrum(spec);
  const zeta = 1 / (2 * q);
  for (let k = 0; k < n; k++) {
    const fk = (k <= n / 2 ? k : k - n) * (rate / n);
    const r = fk / fnHz;
    // T = (1 + i 2 zeta r) / (1 - r^2 + i 2 zeta r), Hermitian in k because r changes sign.
    const nr = 1,
      ni = 2 * zeta * r,
      dr = 1 - r * r,
      di = 2 * zeta * r;
    const den = dr * dr + di * di;
    const tr = (nr * dr + ni * di) / den;
    const ti = (ni * dr - nr * di) / den;
    const a = spec[2 * k]!,
      b = spec[2 * k + 1]!;
    spec[2 * k] = a * tr - b * ti;
    spec[2 * k + 1] = a * ti + b * tr;
  }
  const out = f.createComplexArray();
  f.inverseTransform(out, spec);
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) y[i] = out[2 * i]!;
  return y;
}

describe("findResonances", () => {
  it("finds a base-driven SDOF at 200 Hz, Q 10: frequency within 0.5 %, peak |T| = sqrt(1 + Q^2) within 3 %, half-power Q within 5 %", () => {
    const x = gaussian(N, 21);
    const y = sdofFilter(x, 200, 10, fs);
    const { r, c } = fr(x, y, 1024);
    const f = frequencyAxis(1024, fs);
    const res = findResonances(f, r.h1Magnitude, r.coherence);
    expect(c.segments).toBeGreaterThan(100);
    expect(res.length).toBe(1);
    const p = res[0]!;
    expect(Math.abs(p.frequencyHz / 200 - 1)).toBeLessThan(0.005);
    // |T(f_n)|^2 = (1 + (2 zeta)^2) / (2 zeta)^2 = 1 + Q^2 (docs/REFERENCES.md sec. 4, at r = 1)
    expect(Math.abs(p.magnitude / Math.sqrt(101) - 1)).toBeLessThan(0.03);
    expect(Math.abs(p.q / 10 - 1)).toBeLessThan(0.05);
    expect(p.resolutionLimited).toBe(false);
  });
  it("ignores a flat response and a peak below the coherence floor", () => {
    const f = frequencyAxis(64, 64);
    const flat = new Float64Array(33).fill(1);
    expect(findResonances(f, flat, new Float64Array(33).fill(1))).toEqual([]);
    const m = new Float64Array(33).fill(1);
    m[10] = 5;
    expect(findResonances(f, m, new Float64Array(33).fill(0.2))).toEqual([]);
    expect(findResonances(f, m, new Float64Array(33).fill(0.9)).length).toBe(1);
  });
});

describe("the |H1| bounds at few averages (audit 2: the normal quantile covered 70 % at n_d 2, 91 % at 8 for 95 %)", () => {
  it("magnitudeBoundFactor = t_(2 n_d - 2) sqrt(n_d / (n_d - 1)) (scipy.stats.t.ppf); the normal quantile from one segment", () => {
    const nds = [1.5, 2, 4, 8, 32, 200];
    const ref = JSON.parse(
      python(`
import json, math
from scipy.stats import t
print(json.dumps([float(t.ppf(0.975, 2 * n - 2) * math.sqrt(n / (n - 1))) for n in ${JSON.stringify(nds)}]))`),
    ) as number[];
    nds.forEach((nd, i) =>
      expect(Math.abs(magnitudeBoundFactor(nd, 0.95) / ref[i]! - 1), `n_d ${nd}`).toBeLessThan(1e-8),
    );
    expect(magnitudeBoundFactor(1, 0.95)).toBeCloseTo(1.959964, 5);
  });
  it("Monte Carlo: |H1| (1 -+ factor eps) holds the true |H| = 1 in 95 % +- 1 % of 20000 lines at n_d 2, 4, 8 and coherence 0.1 to 0.99", () => {
    // Each line: n_d segments' transforms, X and the output noise N complex Gaussian (made here), Y = X + N, so
    // gamma^2 = 1 / (1 + var N) (Bendat & Piersol 2010, ch. 9). 20000 lines: the coverage's sd is 0.0015.
    const lines = 20000;
    let seed = 40;
    for (const nd of [2, 4, 8]) {
      for (const g2 of [0.1, 0.5, 0.99]) {
        const s = Math.sqrt((1 / g2 - 1) / 2);
        const gxx = new Float64Array(lines);
        const gyy = new Float64Array(lines);
        const re = new Float64Array(lines);
        const im = new Float64Array(lines);
        const u = gaussian(4 * nd * lines, seed++);
        for (let k = 0; k < lines; k++) {
          for (let j = 0; j < nd; j++) {
            const o = 4 * (k * nd + j);
            const xr = u[o]! / Math.SQRT2;
            const xi = u[o + 1]! / Math.SQRT2;
            const yr = xr + s * u[o + 2]!;
            const yi = xi + s * u[o + 3]!;
            gxx[k] = gxx[k]! + xr * xr + xi * xi;
            gyy[k] = gyy[k]! + yr * yr + yi * yi;
            re[k] = re[k]! + xr * yr + xi * yi;
            im[k] = im[k]! + xr * yi - xi * yr;
          }
        }
        const r = frequencyResponse(gxx, gyy, re, im, nd);
        const f = magnitudeBoundFactor(nd, 0.95);
        let held = 0;
        for (let k = 0; k < lines; k++) {
          const h = r.h1Magnitude[k]!;
          const e = r.magnitudeError[k]!;
          if (h * Math.max(0, 1 - f * e) <= 1 && 1 <= h * (1 + f * e)) held++;
        }
        expect(Math.abs(held / lines - 0.95), `n_d ${nd}, gamma^2 ${g2}: ${held / lines}`).toBeLessThan(0.01);
      }
    }
  });
});
