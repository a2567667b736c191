import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { loadProfile } from "../src/checkRecording.js";
import { profileMotion } from "../src/compare/testProfile.js";
import { InputError } from "../src/errors.js";
import { narrowBandDamage } from "../src/estimate/fatigueDamage.js";
import { compareResponses, loadSpectrumSource, parseFnGrid, responseSpectra } from "../src/responseSpectra.js";
import { psdCsv } from "../src/report/psdJson.js";
import { analyzeRecording } from "../src/analyzeRecording.js";
import { tempDir } from "./helpers.js";

const dir = tempDir();
const profileFile = join(dir, "flat.yaml");
// 0.04 g^2/Hz on 20-2000 Hz (the band-limited case of ../shared/REFERENCES.md sec. 4 and 6), 600 s.
writeFileSync(profileFile, "title: flat\nunits: g2/Hz\npoints: [{hz: 20, level: 0.04}, {hz: 2000, level: 0.04}]\ntolerance: {bands: [{fromHz: 20, toHz: 2000, upperDb: 3, lowerDb: 3}]}\ndurationS: 600\n");

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
    expect(Array.from(parseFnGrid("100:400:2"), (x) => Number(x.toFixed(6)))).toEqual([100, 141.421356, 200, 282.842712, 400]);
    expect(parseFnGrid("20:2000").length).toBe(Math.floor(6 * Math.log2(100)) + 2);
    expect(Array.from(parseFnGrid("300, 100"))).toEqual([100, 300]);
    expect(await inputError(() => parseFnGrid("100:50"))).toMatch(/^OPTION_INVALID option fn: expected A:B or A:B:N/);
  });
});

describe("responseSpectra on a profile", () => {
  it("f_n 100 Hz, Q 10 on 0.04 g^2/Hz 20-2000 Hz: 7.914 g (REFERENCES.md sec. 4, 0.5 %), Miles 7.927 g, relative displacement near 0.1969 mm, duration from the profile", async () => {
    const src = await loadSpectrumSource(profileFile);
    expect(src.kind).toBe("profile");
    const r = responseSpectra(src, { fnHz: Float64Array.of(100), q: 10 });
    expect(Math.abs(r.accelRms[0]! / 7.914 - 1)).toBeLessThan(0.005);
    expect(r.milesRms[0]!).toBeCloseTo(7.927, 3);
    // The white-noise closed form is exact over 0..inf; the 20-2000 Hz band loses a little (REFERENCES.md sec. 4).
    expect(Math.abs(r.relDispRms[0]! * 1000 / 0.1969 - 1)).toBeLessThan(0.01);
    expect(r.relDispMilesRms[0]! * 1000).toBeCloseTo(0.1969, 4);
    expect(r.durationS).toBe(600);
    expect(Math.abs(r.upcrossingRateHz[0]! / 100 - 1)).toBeLessThan(0.1);
    expect(r.extremePeak[0]!).toBeCloseTo(r.accelRms[0]! * r.peakFactor[0]!, 12);
    expect(r.fatigueDamage[0]!).toBeCloseTo(narrowBandDamage(r.relDispRms[0]!, r.stressCycleRateHz[0]!, 600, r.sn), 30);
    expect(r.sn.basquinB).toBe(8);
  });
  it("kinematics equal the profile's closed form (profileMotion) to 1e-6 and REFERENCES.md sec. 6 (69.45 mm/s, 0.3207 mm); the stroke check compares 6 x RMS with the rating", async () => {
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
  it("--against the same input at 3 dB more: +3 dB in RMS and largest peak, damage x 2^(b/2) x T_B/T_A (REFERENCES.md sec. 14 equivalence)", async () => {
    const hot = join(dir, "hot.yaml");
    writeFileSync(hot, "title: hot\nunits: g2/Hz\npoints: [{hz: 20, level: 0.08}, {hz: 2000, level: 0.08}]\ntolerance: {bands: [{fromHz: 20, toHz: 2000, upperDb: 3, lowerDb: 3}]}\ndurationS: 60\n");
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
  it("a PSD table (psd --csv) gives the recording's own response to 1e-9; it has no duration, so durationS is asked for", async () => {
    const a = await analyzeRecording("samples/tern7-flight.csv", { channels: ["ch2"], csv: { parseWorkers: 0 } });
    const table = join(dir, "tern.csv");
    writeFileSync(table, psdCsv(a));
    const fromTable = await loadSpectrumSource(table, { channel: "ch2" });
    const fromRecording = await loadSpectrumSource("samples/tern7-flight.csv", { channel: "ch2", csv: { parseWorkers: 0 } });
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
    expect(await inputError(() => responseSpectra(fromTable, { fnHz, q: 20 }))).toMatch(/^OPTION_MISSING .*option durationS: expected an exposure time in s/);
    expect(await inputError(() => loadSpectrumSource(table, { channel: "ch9" }))).toMatch(/^CHANNEL_NOT_FOUND .*expected a channel name or position: 1=ch2, received "ch9"/);
  });
});

describe("loadSpectrumSource on a profile with --fmin/--fmax", () => {
  it("cuts the profile's band: 0.04 g^2/Hz on 100-1000 Hz gives sqrt(0.04 x 900) = 6 g, and a band outside the profile is refused", async () => {
    const src = await loadSpectrumSource(profileFile, { fminHz: 100, fmaxHz: 1000 });
    const r = responseSpectra(src, { fnHz: Float64Array.of(300), q: 10 });
    expect(r.motion.accelerationRms).toBeCloseTo(6, 9);
    expect(r.band).toEqual({ fromHz: 100, toHz: 1000 });
    expect(await inputError(() => loadSpectrumSource(profileFile, { fminHz: 3000 }))).toMatch(/^OPTION_INVALID .*option fminHz: expected a band that overlaps the profile's 20–2000 Hz/);
  });
});

describe("respond with a mixed-mode profile (tones)", () => {
  it("each tone's response is its peak x |T(f)| (the closed form, computed here), and the total RMS adds (peak |T|)^2 / 2 to the random part", async () => {
    const { loadSpectrumSource: load, responseSpectra: respond } = await import("../src/responseSpectra.js");
    const src = await load("samples/profiles/hx4-avionics.yaml");
    expect(src.tones?.map((t) => t.hz)).toEqual([21.2, 42.4, 84.8]);
    const fn = Float64Array.from([20, 1000]);
    const r = respond(src, { fnHz: fn, q: 10 });
    // |T|^2 = (1 + (r/Q)^2) / ((1 - r^2)^2 + (r/Q)^2), r = f / fn (base-driven SDOF steady state, common practice).
    const T = (f: number, n: number) => { const x = f / n; const c = (x / 10) ** 2; return Math.sqrt((1 + c) / ((1 - x * x) ** 2 + c)); };
    expect(r.tones![0]!.accelPeak[0]).toBeCloseTo(1.2 * T(21.2, 20), 12);
    expect(r.tones![0]!.accelPeak[0]).toBeCloseTo(7.411, 3);
    // Far above the tone the structure follows its base: the tone passes at its own peak.
    expect(Math.abs(r.tones![2]!.accelPeak[1]! / 0.5 - 1)).toBeLessThan(0.01);
    const total = Math.sqrt(r.accelRms[0]! ** 2 + r.tones!.reduce((a, t) => a + t.accelPeak[0]! ** 2 / 2, 0));
    expect(r.totalAccelRms![0]).toBeCloseTo(total, 12);
  });
});
