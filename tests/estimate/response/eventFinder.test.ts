import { describe, expect, it } from "vitest";
import {
  BaselineStretches,
  backgroundRms,
  EventFinder,
  gaussianFalseEventRate,
} from "../../../src/estimate/response/eventFinder.js";
import { gaussian } from "../../helpers.js";
import { shockSpectrum, ShockSpectrumAccumulator } from "../../../src/estimate/response/shockResponse.js";
import { bandLimited, FS, run, stretchMeanSquares } from "./eventRecords.js";

describe("EventFinder", () => {
  it("an event's SRS is the SRS of its window: a lone half-sine on a quiet record, pushed in random blocks, matches the pulse's own SRS", () => {
    const fs = 4000;
    const x = new Float64Array(3 * fs);
    const t0 = 1.2345;
    const T = 0.011;
    const i0 = Math.round(t0 * fs);
    for (let i = 0; i < Math.round(T * fs); i++) x[i0 + i] = 20 * Math.sin((Math.PI * i) / (T * fs));
    const fn = Float64Array.from([10, 40, 73, 150, 400]);
    const pre = 200;
    const post = 1600; // 0.4 s: four periods of 10 Hz
    const ev = run(
      new EventFinder({
        threshold: 1,
        holdSamples: 100,
        srs: { fnHz: fn, q: 10, sampleRateHz: fs, preSamples: pre, postSamples: post },
      }),
      x,
      1,
    );
    expect(ev).toHaveLength(1);
    const e = ev[0]!;
    expect(e.peak).toBeCloseTo(20, 1);
    // The window: pre samples before the first exceedance to post after the last.
    const ref = shockSpectrum(x.slice(e.firstIndex - pre, e.lastIndex + 1 + post), fn, 10, fs);
    for (let i = 0; i < fn.length; i++) {
      expect(e.srs!.maximax[i]).toBeCloseTo(ref.maximax[i]!, 12);
      expect(e.srs!.pseudoVelocity[i]).toBeCloseTo(ref.pseudoVelocity[i]!, 12);
    }
    expect(e.truncated).toBe(false);
  });

  it("primary and residual: the window split at the event's last exceedance, pushed in random blocks, matches the split made on the whole window; residual leads at low fn T, primary at high", () => {
    const fs = 4000;
    const T = 0.011;
    for (const seed of [5, 6, 7]) {
      const x = new Float64Array(3 * fs);
      const i0 = Math.round(1.2345 * fs);
      const n = Math.round(T * fs);
      for (let i = 0; i < n; i++) x[i0 + i] = 20 * Math.sin((Math.PI * (i + 0.5)) / n);
      const fn = Float64Array.from([5, 20, 73, 400]);
      const pre = 200;
      const post = 1600;
      const ev = run(
        new EventFinder({
          threshold: 0.5,
          holdSamples: 300,
          srs: { fnHz: fn, q: 10, sampleRateHz: fs, preSamples: pre, postSamples: post },
        }),
        x,
        seed,
      );
      expect(ev).toHaveLength(1);
      const e = ev[0]!;
      const ref = new ShockSpectrumAccumulator(fn, 10, fs);
      ref.push(x.slice(e.firstIndex - pre, e.lastIndex + 1));
      const primary = ref.split();
      ref.push(x.slice(e.lastIndex + 1, e.lastIndex + 1 + post));
      const residual = ref.finish();
      for (let i = 0; i < fn.length; i++) {
        expect(e.primary!.maximax[i]).toBeCloseTo(primary.maximax[i]!, 12);
        expect(e.residual!.maximax[i]).toBeCloseTo(residual.maximax[i]!, 12);
        expect(e.srs!.maximax[i]).toBeCloseTo(Math.max(primary.maximax[i]!, residual.maximax[i]!), 12);
      }
      // fn T = 0.055: the pulse is over before the SDOF moves much, the residual leads (common practice).
      expect(e.residual!.maximax[0]! / e.primary!.maximax[0]!).toBeGreaterThan(2);
      // fn T = 4.4: the SDOF follows the pulse, primary near the input's 20 and the residual small.
      expect(Math.abs(e.primary!.maximax[3]! / 20 - 1)).toBeLessThan(0.1);
      expect(e.residual!.maximax[3]! / e.primary!.maximax[3]!).toBeLessThan(0.2);
    }
  });

  it("exceedances closer than the hold time are one event; farther apart, two", () => {
    const x = new Float64Array(1000);
    x[100] = 5;
    x[140] = -7;
    x[300] = 4;
    const ev = run(new EventFinder({ threshold: 3, holdSamples: 50 }), x, 2);
    expect(ev.map((e) => [e.firstIndex, e.lastIndex, e.peakIndex, e.peak])).toEqual([
      [100, 140, 140, -7],
      [300, 300, 300, 4],
    ]);
  });

  it("finds known pulses on a Gaussian background at the default 6 x background: times, signed peaks, and nothing else", () => {
    const n = 1 << 17;
    const x = bandLimited(n, 11);
    const pulses = [
      { t: 7.3, peak: 9 },
      { t: 19.05, peak: -12 },
      { t: 40.5, peak: 8 },
      { t: 66.6, peak: -9.5 },
      { t: 90.2, peak: 15 },
      { t: 111.1, peak: 10 },
    ];
    const T = 0.012;
    for (const p of pulses) {
      const i0 = Math.round(p.t * FS);
      for (let i = 0; i < Math.round(T * FS); i++) x[i0 + i]! += p.peak * Math.sin((Math.PI * (i + 0.5)) / (T * FS));
    }
    const b = backgroundRms(stretchMeanSquares(x, FS));
    // The median of 1 s stretch r.m.s. is not moved by six 12 ms pulses.
    expect(Math.abs(b - 1)).toBeLessThan(0.03);
    const ev = run(new EventFinder({ threshold: 6 * b, holdSamples: 50 }), x, 3);
    expect(ev).toHaveLength(pulses.length);
    for (let k = 0; k < pulses.length; k++) {
      const p = pulses[k]!;
      const e = ev[k]!;
      // Peak time within the pulse (it lies at mid-pulse, the background moves it by a few samples).
      expect(Math.abs(e.peakIndex / FS - (p.t + T / 2))).toBeLessThanOrEqual(T / 2);
      expect(Math.sign(e.peak)).toBe(Math.sign(p.peak));
      // The background adds about N(0, 1) at the peak: within 4 sigma.
      expect(Math.abs(e.peak - p.peak)).toBeLessThan(4);
    }
  });

  it("refuses a threshold inside the background (too many events) with one clear code", () => {
    const x = bandLimited(1 << 14, 5);
    expect(() => run(new EventFinder({ threshold: 0.1, holdSamples: 1, maxEvents: 50 }), x, 1)).toThrow(
      /SHOCK_TOO_MANY_EVENTS/,
    );
  });
});

describe("gaussianFalseEventRate (audit 2: the README and the default's comment said 4.6 days)", () => {
  it("K = 6, nu0 = 100 Hz: one false event in 3.8 days; at 1 kHz in 9.1 h (2 nu0 exp(-K^2 / 2), Rice 1944-45, from memory)", () => {
    const closed = 2 * 100 * Math.exp(-18); // 3.046e-6 per s
    expect(gaussianFalseEventRate(6, 100)).toBeCloseTo(closed, 20);
    expect(1 / gaussianFalseEventRate(6, 100) / 86400).toBeCloseTo(3.8, 1);
    expect(1 / gaussianFalseEventRate(6, 1000) / 3600).toBeCloseTo(9.1, 1);
  });
});

describe("BaselineStretches", () => {
  it("nothing reaches the threshold: the plain mean, bit for bit; pooled past its capacity, a shock's stretches are still left out", () => {
    const x = gaussian(300000, 5, 0.05).map((v) => v + 1);
    let mean = 0;
    for (const v of x) mean += v;
    mean /= x.length;
    const quiet = new BaselineStretches(2); // 150000 stretches of 2: pooled twice (to stretches of 8)
    for (let i = 0; i < x.length; i += 7000)
      quiet.push(x.subarray(i, Math.min(x.length, i + 7000)), Math.min(7000, x.length - i));
    expect(quiet.baseline(0.5, mean)).toBe(mean);
    // A 30 g block of 2000 samples: the plain mean moves by 0.2 g; the baseline stays on the quiet samples' mean.
    const y = x.slice();
    for (let i = 100000; i < 102000; i++) y[i]! += 30;
    let yMean = 0;
    for (const v of y) yMean += v;
    yMean /= y.length;
    const b = new BaselineStretches(2);
    b.push(y, y.length);
    let quietMean = 0;
    for (let i = 0; i < x.length; i++) if (i < 100000 || i >= 102000) quietMean += x[i]!;
    quietMean /= x.length - 2000;
    expect(yMean - quietMean).toBeGreaterThan(0.19);
    expect(Math.abs(b.baseline(0.5, yMean) - quietMean)).toBeLessThan(1e-3);
  });
});
