import { readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { findingText, findingTexts } from "../../src/report/findingTexts.js";
import { rideRecording, weightedRmsFromPsd } from "../../src/analyses/rideRecording.js";
import { weightingMagnitude } from "../../src/weight/isoWeightings.js";
import { designWeightingFilter } from "../../src/weight/weightingFilter.js";
import { gaussian, python, tempDir } from "../helpers.js";
import { wavBytes } from "../wavBytes.js";

const dir = tempDir();
const sample = "samples/marlow-uv3-ride.wav";
const sampleOptions = {
  inputUnits: "m/s2" as const,
  scale: 40,
  axes: { x: "1", y: "2", z: "3" },
  floor: "4",
  posture: "seated" as const,
  exposureS: 8 * 3600,
};

describe("rideRecording on the Marlow UV-3 sample (invented, scripts/make-ride-sample.mjs)", () => {
  it("the time route and the |W|^2 x PSD route agree within 1 % on every axis and on the floor", async () => {
    const r = await rideRecording(sample, sampleOptions);
    for (const a of r.axes) expect(Math.abs(a.routeRatio - 1), a.axis).toBeLessThan(0.01);
    expect(Math.abs(r.seat!.awFloorFromPsd / r.seat!.awFloorWelchWeighted - 1)).toBeLessThan(0.01);
    expect(r.doubts).toEqual([]);
    // At 1000 Hz the realisation's error on this record is far below the 0.1 % margin: no WEIGHTING_ERROR_ON_RECORD.
    expect(r.notes.filter((n) => n.code === "WEIGHTING_ERROR_ON_RECORD")).toEqual([]);
  });
  it("A(8), the daily VDV and each a_w against numpy: the analog weighting applied by FFT to the decoded samples (a different realisation and formula code)", async () => {
    const r = await rideRecording(sample, { ...sampleOptions, exposureS: 6 * 3600 });
    // Independent reference: scipy.io.wavfile decodes the 16-bit PCM (x 40 / 32768, the sample's full scale);
    // each channel is weighted by multiplying its whole-record FFT by the analog H(j 2 pi f) of ISO 2631-1
    // Annex A (docs/REFERENCES.md sec. 8), written here again from the standard's parameters; then a_w, VDV and
    // A(8) = max(1.4 a_wx, 1.4 a_wy, a_wz) sqrt(T / 8 h), VDV_day = max(k VDV) (T / T_meas)^(1/4)
    // (Directive 2002/44/EC Annex part B; docs/REFERENCES.md sec. 8).
    const ref = JSON.parse(
      python(`
import json, numpy as np
from scipy.io import wavfile
fs, d = wavfile.read("${sample}")
x = d.astype(float) * 40 / 32768
def H(f, f1, f2, f3, f4, q4, f5=None, q5=None, f6=None, q6=None):
    s = 2j * np.pi * f
    w1, w2 = 2 * np.pi * f1, 2 * np.pi * f2
    h = s**2 / (s**2 + w1 * s * np.sqrt(2) + w1**2) * w2**2 / (s**2 + w2 * s * np.sqrt(2) + w2**2)
    w3, w4 = 2 * np.pi * f3, 2 * np.pi * f4
    h = h * (1 + s / w3) / (1 + s / (w4 * q4) + s**2 / w4**2)
    if f5:
        w5, w6 = 2 * np.pi * f5, 2 * np.pi * f6
        h = h * (1 + s / (w5 * q5) + s**2 / w5**2) / (1 + s / (w6 * q6) + s**2 / w6**2) * (w5 / w6)**2
    return h
n = x.shape[0]
f = np.fft.rfftfreq(n, 1 / fs)
wd = H(f, 0.4, 100, 2, 2, 0.63)
wk = H(f, 0.4, 100, 12.5, 12.5, 0.63, 2.37, 0.91, 3.35, 0.91)
out = []
for c, w in ((0, wd), (1, wd), (2, wk)):
    a = np.fft.irfft(np.fft.rfft(x[:, c] - x[:, c].mean()) * w, n)
    out.append([float(np.sqrt(np.mean(a**2))), float((np.sum(a**4) / fs) ** 0.25)])
T = 6 * 3600
aw = [o[0] for o in out]; vdv = [o[1] for o in out]
a8 = max(1.4 * aw[0], 1.4 * aw[1], aw[2]) * np.sqrt(T / 28800)
vd = max(1.4 * vdv[0], 1.4 * vdv[1], vdv[2]) * (T / (n / fs)) ** 0.25
print(json.dumps({"aw": aw, "vdv": vdv, "a8": float(a8), "vdvDay": float(vd)}))
`),
    );
    r.axes.forEach((a, i) => {
      expect(Math.abs(a.dose.rms / ref.aw[i] - 1), `a_w ${a.axis}`).toBeLessThan(2e-3);
      expect(Math.abs(a.dose.vdv / ref.vdv[i] - 1), `VDV ${a.axis}`).toBeLessThan(5e-3);
    });
    expect(Math.abs(r.exposure!.a8 / ref.a8 - 1)).toBeLessThan(2e-3);
    expect(Math.abs(r.exposure!.vdv / ref.vdvDay - 1)).toBeLessThan(5e-3);
    expect(r.axes.every((a) => a.stationarity.tested && !a.stationarity.stationary)).toBe(true); // idle, town, stops, highway, track
  });
  it("without an exposure: a_w, VDV, MTVV and crest as with one, no A(8), and a note naming what the exposure is needed for", async () => {
    const { exposureS: _e, ...noExposure } = sampleOptions;
    const [a, b] = await Promise.all([rideRecording(sample, noExposure), rideRecording(sample, sampleOptions)]);
    expect(a.exposure).toBeUndefined();
    expect(a.axes.map((x) => [x.dose.rms, x.dose.vdv, x.dose.mtvv, x.dose.crestFactor])).toEqual(
      b.axes.map((x) => [x.dose.rms, x.dose.vdv, x.dose.mtvv, x.dose.crestFactor]),
    );
    const note = a.notes.find((f) => f.code === "EXPOSURE_NOT_GIVEN")!;
    expect(findingText(note)).toMatch(/A\(8\), the daily VDV .* need the daily exposure/);
    expect(b.notes.some((f) => f.code === "EXPOSURE_NOT_GIVEN")).toBe(false);
  });
  it("a non-stationary ride: the route and Parseval checks are notes with the stationarity test beside them, never doubts", async () => {
    const r = await rideRecording(sample, sampleOptions);
    expect(r.doubts.map((f) => f.code)).toEqual([]);
    for (const f of r.notes.filter(
      (n) => n.code === "ROUTES_DIFFER_NOT_STATIONARY" || n.code === "PARSEVAL_NOT_STATIONARY",
    ))
      expect(findingText(f)).toMatch(/not stationary \(reverse arrangements A = \d+/);
  });
});

describe("rideRecording on records made here", () => {
  /** 4-channel float WAV: x, y, z, floor in m/s^2 at fs. */
  function write(
    name: string,
    fs: number,
    seconds: number,
    f: (t: number) => [number, number, number, number],
  ): string {
    const n = fs * seconds;
    const s: number[] = [];
    for (let i = 0; i < n; i++) s.push(...f(i / fs));
    const file = join(dir, name);
    writeFileSync(file, wavBytes({ tag: 3, bits: 32, channels: 4, sampleRate: fs, samples: s }));
    return file;
  }
  it("4 Hz sines of r.m.s. 1 (z, on 1 g) and 0.5 (x): a_w = |W(4 Hz)| x r.m.s. both ways; crest sqrt 2; VDV and MTVV of a sine", async () => {
    const w = 2 * Math.PI * 4;
    const file = write("sines.wav", 1000, 60, (t) => [
      0.5 * Math.SQRT2 * Math.sin(w * t),
      0,
      9.80665 + Math.SQRT2 * Math.sin(w * t),
      0.8 * Math.SQRT2 * Math.sin(w * t),
    ]);
    const r = await rideRecording(file, {
      inputUnits: "m/s2",
      axes: { x: "1", z: "3" },
      floor: "4",
      posture: "seated",
      exposureS: 8 * 3600,
    });
    const [x, z] = r.axes;
    // docs/REFERENCES.md sec. 8: 4 Hz through Wk 0.9672, through Wd 0.5119 (4 significant figures).
    expect(Math.abs(z!.dose.rms / 0.9672 - 1)).toBeLessThan(1e-3); // the sine starts abruptly at t = 0: its transient costs 0.07 % over 60 s
    // The PSD route spreads the tone over the Hann main lobe (4 Hz lies between 0.122 Hz lines) where Wk slopes: 0.1 %.
    expect(Math.abs(z!.awFromPsd / 0.9672 - 1)).toBeLessThan(2e-3);
    expect(Math.abs(x!.dose.rms / (0.5 * 0.5119) - 1)).toBeLessThan(1e-3);
    // Closed forms for a sine of r.m.s. a (docs/REFERENCES.md sec. 8): crest sqrt 2, MTVV = a (every 1 s window
    // holds four whole periods), VDV = (3/8)^(1/4) sqrt 2 a T^(1/4). The 4 Hz sine sampled at 1000 Hz has
    // a sample within 0.0025 periods of each crest (cos(2 pi 0.0025) = 0.99988).
    const aw = z!.dose.rms;
    expect(Math.abs(z!.dose.crestFactor / Math.SQRT2 - 1)).toBeLessThan(1e-3);
    expect(Math.abs(z!.dose.vdv / ((3 / 8) ** 0.25 * Math.SQRT2 * aw * 60 ** 0.25) - 1)).toBeLessThan(1e-3);
    expect(Math.abs(z!.dose.vdv / ((3 / 8) ** 0.25 * Math.SQRT2 * 0.9672 * 60 ** 0.25) - 1)).toBeLessThan(1.5e-3);
    expect(Math.abs(z!.dose.mtvv / 0.9672 - 1)).toBeLessThan(1e-3);
    expect(Math.abs(r.seat!.seat / (1 / 0.8) - 1)).toBeLessThan(1e-3);
    expect(Math.abs(r.exposure!.a8 / 0.9672 - 1)).toBeLessThan(1e-3); // 1.4 x 0.256 < 0.967, 8 h
    expect(findingTexts(r.notes).join()).toContain("only x, z measured");
  });
  it("weightedRmsFromPsd on white noise equals sigma x the weighting's noise bandwidth, sqrt(2/fs sum |W|^2 df) (Parseval)", () => {
    const fs = 1000;
    const f = Float64Array.from({ length: 4097 }, (_, k) => (k * fs) / 8192);
    const p = new Float64Array(4097).fill(2 / fs); // sigma = 1, one-sided
    let s = 0;
    for (let k = 0; k < f.length; k++) s += weightingMagnitude("Wk", f[k]!) ** 2;
    expect(weightedRmsFromPsd(p, f, fs / 8192, "Wk")).toBeCloseTo(Math.sqrt((2 / fs) * s * (fs / 8192)), 12);
  });
  it("Gaussian noise on z (seeded, made here): VDV / (a_w T^1/4) is near 3^(1/4) = 1.316", async () => {
    const fs = 500;
    const x = gaussian(fs * 120, 21);
    const file = write("noise.wav", fs, 120, (t) => [0, 0, x[Math.round(t * fs)]!, 0]);
    const r = await rideRecording(file, { inputUnits: "m/s2", axes: { z: "3" }, posture: "seated", exposureS: 3600 });
    // VDV^4 / (a_w^4 T) is the weighted record's sample kurtosis (mean ~0 after the 0.4 Hz high-pass), 3 for a
    // Gaussian (docs/REFERENCES.md sec. 8: Gaussian VDV = 3^(1/4) a_w T^(1/4)). Its spread for a correlated Gaussian
    // record is sqrt(24 sum_tau rho(tau)^4 / n) (Lomnicki 1961, the form amplitudeGates.ts uses; from memory),
    // rho the autocorrelation of white noise through |Wk|^2; the fourth root scales that by 3^(-3/4) / 4.
    const m = 4096;
    const g = Float64Array.from({ length: m }, (_, k) => weightingMagnitude("Wk", ((k + 0.5) * fs) / 2 / m) ** 2);
    const g0 = g.reduce((a, v) => a + v, 0);
    let sum4 = 1;
    for (let tau = 1; tau < 10 * fs; tau++) {
      let c = 0;
      for (let k = 0; k < m; k++) c += g[k]! * Math.cos((Math.PI * (k + 0.5) * tau) / m);
      sum4 += 2 * (c / g0) ** 4;
    }
    const sd = (3 ** -0.75 / 4) * Math.sqrt((24 * sum4) / (fs * 120));
    expect(Math.abs(r.axes[0]!.basicMethod.vdvRatio - 3 ** 0.25)).toBeLessThan(4 * sd);
    expect(4 * sd).toBeLessThan(0.035); // 0.032 here: tighter than the old toBeCloseTo(…, 1), which allowed 0.05
    expect(r.axes[0]!.stationarity.stationary).toBe(true);
  });
  it("a window shorter than one Welch segment keeps the time-domain figures and says the PSD route is missing (no NaN doubt)", async () => {
    const r = await rideRecording(sample, { ...sampleOptions, fromS: 10, toS: 16 });
    expect(r.axes[2]!.dose.rms).toBeGreaterThan(0);
    expect(findingTexts(r.doubts).filter((d) => d.includes("NaN"))).toEqual([]);
    expect(findingTexts(r.notes).join()).toContain("no whole Welch segment");
  });
  it("input errors: an unknown axis channel names the option axes; a rate below 100 Hz is refused", async () => {
    const file = write("slow.wav", 80, 30, () => [0, 0, 0, 0]);
    await expect(rideRecording(file, { axes: { z: "seat_z" }, posture: "seated", exposureS: 3600 })).rejects.toThrow(
      /option axes.*CHANNEL_NOT_FOUND/,
    );
    await expect(rideRecording(file, { axes: { z: "3" }, posture: "seated", exposureS: 3600 })).rejects.toThrow(
      /RIDE_RATE_TOO_LOW/,
    );
    await expect(
      rideRecording(file, { axes: { z: "3" }, floor: "3", posture: "seated", exposureS: 3600 }),
    ).rejects.toThrow(/option floor/);
  });
});

describe("ride on instrument-shaped records (phone and logger rates, a tilted start)", () => {
  // scipy 1.17.1: the fitted design's error against scipy.signal.freqs of the analog sections (scripts/make_weighting_fixture.py).
  const fixture: { fitted: { weighting: string; sampleRateHz: number; maxErrorPct: number }[] } = JSON.parse(
    readFileSync(new URL("../fixtures/scipy-weighting.json", import.meta.url), "utf8"),
  );
  const stated = (w: string, fs: number) =>
    fixture.fitted.find((c) => c.weighting === w && c.sampleRateHz === fs)!.maxErrorPct;
  function wav(name: string, fs: number, channels: Float64Array[]): string {
    const n = channels[0]!.length;
    const s: number[] = [];
    for (let i = 0; i < n; i++) for (const c of channels) s.push(c[i]!);
    const file = join(dir, name);
    writeFileSync(file, wavBytes({ tag: 3, bits: 32, channels: channels.length, sampleRate: fs, samples: s }));
    return file;
  }
  const sine = (fs: number, seconds: number, f: number, rms: number, offset = 0) =>
    Float64Array.from(
      { length: fs * seconds },
      (_, i) => offset + rms * Math.SQRT2 * Math.sin((2 * Math.PI * f * i) / fs),
    );
  // |W| at nominal centres, ISO 2631-1 Table 3 as computed in docs/REFERENCES.md sec. 8 (4 significant figures).
  const table: Record<string, Record<number, number>> = {
    Wk: { 4: 0.9672, 16: 0.7687, 31.5: 0.4048, 63: 0.1861 },
    Wd: { 1: 1.011, 4: 0.5119, 16: 0.1254, 31.5: 0.0632, 63: 0.0295 },
  };
  for (const [fs, top] of [
    [100, 31.5],
    [128, 31.5],
    [200, 63],
    [256, 63],
    [400, 63],
  ] as const) {
    it(`${fs} Hz: ride runs; sines at 4 Hz and ${top} Hz come out at |W| x r.m.s. within the stated error; every result states that error and which figures carry it`, async () => {
      const seconds = 40;
      const z = sine(fs, seconds, 4, 1, 9.80665);
      const zTop = sine(fs, seconds, top, 1, 9.80665);
      const y = sine(fs, seconds, top, 1);
      const r = await rideRecording(wav(`rate-${fs}.wav`, fs, [y, z, zTop]), {
        inputUnits: "m/s2",
        axes: { y: "1", z: "2" },
        floor: "3",
        posture: "seated",
      });
      const wk = stated("Wk", fs);
      const wd = stated("Wd", fs);
      expect(Math.abs(r.axes[1]!.dose.rms / table.Wk![4]! - 1)).toBeLessThan(1e-3 + wk / 100); // Table 3 rounding 5e-5
      expect(Math.abs(r.seat!.awFloor / table.Wk![top]! - 1)).toBeLessThan(2e-3 + wk / 100);
      expect(Math.abs(r.axes[0]!.dose.rms / table.Wd![top]! - 1)).toBeLessThan(1e-2 + wd / 100); // 0.0632 and 0.0295: 3 figures
      const e = r.notes.find((f) => f.code === "WEIGHTING_ERROR")!;
      expect(e.values.rateHz).toBe(fs);
      expect(e.values.maxErrorPercent).toBe(Number(Math.max(wk, wd).toPrecision(2)));
      expect(findingText(e)).toMatch(/a_w, crest factor, VDV, MTVV, the total value and SEAT carry it/);
      expect(r.notes.some((f) => f.code === "BAND_SHORT")).toBe(fs < 180);
      // Pure sines trip the amplitude gates (a deterministic signal's crest and kurtosis), not the weighting checks.
      expect(r.doubts.filter((f) => f.code === "ROUTES_DIFFER" || f.code === "PARSEVAL_MISMATCH")).toEqual([]);
    });
  }
  // Content between the top covered band and Nyquist (a 46 Hz tone at 100 Hz through Wd, 95 Hz at 200 Hz through Wk) is weighted in time by a
  // realisation that departs from |W| most there (Wd +10 % at 47 Hz for 100 Hz, Wk +15 % at 95 Hz for 200 Hz: scipy.signal.
  // freqs of the analog sections against sosfreqz of the design, ride audit 2026-12-03), beyond the error stated at the
  // centres. The audit found a_w +6.2 % and +8.1 % off |W| A / sqrt 2 with the stated 2 % and 2.7 %, and the route
  // difference put down to a level that changes. The record's own error, sqrt(sum |H_d|^2 P / sum |W|^2 P) over its
  // PSD, must be said, and the route check must not blame it on the ride.
  for (const [fs, f, w] of [
    [100, 46, "Wd"],
    [200, 95, "Wk"],
  ] as const) {
    it(`${fs} Hz, a ${f} Hz tone: a_w carries the realisation's error at ${f} Hz, and a note says it on this record (WEIGHTING_ERROR_ON_RECORD) instead of a route difference`, async () => {
      const seconds = 120;
      const tone = sine(fs, seconds, f, 1.5);
      const slowRms = w === "Wd" ? 0.02 : 0.15; // the tone carries most of a_w
      const slow = sine(fs, seconds, 4, slowRms);
      const x = Float64Array.from(tone, (v, i) => v + slow[i]! + (w === "Wk" ? 9.80665 : 0));
      const r = await rideRecording(wav(`near-nyquist-${fs}.wav`, fs, [x]), {
        inputUnits: "m/s2",
        axes: w === "Wk" ? { z: "1" } : { x: "1" },
        posture: "seated",
      });
      const a = r.axes[0]!;
      // The exact figure: the analog |W| (isoWeightings.ts, held to scipy.signal.freqs) times each sine's r.m.s.
      const exact = Math.hypot(weightingMagnitude(w, f) * 1.5, weightingMagnitude(w, 4) * slowRms);
      const d = designWeightingFilter(w, fs);
      const off = a.dose.rms / exact - 1;
      expect(Math.abs(off) * 100).toBeGreaterThan(d.maxErrorPct); // the realisation's error here exceeds the stated one
      const note = r.notes.find((n) => n.code === "WEIGHTING_ERROR_ON_RECORD");
      expect(note, JSON.stringify(r.notes.map((n) => n.code))).toBeDefined();
      expect(note!.values.offPercent! / 100).toBeCloseTo(off, 2);
      expect(note!.about).toMatchObject({ axis: a.axis });
      expect(findingText(note!)).toMatch(/on this record's spectrum/);
      expect(a.awFromPsd / exact).toBeCloseTo(1, 2);
      expect(r.notes.concat(r.doubts).filter((n) => n.code.startsWith("ROUTES_DIFFER"))).toEqual([]);
    });
  }
  it("the stated error per rate (README's table) is the scipy-measured one: 100 Hz 2.3 %, 128 Hz 2.1 %, 200 Hz 2.7 %, 256 Hz 0.72 %, 400 Hz 0.093 % at most over the weightings", () => {
    const worst = (fs: number) =>
      Math.max(...fixture.fitted.filter((c) => c.sampleRateHz === fs).map((c) => c.maxErrorPct));
    expect([100, 128, 200, 256, 400].map((fs) => Number(worst(fs).toPrecision(2)))).toEqual([
      2.3, 2.1, 2.7, 0.72, 0.093,
    ]);
  });
  for (const factor of [2, 4]) {
    it(`a phone record at 200 Hz whose sensor updated at ${200 / factor} Hz (held ${factor}x): ride names the update rate and raises no clipping doubt from the repeated extremes`, async () => {
      const readings = gaussian((60 * 200) / factor, 41 + factor, 0.5);
      const z = new Float64Array(60 * 200);
      for (let i = 0; i < z.length; i++) z[i] = 9.80665 + readings[Math.floor(i / factor)]!;
      const r = await rideRecording(wav(`held-${factor}.wav`, 200, [z]), {
        inputUnits: "m/s2",
        axes: { z: "1" },
        posture: "seated",
      });
      const note = r.notes.find((f) => f.code === "HELD_SAMPLES")!;
      expect(note.values.updateRateHz).toBe(200 / factor);
      expect(findingText(note)).toMatch(/^z \(ch1\): held samples/);
      expect(r.doubts.map((f) => f.code)).not.toContain("CLIPPING");
    });
  }
  it("curves (the lateral axis tilting between -1.0 and +0.8 every 20 s) and a 60 s stop: the route mismatch is a note with the failed stationarity test beside it, not a doubt; Parseval agrees once the gravity steps are weighed alike", async () => {
    for (const fs of [200, 1000]) {
      const n = 300 * fs;
      const noise = gaussian(n, 5, 0.15);
      const y = Float64Array.from(noise, (v, i) => {
        const t = i / fs;
        return (Math.floor(t / 20) % 2 === 1 ? 0.8 : -1) + (t > 100 && t < 160 ? 0.2 : 1) * v;
      });
      const r = await rideRecording(wav(`curves-${fs}.wav`, fs, [y]), {
        inputUnits: "m/s2",
        axes: { y: "1" },
        posture: "seated",
      });
      expect(
        r.doubts.map((f) => f.code),
        `${fs} Hz`,
      ).toEqual([]);
      // The PSD sat -19 % off the plain mean square of the segments (the rides): the gravity steps inside the
      // 8 s segments are content below the first line, which the window weighs unlike a plain mean. Since 0.3.0 the
      // second reference, each segment's slow part weighed alike on both sides, agrees, so there is no Parseval note.
      expect(r.notes.some((f) => f.code === "PARSEVAL_NOT_STATIONARY")).toBe(false);
      if (fs === 1000) {
        const route = r.notes.find((f) => f.code === "ROUTES_DIFFER_NOT_STATIONARY")!;
        expect(Math.abs(route.values.offPercent!)).toBeGreaterThan(1);
      }
    }
  });
  it("a lateral axis starting at -1.0 m/s² of gravity and tilting to +0.8: a_w, VDV, MTVV and crest within 1 % of scipy's sosfilt started in the steady state for -1.0", async () => {
    const fs = 200;
    const n = 120 * fs;
    const noise = gaussian(n, 77, 0.4);
    const y = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const t = i / fs;
      const g = t < 30 ? -1 : t > 50 ? 0.8 : -0.1 - 0.9 * Math.cos((Math.PI * (t - 30)) / 20);
      y[i] = Math.fround(g + noise[i]! + 0.3 * Math.SQRT2 * Math.sin(2 * Math.PI * 1.2 * t));
    }
    const r = await rideRecording(wav("tilted.wav", fs, [y]), {
      inputUnits: "m/s2",
      axes: { y: "1" },
      posture: "seated",
    });
    const d = designWeightingFilter("Wd", fs);
    const dataFile = join(dir, "tilted.f64");
    writeFileSync(dataFile, Buffer.from(y.buffer));
    // Independent of psdgate's start: scipy.signal.sosfilt with zi = sosfilt_zi(sos) * (-1.0), the gravity the
    // record starts with; a_w, VDV, 1 s running r.m.s. and crest in numpy (ISO 2631-1 6.1-6.3 as docs/REFERENCES.md sec. 8).
    const ref = JSON.parse(
      python(`
import json, numpy as np, scipy.signal as ss
sos = np.array(${JSON.stringify(d.sections.map((q) => [q.b0, q.b1, q.b2, 1, q.a1, q.a2]))})
x = np.fromfile("${dataFile}", dtype="<f8")
a, _ = ss.sosfilt(sos, x, zi=ss.sosfilt_zi(sos) * -1.0)
a = a * ${d.gain}
fs = ${fs}
c = np.concatenate([[0], np.cumsum(a * a)])
run = np.sqrt((c[fs:] - c[:-fs]) / fs)
i = int(np.argmax(run))
aw = float(np.sqrt(np.mean(a * a)))
print(json.dumps({"aw": aw, "vdv": float((np.sum(a**4) / fs) ** 0.25), "mtvv": float(run[i]), "mtvvAtS": (i + fs) / fs, "crest": float(np.max(np.abs(a)) / aw)}))
`),
    );
    const got = r.axes[0]!.dose;
    expect(Math.abs(got.rms / ref.aw - 1)).toBeLessThan(0.01);
    expect(Math.abs(got.vdv / ref.vdv - 1)).toBeLessThan(0.01);
    expect(Math.abs(got.mtvv / ref.mtvv - 1)).toBeLessThan(0.01);
    expect(Math.abs(got.crestFactor / ref.crest - 1)).toBeLessThan(0.01);
    expect(got.mtvvAtS).toBeGreaterThan(2); // not the filter settling in the first second
    // The same vibration on a sensor that starts at +0.8 (no tilt) gives the same figures before the tilt.
    const flat = Float64Array.from(y, (v, i) => (i < 25 * fs ? v + 1.8 : v));
    const r2 = await rideRecording(wav("tilted-flat.wav", fs, [flat]), {
      inputUnits: "m/s2",
      axes: { y: "1" },
      posture: "seated",
      toS: 25,
    });
    const r1 = await rideRecording(wav("tilted.wav", fs, [y]), {
      inputUnits: "m/s2",
      axes: { y: "1" },
      posture: "seated",
      toS: 25,
    });
    expect(Math.abs(r2.axes[0]!.dose.mtvv / r1.axes[0]!.dose.mtvv - 1)).toBeLessThan(1e-6);
    expect(Math.abs(r2.axes[0]!.dose.vdv / r1.axes[0]!.dose.vdv - 1)).toBeLessThan(1e-6);
  });
});

describe("rideRecording: a logger that froze", () => {
  it("10 s of one held value in 120 s is a doubt naming the stretch (a_w and A(8) count it as no vibration); the live axes beside it have none", async () => {
    const fs = 200;
    const n = 120 * fs;
    const x = gaussian(n, 51, 0.5);
    const y = gaussian(n, 52, 0.5);
    const z = gaussian(n, 53, 0.8);
    for (let i = 40 * fs; i < 50 * fs; i++) z[i] = z[40 * fs - 1]!;
    const samples: number[] = [];
    for (let i = 0; i < n; i++) samples.push(x[i]!, y[i]!, 9.80665 + z[i]!);
    const f = join(dir, "frozen.wav");
    writeFileSync(f, wavBytes({ tag: 3, bits: 32, channels: 3, sampleRate: fs, samples }));
    const r = await rideRecording(f, {
      inputUnits: "m/s2",
      axes: { x: "1", y: "2", z: "3" },
      posture: "seated",
      exposureS: 8 * 3600,
    });
    const dead = r.doubts.filter((d) => d.code === "DEAD_STRETCH");
    expect(dead).toHaveLength(1);
    expect(dead[0]!.about).toMatchObject({ axis: "z", channel: "ch3" });
    expect(dead[0]!.values).toMatchObject({ fromS: 40, toS: 50 });
    expect(findingText(dead[0]!)).toContain("40-50 s holds no signal at all");
  });
});
