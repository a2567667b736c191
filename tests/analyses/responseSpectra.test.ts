import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { loadProfile } from "../../src/analyses/checkRecording.js";
import { profileMotion } from "../../src/compare/testProfile.js";
import { InputError } from "../../src/errors.js";
import {
  compareResponses,
  loadSpectrumSource,
  parseFnGrid,
  responseSpectra,
} from "../../src/analyses/responseSpectra.js";
import { psdCsv } from "../../src/report/psdJson.js";
import { analyzeRecording } from "../../src/pass/analyzeRecording.js";
import { python, tempDir } from "../helpers.js";

const dir = tempDir();
const profileFile = join(dir, "flat.yaml");
// 0.04 g^2/Hz on 20-2000 Hz (the band-limited case of docs/REFERENCES.md sec. 4 and 6), 600 s.
writeFileSync(
  profileFile,
  "title: flat\nunits: g2/Hz\npoints: [{hz: 20, level: 0.04}, {hz: 2000, level: 0.04}]\ntolerance: {bands: [{fromHz: 20, toHz: 2000, upperDb: 3, lowerDb: 3}]}\ndurationS: 600\n",
);

async function inputError(f: () => Promise<unknown> | unknown): Promise<string> {
  try {
    await f();
  } catch (e) {
    if (e instanceof InputError) return `${e.code} ${e.message}`;
    throw e;
  }
  return "no error";
}

describe("parseFnGrid", () => {
  it("A:B:N is geometric with N per octave and ends at B; a list is sorted; bad text names the option fn", async () => {
    expect(Array.from(parseFnGrid("100:400:2"), (x) => Number(x.toFixed(6)))).toEqual([
      100, 141.421356, 200, 282.842712, 400,
    ]);
    expect(parseFnGrid("20:2000").length).toBe(Math.floor(6 * Math.log2(100)) + 2);
    expect(Array.from(parseFnGrid("300, 100"))).toEqual([100, 300]);
    expect(await inputError(() => parseFnGrid("100:50"))).toMatch(/^OPTION_INVALID option fn: expected A:B or A:B:N/);
  });
});

describe("responseSpectra on a profile", () => {
  it("f_n 100 Hz, Q 10 on 0.04 g^2/Hz 20-2000 Hz: 7.914 g (docs/REFERENCES.md sec. 4, 0.5 %), Miles 7.927 g, relative displacement near 0.1969 mm, duration from the profile", async () => {
    const src = await loadSpectrumSource(profileFile);
    expect(src.kind).toBe("profile");
    const r = responseSpectra(src, { fnHz: Float64Array.of(100), q: 10 });
    expect(Math.abs(r.accelRms[0]! / 7.914 - 1)).toBeLessThan(0.005);
    expect(r.milesRms[0]!).toBeCloseTo(7.927, 3);
    // The white-noise closed form is exact over 0..inf; the 20-2000 Hz band loses a little (docs/REFERENCES.md sec. 4).
    expect(Math.abs((r.relDispRms[0]! * 1000) / 0.1969 - 1)).toBeLessThan(0.01);
    expect(r.relDispMilesRms[0]! * 1000).toBeCloseTo(0.1969, 4);
    expect(r.durationS).toBe(600);
    expect(Math.abs(r.upcrossingRateHz[0]! / 100 - 1)).toBeLessThan(0.1);
    expect(r.sn.basquinB).toBe(8);
  });
  it("largest peak and damage against scipy: quadrature of the SDOF transfers over the profile, Davenport's and the Rayleigh damage formulas written again (not psdgate's moments or factor)", async () => {
    const fnHz = Float64Array.of(40, 100, 400);
    const r = responseSpectra(await loadSpectrumSource(profileFile), { fnHz, q: 10 });
    // scipy.integrate.quad over 20-2000 Hz, split at f_n: m0, m2 of the absolute acceleration
    // |T|^2 = (1 + (2 zeta f/fn)^2) / ((1 - (f/fn)^2)^2 + (2 zeta f/fn)^2) and of the relative displacement
    // 1 / ((wn^2 - w^2)^2 + (2 zeta wn w)^2) times G = 0.04 g^2/Hz (g = 9.80665 m/s^2 for metres). Rice:
    // nu0+ = sqrt(m2 / m0) (docs/REFERENCES.md sec. 10 and disagreements item 3); Davenport 1964: largest peak over sigma
    // sqrt(2 ln nu T) + 0.5772 / sqrt(2 ln nu T); damage (nu0+ T / C) (sqrt 2 K sigma_z)^b Gamma(1 + b/2),
    // b = 8, C = K = 1, T = 600 s (docs/REFERENCES.md sec. 14).
    const ref = JSON.parse(
      python(`
import json, numpy as np
from scipy.integrate import quad
from scipy.special import gamma
G, Q, T, b = 0.04, 10.0, 600.0, 8
z = 1 / (2 * Q)
out = []
for fn in [40.0, 100.0, 400.0]:
    ta = lambda f: (1 + (2 * z * f / fn) ** 2) / ((1 - (f / fn) ** 2) ** 2 + (2 * z * f / fn) ** 2) * G
    wn = 2 * np.pi * fn
    tz = lambda f: G * 9.80665 ** 2 / ((wn ** 2 - (2 * np.pi * f) ** 2) ** 2 + (2 * z * wn * 2 * np.pi * f) ** 2)
    def m(h, k):
        return sum(quad(lambda f: f ** k * h(f), a, c, limit=500, epsabs=0, epsrel=1e-12)[0] for a, c in ((20, fn), (fn, 2000)))
    a0, a2 = m(ta, 0), m(ta, 2)
    z0, z2 = m(tz, 0), m(tz, 2)
    nu = np.sqrt(a2 / a0)
    s = np.sqrt(2 * np.log(nu * T))
    nuz = np.sqrt(z2 / z0)
    out.append({"peak": float(np.sqrt(a0) * (s + 0.5772156649 / s)), "damage": float(nuz * T * (np.sqrt(2) * np.sqrt(z0)) ** b * gamma(1 + b / 2))})
print(json.dumps(out))
`),
    );
    ref.forEach((x: { peak: number; damage: number }, i: number) => {
      expect(Math.abs(r.extremePeak[i]! / x.peak - 1), `peak at ${fnHz[i]} Hz`).toBeLessThan(1e-5);
      expect(Math.abs(r.fatigueDamage[i]! / x.damage - 1), `damage at ${fnHz[i]} Hz`).toBeLessThan(1e-4);
    });
  });
  it("kinematics equal the profile's closed form (profileMotion) to 1e-6 and docs/REFERENCES.md sec. 6 (69.45 mm/s, 0.3207 mm); the stroke check compares 6 x RMS with the rating", async () => {
    const src = await loadSpectrumSource(profileFile);
    const r = responseSpectra(src, { fnHz: Float64Array.of(100), q: 10, strokeMm: 2.5 });
    const closed = profileMotion(await loadProfile(profileFile));
    expect(Math.abs(r.motion.velocityRms / closed.velocityRms - 1)).toBeLessThan(1e-6);
    expect(Math.abs(r.motion.displacementRms / closed.displacementRms - 1)).toBeLessThan(1e-6);
    expect(r.motion.velocityRms * 1000).toBeCloseTo(69.45, 2);
    expect(r.stroke!.estimateMm).toBeCloseTo(6 * 0.3207, 3);
    expect(r.stroke!.withinRating).toBe(true);
    expect(r.stroke!.margin).toBeCloseTo(2.5 / (6 * 0.3207), 3);
    expect(responseSpectra(src, { fnHz: Float64Array.of(100), q: 10, strokeMm: 1.5 }).stroke!.withinRating).toBe(false);
  });
  it("--against the same input at 3 dB more: +3 dB in RMS and largest peak, damage x 2^(b/2) x T_B/T_A (docs/REFERENCES.md sec. 14 equivalence)", async () => {
    const hot = join(dir, "hot.yaml");
    writeFileSync(
      hot,
      "title: hot\nunits: g2/Hz\npoints: [{hz: 20, level: 0.08}, {hz: 2000, level: 0.08}]\ntolerance: {bands: [{fromHz: 20, toHz: 2000, upperDb: 3, lowerDb: 3}]}\ndurationS: 60\n",
    );
    const fnHz = parseFnGrid("50:500:1");
    const a = responseSpectra(await loadSpectrumSource(profileFile), { fnHz, q: 10, sn: { basquinB: 6 } });
    const b = responseSpectra(await loadSpectrumSource(hot), { fnHz, q: 10, sn: { basquinB: 6 } });
    const c = compareResponses(a, b);
    for (let i = 0; i < fnHz.length; i++) {
      expect(c.rmsRatioDb[i]!).toBeCloseTo(10 * Math.log10(2), 9);
      // 60 s at +3 dB: damage ratio 2^3 x 60/600 = 0.8, so B under-tests A in damage though not in level.
      expect(c.damageRatio[i]!).toBeCloseTo(0.8, 9);
    }
    expect(c.underTestsHz.rms).toEqual([]);
    expect(c.underTestsHz.damage.length).toBe(fnHz.length);
    // The largest peak grows with the shorter exposure's smaller factor: less than +3 dB.
    expect(c.extremeRatioDb[0]!).toBeLessThan(3.0103);
  });
  it("a PSD table (psd --csv) gives the recording's own response to 1e-9; it has no duration: without one the RMS and Miles come, the largest peak and damage do not", async () => {
    const a = await analyzeRecording("samples/tern7-flight.csv", { channels: ["ch2"], csv: { parseWorkers: 0 } });
    const table = join(dir, "tern.csv");
    writeFileSync(table, psdCsv(a));
    const fromTable = await loadSpectrumSource(table, { channels: ["ch2"] });
    const fromRecording = await loadSpectrumSource("samples/tern7-flight.csv", {
      channels: ["ch2"],
      csv: { parseWorkers: 0 },
    });
    expect(fromTable.kind).toBe("psd");
    expect(fromRecording.kind).toBe("recording");
    const fnHz = parseFnGrid("20:1000:2");
    const r1 = responseSpectra(fromTable, { fnHz, q: 20, durationS: 20 });
    const r2 = responseSpectra(fromRecording, { fnHz, q: 20 });
    expect(r2.durationS).toBe(20);
    for (let i = 0; i < fnHz.length; i++) {
      expect(Math.abs(r1.accelRms[i]! / r2.accelRms[i]! - 1)).toBeLessThan(1e-9);
      expect(Math.abs(r1.fatigueDamage[i]! / r2.fatigueDamage[i]! - 1)).toBeLessThan(1e-9);
    }
    const r3 = responseSpectra(fromTable, { fnHz, q: 20 });
    expect(r3.durationS).toBeUndefined();
    expect(Array.from(r3.accelRms)).toEqual(Array.from(r1.accelRms));
    expect(Array.from(r3.milesRms)).toEqual(Array.from(r1.milesRms));
    expect(r3.extremePeak.every(Number.isNaN) && r3.fatigueDamage.every(Number.isNaN)).toBe(true);
    expect(r3.needsDuration).toEqual(["the largest peak (Davenport)", "the fatigue damage"]);
    expect(await inputError(() => loadSpectrumSource(table, { channels: ["ch9"] }))).toMatch(
      /^CHANNEL_NOT_FOUND .*expected a channel name or position: 1=ch2, received "ch9"/,
    );
  });
});

describe("loadSpectrumSource on a profile with --fmin/--fmax", () => {
  it("cuts the profile's band: 0.04 g^2/Hz on 100-1000 Hz gives sqrt(0.04 x 900) = 6 g, and a band outside the profile is refused", async () => {
    const src = await loadSpectrumSource(profileFile, { fminHz: 100, fmaxHz: 1000 });
    const r = responseSpectra(src, { fnHz: Float64Array.of(300), q: 10 });
    expect(r.motion.accelerationRms).toBeCloseTo(6, 9);
    expect(r.band).toEqual({ fromHz: 100, toHz: 1000 });
    expect(await inputError(() => loadSpectrumSource(profileFile, { fminHz: 3000 }))).toMatch(
      /^OPTION_INVALID .*option fminHz: expected a band that overlaps the profile's 20–2000 Hz/,
    );
  });
});

describe("respond with a mixed-mode profile (tones)", () => {
  it("each tone's response is its peak x |T(f)| (the closed form, computed here), and the total RMS adds (peak |T|)^2 / 2 to the random part", async () => {
    const { loadSpectrumSource: load, responseSpectra: respond } = await import(
      "../../src/analyses/responseSpectra.js"
    );
    const src = await load("samples/profiles/hx4-avionics.yaml");
    expect(src.tones?.map((t) => t.hz)).toEqual([21.2, 42.4, 84.8]);
    const fn = Float64Array.from([20, 1000]);
    const r = respond(src, { fnHz: fn, q: 10 });
    // |T|^2 = (1 + (r/Q)^2) / ((1 - r^2)^2 + (r/Q)^2), r = f / fn (base-driven SDOF steady state, common practice).
    const T = (f: number, n: number) => {
      const x = f / n;
      const c = (x / 10) ** 2;
      return Math.sqrt((1 + c) / ((1 - x * x) ** 2 + c));
    };
    expect(r.tones![0]!.accelPeak[0]).toBeCloseTo(1.2 * T(21.2, 20), 12);
    expect(r.tones![0]!.accelPeak[0]).toBeCloseTo(7.411, 3);
    // Far above the tone the structure follows its base: the tone passes at its own peak.
    expect(Math.abs(r.tones![2]!.accelPeak[1]! / 0.5 - 1)).toBeLessThan(0.01);
    const total = Math.sqrt(r.accelRms[0]! ** 2 + r.tones!.reduce((a, t) => a + t.accelPeak[0]! ** 2 / 2, 0));
    expect(r.totalAccelRms![0]).toBeCloseTo(total, 12);
  });
});
