import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { findingTexts } from "../../src/report/findingTexts.js";
import { deriveProfile, mixInputs, octaveGrid, plainInputs } from "../../src/analyses/deriveProfile.js";
import { parseServiceMix } from "../../src/read/mixFile.js";
import { python, tempDir } from "../helpers.js";
import { FIELD_LENGTH, FIELD_RATE_HZ, flat, writeFieldRecord } from "../fieldRecords.js";
import { shapedRecord } from "../shapedRecords.js";
import { wavBytes } from "../wavBytes.js";

/** A peaky field PSD: a mount resonance at 30 Hz (Q 5) on a sloping road input, 3-800 Hz (invented). */
const peaky = (g: number) => (f: number) => {
  if (f < 3 || f > 800) return 0;
  const r = f / 30;
  const c = (r / 5) ** 2;
  return g * (f / 10) ** -0.7 * ((1 + c) / ((1 - r * r) ** 2 + c));
};

/**
 * Narrow-band damage of the derived profile at each f_n, computed independently in numpy: a dense log grid of
 * the profile (log-log interpolation), |Z/A|^2 = 1 / ((2 pi fn)^4 ((1 - r^2)^2 + (r/Q)^2)) (docs/REFERENCES.md sec. 4),
 * trapezoid moments m0, m2, nu0+ = sqrt(m2/m0) (Rice), E[D] = nu T (sqrt 2 sigma)^b Gamma(1 + b/2) (Miles 1954; docs/REFERENCES.md sec. 14).
 */
function numpyProfileDamage(
  points: { hz: number; level: number }[],
  fnHz: number[],
  q: number,
  b: number,
  durationS: number,
  toSi: number,
): number[] {
  return JSON.parse(
    python(`
import json, numpy as np
from scipy.special import gammaln
pts = ${JSON.stringify(points)}
hz = np.array([p["hz"] for p in pts]); lv = np.array([p["level"] for p in pts])
f = np.exp(np.linspace(np.log(hz[0]), np.log(hz[-1]), 100001))
g = np.exp(np.interp(np.log(f), np.log(hz), np.log(lv)))
out = []
for fn in ${JSON.stringify(fnHz)}:
    r = f / fn
    h = 1.0 / ((2 * np.pi * fn) ** 4 * ((1 - r * r) ** 2 + (r / ${q}) ** 2))
    m0 = np.trapezoid(h * g, f); m2 = np.trapezoid(h * g * f * f, f)
    sigma = np.sqrt(m0) * ${toSi}
    out.append(float(np.sqrt(m2 / m0) * ${durationS} * np.exp(${b} * np.log(np.sqrt(2) * sigma) + gammaln(1 + ${b} / 2))))
print(json.dumps(out))`),
  ) as number[];
}

describe("deriveProfile (records made here: seeded Gaussian, shaped by one FFT, not psdgate synth)", () => {
  it("flat field PSD: every breakpoint's level equals the closed-form compression G0 (T_field / T_test)^(2/b) within the records' spread", async () => {
    const dir = tempDir();
    const g0 = 0.01;
    const files = [1, 2, 3].map((s) => writeFieldRecord(dir, `flat${s}.wav`, flat(g0), 300 + s));
    const lifeS = 100 * 3600;
    const r = await deriveProfile({
      ...plainInputs(files, lifeS),
      testDurationS: 3600,
      fminHz: 10,
      fmaxHz: 500,
      version: "test",
      created: new Date(0),
    });
    // Equal narrow-band damage: T_1 G_1^(b/2) = T_2 G_2^(b/2) (docs/REFERENCES.md sec. 14; MIL-STD-810H 514.8 Annex A, from memory).
    const closed = g0 * (lifeS / 3600) ** (2 / 8);
    expect(r.compression.flatFactor).toBeCloseTo(100 ** 0.25, 12);
    // Spread: the response mean square of an SDOF from records of total length T has relative sd 1 / sqrt(B_s T), B_s = pi f_n / Q
    // its statistical bandwidth (Bendat & Piersol 2010, ch. 8, from memory; measured in tests/analyses/deriveProfile.montecarlo.test.ts); widest at the lowest f_n.
    const totalS = (3 * FIELD_LENGTH) / FIELD_RATE_HZ;
    const eps = 1 / Math.sqrt(((Math.PI * 10) / 10) * totalS);
    const levels = r.document.points.map((p) => p.level! / closed);
    for (const v of levels) {
      expect(v).toBeGreaterThan(1 - 3 * eps);
      expect(v).toBeLessThan(1 + 4 * eps);
    }
    const meanRatio = levels.reduce((s, v) => s + v, 0) / levels.length;
    expect(Math.abs(meanRatio - 1)).toBeLessThan(2 * eps);
    expect(r.fit.minRatio).toBeGreaterThanOrEqual(1);
    console.log(
      `flat: closed form ${closed.toPrecision(5)} g2/Hz; breakpoint levels / closed form ${levels.map((v) => v.toFixed(4)).join(" ")} (mean ${meanRatio.toFixed(4)}, eps ${eps.toFixed(4)}); fit ${JSON.stringify(r.fit)}`,
    );
  });

  it("the derived profile's FDS covers the field's at every grid point, checked by numpy; fewer breakpoints still cover, and a margin is met", async () => {
    const dir = tempDir();
    const files = [1, 2, 3].map((s) => writeFieldRecord(dir, `peaky${s}.wav`, peaky(0.002 * s), 400 + s));
    const base = {
      ...plainInputs(files, 500 * 3600),
      testDurationS: 7200,
      fminHz: 5,
      fmaxHz: 400,
      version: "test",
      created: new Date(0),
    };
    const seen: string[] = [];
    for (const [n, margin] of [
      [8, 1],
      [3, 1],
      [5, 2],
    ] as const) {
      const r = await deriveProfile({ ...base, maxBreakpoints: n, margin });
      expect(r.document.points.length).toBeLessThanOrEqual(n);
      const ratio = [...r.testFatigue].map((d, i) => d / r.fieldFatigue[i]!);
      for (const v of ratio) expect(v).toBeGreaterThanOrEqual(margin);
      const np = numpyProfileDamage(
        r.document.points as { hz: number; level: number }[],
        [...r.fnHz],
        10,
        8,
        7200,
        9.80665,
      );
      np.forEach((d, i) => {
        expect(Math.abs(d / r.testFatigue[i]! - 1), `numpy vs psdgate at ${r.fnHz[i]} Hz`).toBeLessThan(2e-3);
        expect(d / r.fieldFatigue[i]!).toBeGreaterThanOrEqual(margin * (1 - 2e-3));
      });
      seen.push(
        `N ${n} margin ${margin}: ${r.document.points.length} points, test/field min ${r.fit.minRatio.toFixed(4)} median ${r.fit.medianRatio.toFixed(3)} max ${r.fit.maxRatio.toFixed(3)}, numpy/psdgate worst ${Math.max(...np.map((d, i) => Math.abs(d / r.testFatigue[i]! - 1))).toExponential(2)}`,
      );
    }
    console.log(seen.join("\n"));
  });

  it("the mix file's hours weight the groups exactly: doubling one group's hours doubles its damage and nothing else", async () => {
    const dir = tempDir();
    writeFieldRecord(dir, "smooth.wav", peaky(0.001), 501, 1 << 15);
    writeFieldRecord(dir, "rough.wav", peaky(0.004), 502, 1 << 15);
    const mix = (roughHours: number) =>
      parseServiceMix(
        {
          groups: [
            { name: "smooth", hours: 300, recordings: ["smooth.wav"] },
            { name: "rough", hours: roughHours, recordings: ["rough.wav"] },
          ],
        },
        join(dir, "mix.yaml"),
        "0".repeat(64),
      );
    const common = { testDurationS: 3600, fminHz: 10, fmaxHz: 400, version: "test", created: new Date(0) };
    const a = await deriveProfile({ ...mixInputs(mix(50)), ...common });
    const b = await deriveProfile({ ...mixInputs(mix(100)), ...common });
    expect(a.lifeS).toBe(350 * 3600);
    expect(b.lifeS).toBe(400 * 3600);
    for (let i = 0; i < a.fnHz.length; i++) {
      expect(b.recordings[1]!.damage[i]! / a.recordings[1]!.damage[i]!).toBeCloseTo(2, 12);
      expect(b.recordings[0]!.damage[i]).toBe(a.recordings[0]!.damage[i]);
      expect(b.fieldFatigue[i]! - a.fieldFatigue[i]!).toBeCloseTo(a.recordings[1]!.damage[i]!, 20);
      expect(Math.abs((b.fieldFatigue[i]! - a.fieldFatigue[i]!) / a.recordings[1]!.damage[i]! - 1)).toBeLessThan(1e-9);
    }
    // Two recordings in one group share its hours by their durations (the stated rule): 2^15 and 2^14 samples give 2/3 and 1/3.
    writeFieldRecord(dir, "rough-b.wav", peaky(0.004), 503, 1 << 14);
    const shared = parseServiceMix(
      { groups: [{ name: "rough", hours: 90, recordings: ["rough.wav", "rough-b.wav"] }] },
      join(dir, "mix.yaml"),
      "0".repeat(64),
    );
    const c = await deriveProfile({ ...mixInputs(shared), ...common });
    expect(c.recordings[0]!.serviceS).toBeCloseTo(60 * 3600, 6);
    expect(c.recordings[1]!.serviceS).toBeCloseTo(30 * 3600, 6);
    expect(c.tolerance).toHaveProperty("missing");
  });

  it("octaveGrid(5, 500, 6) holds both ends and 6 per octave", () => {
    const g = octaveGrid(5, 500, 6);
    expect(g[0]).toBe(5);
    expect(g[g.length - 1]).toBe(500);
    expect(g[6]).toBeCloseTo(10, 12);
  });
});

describe("deriveProfile with a tone in the field (mixed mode)", () => {
  it("lists a field tone as a candidate and keeps it out of the envelope and the damage: the derived profile equals the tone-free one within 2 %", async () => {
    const { shapedRecord } = await import("../shapedRecords.js");
    const { wavBytes } = await import("../wavBytes.js");
    const { writeFileSync } = await import("node:fs");
    const dir = tempDir();
    const g0 = 0.01;
    const files = [1, 2].map((s) => {
      const x = shapedRecord(flat(g0), FIELD_RATE_HZ, FIELD_LENGTH, 700 + s);
      const noTone = join(dir, `plain${s}.wav`);
      writeFileSync(
        noTone,
        wavBytes({ tag: 3, bits: 32, channels: 1, sampleRate: FIELD_RATE_HZ, samples: Array.from(x) }),
      );
      // An engine order: 1.5 g peak at 123.4 Hz, far above the 0.01 g2/Hz background.
      for (let i = 0; i < x.length; i++) x[i] = x[i]! + 1.5 * Math.cos((2 * Math.PI * 123.4 * i) / FIELD_RATE_HZ);
      const withTone = join(dir, `tone${s}.wav`);
      writeFileSync(
        withTone,
        wavBytes({ tag: 3, bits: 32, channels: 1, sampleRate: FIELD_RATE_HZ, samples: Array.from(x) }),
      );
      return { noTone, withTone };
    });
    const common = { testDurationS: 3600, fminHz: 10, fmaxHz: 500, version: "test", created: new Date(0) };
    const a = await deriveProfile({
      ...plainInputs(
        files.map((f) => f.withTone),
        100 * 3600,
      ),
      ...common,
    });
    const b = await deriveProfile({
      ...plainInputs(
        files.map((f) => f.noTone),
        100 * 3600,
      ),
      ...common,
    });
    expect(a.candidateTones.length).toBe(2);
    for (const t of a.candidateTones) {
      expect(Math.abs(t.frequencyHz - 123.4)).toBeLessThan(0.1);
      expect(Math.abs(t.peak / 1.5 - 1)).toBeLessThan(0.05);
    }
    expect(b.candidateTones.length).toBe(0);
    expect(findingTexts(a.notes).join(" ")).toMatch(/2 candidate sine tone\(s\)/);
    const k = Math.round(123.4 / a.lineSpacingHz);
    expect(a.envelope[k]! / b.envelope[k]!).toBeLessThan(1.6);
    const la = a.profile.breakpoints.map((p) => p.level);
    const lb = b.profile.breakpoints.map((p) => p.level);
    expect(la.length).toBe(lb.length);
    la.forEach((v, i) => expect(Math.abs(v / lb[i]! - 1)).toBeLessThan(0.02));
  }, 120_000);
});

describe("derive: the field's shocks beside the random test's largest response (issue 26, item 4)", () => {
  it("the forklift record's shocks (the sample's five known events) are reported, and where the test's ERS falls below the field's SRS a shock test is called for", async () => {
    const r = await deriveProfile({
      ...plainInputs(["samples/brackley-ft2-warehouse.csv"], 2 * 3600),
      testDurationS: 3600,
      fminHz: 5,
      fmaxHz: 400,
      version: "test",
      created: new Date(0),
    });
    expect(r.shocks.eventsPerRecording).toEqual([5]);
    expect(r.shocks.largestEvents[0]!.recording).toBe(0);
    expect(r.shocks.largestEvents[0]!.peak).toBeLessThan(-2.7);
    expect(r.shocks.largestEvents[0]!.timeS).toBeCloseTo(19.503, 2);
    // Every f_n here is below fs/4 = 500 Hz, so the field's SRS is defined everywhere.
    expect(r.shocks.fieldSrs.every((v) => Number.isFinite(v) && v > 0)).toBe(true);
    const below = [...r.fnHz].filter((_, i) => r.testExtreme[i]! < r.shocks.fieldSrs[i]!);
    expect(r.shocks.shortfallHz).toEqual(below);
    expect(below.length).toBeGreaterThan(0);
    expect(findingTexts(r.notes).join("\n")).toMatch(/a shock test is needed/);
  });
});

describe("derive --field-damage time: the field's FDS and ERS from the recordings themselves (issue 26, item 0)", () => {
  it("on the forklift's shocks the field's damage in time is far above the PSD's; the record says how it was made; the PSD's values are kept beside", async () => {
    const args = {
      ...plainInputs(["samples/brackley-ft2-warehouse.csv"], 2 * 3600),
      testDurationS: 3600,
      fminHz: 5,
      fmaxHz: 400,
      version: "test",
      created: new Date(0),
    };
    const psd = await deriveProfile(args);
    const time = await deriveProfile({ ...args, fieldDamage: "time" });
    const ratio = [...time.fieldFatigue].map((d, i) => d / psd.fieldFatigue[i]!);
    // Measured: 1.25 (at the 14 Hz mast mode, where the random part carries the damage) to 1.0e6; median 1.4e4.
    expect(Math.min(...ratio)).toBeGreaterThan(1);
    expect(ratio.sort((a, b) => a - b)[ratio.length >> 1]!).toBeGreaterThan(100);
    expect(time.recordings[0]!.fromPsd!.damage).toEqual(psd.recordings[0]!.damage);
    expect(time.recordings[0]!.fromPsd!.kurtosis).toBeGreaterThan(10);
    expect(time.document.provenance!.method).toMatch(/rainflow \(ASTM E1049-85\)/);
    expect(time.document.provenance!.parameters.fieldDamage).toBe("time");
    expect(findingTexts(time.notes).join("\n")).toMatch(/come from the recordings themselves/);
    // Damage is linear in service time in time as well: doubling the life doubles the field's damage.
    const twice = await deriveProfile({
      ...args,
      ...plainInputs(["samples/brackley-ft2-warehouse.csv"], 4 * 3600),
      fieldDamage: "time",
    });
    for (let i = 0; i < time.fnHz.length; i++)
      expect(twice.fieldFatigue[i]! / time.fieldFatigue[i]!).toBeCloseTo(2, 10);
  });
  it("a field recording whose baseline drifts (a sensor tilting through gravity) carries shock's BASELINE_DRIFT into derive's notes, named by file", async () => {
    const dir = tempDir();
    const level = flat(1e-4);
    const clean = writeFieldRecord(dir, "clean.wav", level, 501);
    // The same kind of record with the sensor tilting from -1 g to +0.8 g over its 64 s (added here).
    const x = shapedRecord(level, FIELD_RATE_HZ, FIELD_LENGTH, 502);
    for (let i = 0; i < x.length; i++) x[i] = x[i]! - 1 + (1.8 * i) / x.length;
    const tilted = join(dir, "tilted.wav");
    writeFileSync(
      tilted,
      wavBytes({ tag: 3, bits: 32, channels: 1, sampleRate: FIELD_RATE_HZ, samples: Array.from(x) }),
    );
    const r = await deriveProfile({
      ...plainInputs([clean, tilted], 100 * 3600),
      testDurationS: 3600,
      fminHz: 10,
      fmaxHz: 500,
      version: "test",
      created: new Date(0),
    });
    const drift = r.notes.filter((n) => n.code === "BASELINE_DRIFT");
    expect(drift.map((n) => n.about?.file)).toEqual([tilted]);
    expect(findingTexts(drift)[0]).toMatch(/drift|baseline/i);
  });
});

describe("derive: the pass's data doubts on each field recording are its notes, named by file", () => {
  it("a stretch of zeros (a dropout), a stuck stretch (one held value) and a NaN run are said per recording; a clean recording has none", async () => {
    const dir = tempDir();
    const level = flat(1e-4);
    const clean = writeFieldRecord(dir, "clean.wav", level, 601);
    const write = (name: string, seed: number, edit: (x: Float64Array) => void) => {
      const x = shapedRecord(level, FIELD_RATE_HZ, FIELD_LENGTH, seed);
      edit(x);
      const f = join(dir, name);
      writeFileSync(f, wavBytes({ tag: 3, bits: 32, channels: 1, sampleRate: FIELD_RATE_HZ, samples: Array.from(x) }));
      return f;
    };
    // 10-20 s of exact zeros (a logger that dropped out).
    const dropped = write("dropped.wav", 602, (x) => x.fill(0, 10 * FIELD_RATE_HZ, 20 * FIELD_RATE_HZ));
    // 30-40 s held at 0.25 g (a frozen reading), and 200 NaN samples at 50 s.
    const stuck = write("stuck.wav", 603, (x) => {
      x.fill(0.25, 30 * FIELD_RATE_HZ, 40 * FIELD_RATE_HZ);
      x.fill(Number.NaN, 50 * FIELD_RATE_HZ, 50 * FIELD_RATE_HZ + 200);
    });
    const r = await deriveProfile({
      ...plainInputs([clean, dropped, stuck], 100 * 3600),
      testDurationS: 3600,
      fminHz: 10,
      fmaxHz: 500,
      version: "test",
      created: new Date(0),
    });
    const of = (file: string) => r.notes.filter((n) => n.about?.file === file).map((n) => n.code);
    expect(of(clean)).not.toContain("DEAD_STRETCH");
    expect(of(clean)).not.toContain("NON_FINITE");
    const dead = r.notes.filter((n) => n.code === "DEAD_STRETCH");
    expect(dead.map((n) => n.about?.file)).toEqual([dropped, stuck]);
    // The stretches (the pass's stationarity stretches) that lie wholly inside the dead part.
    expect(dead[0]!.values.fromS).toBeGreaterThanOrEqual(10);
    expect(dead[0]!.values.toS).toBeLessThanOrEqual(20);
    expect(dead[0]!.values.toS! - dead[0]!.values.fromS!).toBeGreaterThan(5);
    expect(dead[1]!.values.fromS).toBeGreaterThanOrEqual(30);
    expect(dead[1]!.values.toS).toBeLessThanOrEqual(40);
    expect(findingTexts(dead)[0]).toMatch(/^.*dropped\.wav: .*no signal at all.*field PSD/);
    const nan = r.notes.filter((n) => n.code === "NON_FINITE");
    expect(nan.map((n) => n.about?.file)).toEqual([stuck]);
    expect(nan[0]!.values.samples).toBe(200);
  });
  it("a dead channel (every sample one value) is refused as no vibration, naming the file", async () => {
    const dir = tempDir();
    const clean = writeFieldRecord(dir, "clean.wav", flat(1e-4), 611);
    const deadFile = join(dir, "dead.wav");
    writeFileSync(
      deadFile,
      wavBytes({
        tag: 3,
        bits: 32,
        channels: 1,
        sampleRate: FIELD_RATE_HZ,
        samples: new Array(FIELD_LENGTH).fill(0.5),
      }),
    );
    await expect(
      deriveProfile({
        ...plainInputs([clean, deadFile], 100 * 3600),
        testDurationS: 3600,
        fminHz: 10,
        fmaxHz: 500,
        version: "test",
        created: new Date(0),
      }),
    ).rejects.toThrow(/dead\.wav/);
  });
});

describe("derive: damage below the smallest double names its cause (audit 2)", () => {
  it("a quiet record, b = 30, natural frequencies to 10 kHz: the damage underflows; the error names the Basquin exponent and the band, not the life", async () => {
    const dir = tempDir();
    const rate = 25600;
    // 1e-12 g^2/Hz flat to 12 kHz (4 mg r.m.s.): at 10 kHz, Q 10 the relative displacement is about 1e-12 m, and
    // (sqrt 2 z)^30 ~ 1e-351 is below the smallest double (Number.MIN_VALUE 5e-324; IEEE 754, common practice).
    const x = shapedRecord((f) => (f >= 2 && f <= 12000 ? 1e-12 : 0), rate, 1 << 18, 7);
    const file = join(dir, "quiet.wav");
    writeFileSync(file, wavBytes({ tag: 3, bits: 32, channels: 1, sampleRate: rate, samples: Array.from(x) }));
    for (const fieldDamage of ["psd", "time"] as const) {
      const run = deriveProfile({
        ...plainInputs([file], 100 * 3600),
        testDurationS: 3600,
        fminHz: 100,
        fmaxHz: 10000,
        basquinB: 30,
        fieldDamage,
        version: "test",
        created: new Date(0),
      });
      await expect(run).rejects.toMatchObject({ code: "OPTION_INVALID", details: { option: "basquinB" } });
      await expect(run).rejects.toThrow(/underflow/);
    }
  });
});
