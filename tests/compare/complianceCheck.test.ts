import { describe, expect, it } from "vitest";
import { chanceAbove } from "../../src/compare/decisionRule.js";
import { spectralWindow } from "../../src/estimate/spectral/windows.js";
import { profileLevel } from "../../src/compare/testProfile.js";
import { judgeSpectrum, overallVerdict, type SpectrumUnderTest } from "../../src/compare/complianceCheck.js";
import { bandAt } from "../../src/compare/judgedGrid.js";
import { longerRecordFactor } from "../../src/compare/runLength.js";
import { parseProfile } from "../../src/compare/testProfile.js";
import { bandMeanSquare, bandRms, welchPsd } from "../../src/estimate/spectral/psdEstimate.js";
import { shapedRecord } from "../shapedRecords.js";
import { upperFactor } from "../../src/compare/decisionRule.js";
import { cli } from "../helpers.js";

const kb210 = "samples/profiles/kb210-controller.json";

describe("bandAt", () => {
  const bands = [
    { fromHz: 20, toHz: 1000, upperDb: 1.5, lowerDb: 1.5 },
    { fromHz: 1000, toHz: 2000, upperDb: 3, lowerDb: 3 },
  ];
  it("a line exactly at a shared edge (1000 Hz) takes the tighter band (common practice)", () => {
    expect(bandAt(bands, 1000)!.upperDb).toBe(1.5);
    expect(bandAt(bands, 1000.1)!.upperDb).toBe(3);
    expect(bandAt(bands, 2001)).toBeUndefined();
  });
  it("at a shared edge of asymmetric bands each side takes the tighter limit (common practice: read a shared edge strictly)", () => {
    // Before: the band with the smaller sum upper + lower, or the first on a tie: +1/-3 or +2/-1.5 at 1000 Hz.
    const a = { fromHz: 20, toHz: 1000, upperDb: 1, lowerDb: 3 };
    expect(bandAt([a, { fromHz: 1000, toHz: 2000, upperDb: 3, lowerDb: 1 }], 1000)).toMatchObject({
      upperDb: 1,
      lowerDb: 1,
    });
    expect(bandAt([a, { fromHz: 1000, toHz: 2000, upperDb: 2, lowerDb: 1.5 }], 1000)).toMatchObject({
      upperDb: 1,
      lowerDb: 1.5,
    });
    expect(bandAt([a, { fromHz: 1000, toHz: 2000, upperDb: 2, lowerDb: 1.5 }], 999)).toMatchObject(a);
  });
});

describe("longerRecordFactor", () => {
  it("is the DOF multiple at which a line truly at that ratio to the limit is shown with 90 % probability (not the 50 % where its mean meets the threshold)", () => {
    const level = 2.5e-5;
    const f = longerRecordFactor(1.2, 30, level)!;
    expect(f).toBeGreaterThan(1);
    expect(chanceAbove(30 * f, 1.2, upperFactor(30 * f, level))).toBeGreaterThanOrEqual(0.9);
    expect(chanceAbove(30 * f * 0.98, 1.2, upperFactor(30 * f * 0.98, level))).toBeLessThan(0.9);
    // The 50 % factor (mean at the threshold) is shorter.
    expect(longerRecordFactor(1.2, 30, level, 0.5)!).toBeLessThan(f);
    expect(longerRecordFactor(0.8, 30, level)).toBeGreaterThan(1);
    expect(longerRecordFactor(3, 100, level)).toBe(1);
  });
});

describe("overallVerdict", () => {
  it("fail over inconclusive over pass", () => {
    expect(overallVerdict(["pass", "inconclusive", "fail"])).toBe("fail");
    expect(overallVerdict(["pass", "inconclusive"])).toBe("inconclusive");
    expect(overallVerdict(["pass", "pass"])).toBe("pass");
  });
});

describe("psdgate check on the samples", () => {
  it("the KB-210 run passes (exit 0) on both channels", async () => {
    const r = await cli("check", "samples/kb210-run.wav", "--profile", kb210, "--json");
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.verdict).toBe("pass");
    expect(j.channels.map((c: { verdict: string }) => c.verdict)).toEqual(["pass", "pass"]);
    expect(j.settings.resolutionHz).toBe(2.5);
    expect(j.profile.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(j.input.sha256).toMatch(/^[0-9a-f]{64}$/);
  });
  it("the same run scaled by 2 (+6 dB) fails (exit 1) with shown excursions and the RMS out", async () => {
    const r = await cli("check", "samples/kb210-run.wav", "--profile", kb210, "--scale", "2", "--json");
    expect(r.code).toBe(1);
    const c = JSON.parse(r.stdout).channels[0];
    expect(c.rms.deviationDb).toBeCloseTo(6.02, 1);
    expect(c.rms.ok).toBe(false);
    expect(c.rms.shown).toBe(true);
    expect(c.findings.map((f: { code: string }) => f.code)).toEqual(
      expect.arrayContaining(["LINES_OUTSIDE", "RMS_OUTSIDE"]),
    );
    expect(c.excursions.every((e: { shown: boolean; direction: string }) => e.shown && e.direction === "above")).toBe(
      true,
    );
  });
  it("the run through a fixture resonance fails one band near 480 Hz", async () => {
    const r = await cli("check", "samples/kb210-run-resonance.wav", "--profile", kb210, "--json");
    expect(r.code).toBe(1);
    const ex = JSON.parse(r.stdout).channels[0].excursions;
    expect(ex.length).toBe(1);
    expect(ex[0].fromHz).toBeLessThan(480);
    expect(ex[0].toHz).toBeGreaterThan(480);
    expect(ex[0].shown).toBe(true);
  });
  it("the 4-second run is inconclusive (exit 3): DOF below the profile's 120", async () => {
    const r = await cli("check", "samples/kb210-run-short.wav", "--profile", kb210);
    expect(r.code).toBe(3);
    expect(r.stdout).toContain("VERDICT  INCONCLUSIVE");
    expect(r.stdout).toMatch(/degrees of freedom [\d.]+ below the required 120/);
    expect(r.stdout).toContain("CAUTION");
  });
  it("synth then check passes for every sample profile", async () => {
    for (const [p, rate] of [
      ["samples/profiles/kb210-controller.json", "5120"],
      ["samples/profiles/tern7-gimbal.yaml", "4096"],
    ] as const) {
      const out = `${(await import("node:os")).tmpdir()}/psdgate-synth-${Date.now()}-${rate}.wav`;
      expect(
        (await cli("synth", "--profile", p, "--duration", "45", "--rate", rate, "--seed", "99", "--out", out)).code,
      ).toBe(0);
      const r = await cli("check", out, "--profile", p);
      expect(r.stdout).toContain("VERDICT  PASS");
      expect(r.code).toBe(0);
    }
  });
  it("a recording with a NaN sample is never a pass: inconclusive with the reason", async () => {
    const dir = (await import("../helpers.js")).tempDir();
    const lines = ["time,ax"];
    const x = (await import("../helpers.js")).gaussian(40000, 3);
    for (let i = 0; i < x.length; i++) lines.push(`${i / 1000},${i === 5000 ? "NaN" : x[i]}`);
    const f = `${dir}/nan.csv`;
    (await import("node:fs")).writeFileSync(f, lines.join("\n"));
    const prof = `${dir}/flat.json`;
    (await import("node:fs")).writeFileSync(
      prof,
      JSON.stringify({
        title: "flat",
        units: "g2/Hz",
        points: [
          { hz: 10, level: 0.002 },
          { hz: 400, level: 0.002 },
        ],
        tolerance: { bands: [{ fromHz: 10, toHz: 400, upperDb: 6, lowerDb: 6 }] },
      }),
    );
    const r = await cli("check", f, "--profile", prof, "--segment", "512");
    expect(r.code).toBe(3);
    expect(r.stdout).toMatch(/NaN or infinite/);
  });
});

describe("judgeSpectrum known answers (records made by the test: tests/shapedRecords.ts)", () => {
  const flat = (lo: number, hi: number, extra: Record<string, unknown> = {}) =>
    parseProfile(
      JSON.stringify({
        title: "flat",
        units: "g2/Hz",
        points: [
          { hz: lo, level: 0.01 },
          { hz: hi, level: 0.01 },
        ],
        tolerance: { bands: [{ fromHz: lo, toHz: hi, upperDb: 1.5, lowerDb: 1.5 }], rmsDb: 1 },
        ...extra,
      }),
      "flat.json",
    );
  const spectrum = (x: Float64Array, fs: number, n: number, durationS = Infinity): SpectrumUnderTest => {
    const p = welchPsd(x, fs, { segmentLength: n });
    return {
      name: "t",
      frequencyHz: p.frequencyHz,
      psd: p.psd,
      dof: p.dof,
      lineSpacingHz: p.lineSpacingHz,
      sampleRateHz: fs,
      durationS,
      window: "hann",
      segmentLength: n,
      detrend: "mean",
      confidence: 0.9,
    };
  };
  const codes = (c: { findings: { code: string }[] }) => c.findings.map((f) => f.code);

  it("a drive that stops at the profile's first breakpoint: the raw first line reads about -3 dB (leakage), the judged lines start past the kernel, and the run passes", () => {
    const p = flat(20, 1000);
    const x = shapedRecord((f) => (f >= 20 && f <= 1000 ? 0.01 : 0), 2560, 1 << 18, 5);
    const sp = spectrum(x, 2560, 1024);
    const line20 = Math.round(20 / sp.lineSpacingHz);
    expect(10 * Math.log10(sp.psd[line20]! / 0.01)).toBeLessThan(-2);
    const c = judgeSpectrum(sp, p);
    expect(c.unjudged.edge).toBe(4);
    expect(c.lines[0]!.frequencyHz).toBeCloseTo(25, 9);
    expect(c.verdict).toBe("pass");
  });
  it("a profile that ends at fs/2 is judged on the Nyquist line (twice its stored value, half the DOF), and a conforming run passes", () => {
    const p = flat(20, 1280);
    const x = shapedRecord((f) => (f >= 10 ? 0.01 : 0), 2560, 1 << 18, 6);
    const sp = spectrum(x, 2560, 1024);
    const c = judgeSpectrum(sp, p);
    const last = c.lines[c.lines.length - 1]!;
    expect(last.frequencyHz).toBe(1280);
    expect(Math.abs(last.deviationDb)).toBeLessThan(1.2);
    expect(10 * Math.log10(sp.psd[512]! / 0.01)).toBeLessThan(-1.5); // stored un-doubled: about -3 dB
    expect(c.verdict).toBe("pass");
  });
  it("a record whose Nyquist frequency is below the profile's top is never a pass: inconclusive, RMS compared over what it covers", () => {
    const p = flat(20, 2000);
    const x = shapedRecord((f) => (f >= 20 ? 0.01 : 0), 2560, 1 << 18, 7);
    const c = judgeSpectrum(spectrum(x, 2560, 1024), p);
    expect(c.verdict).toBe("inconclusive");
    expect(codes(c)).toContain("RANGE_ABOVE_RECORD");
    expect(c.rms.required).toBeCloseTo(Math.sqrt(0.01 * (1280 - 20)), 9);
    expect(Math.abs(c.rms.deviationDb)).toBeLessThan(0.2);
  });
  it("an analysis coarser than the profile's resolution is never a pass", () => {
    const p = flat(20, 1000, { resolutionHz: 2.5 });
    const x = shapedRecord((f) => (f >= 20 && f <= 1000 ? 0.01 : 0), 2560, 1 << 17, 8);
    const c = judgeSpectrum(spectrum(x, 2560, 256), p);
    expect(c.verdict).toBe("inconclusive");
    expect(codes(c)).toContain("RESOLUTION_COARSE");
  });
  it("a record shorter than the profile's duration is never a pass", () => {
    const p = flat(20, 1000, { durationS: 60 });
    const x = shapedRecord((f) => (f >= 20 && f <= 1000 ? 0.01 : 0), 2560, 1 << 17, 9);
    const c = judgeSpectrum(spectrum(x, 2560, 1024, 51.2), p);
    expect(c.verdict).toBe("inconclusive");
    expect(codes(c)).toContain("DURATION_SHORT");
  });
  it("below minDof a shown excursion still fails (the data decide), and so does an RMS shown out", () => {
    const p = flat(20, 1000, { minDof: 1000 });
    const hot = shapedRecord((f) => (f >= 20 && f <= 1000 ? (f > 300 && f < 500 ? 0.05 : 0.01) : 0), 2560, 1 << 16, 10);
    const c1 = judgeSpectrum(spectrum(hot, 2560, 1024), p);
    expect(c1.dof.achieved).toBeLessThan(1000);
    expect(c1.verdict).toBe("fail");
    expect(codes(c1)).toContain("LINES_OUTSIDE");
    const loud = shapedRecord((f) => (f >= 20 && f <= 1000 ? 0.01 * 10 ** 0.2 : 0), 2560, 1 << 16, 11);
    const c2 = judgeSpectrum(spectrum(loud, 2560, 1024), p);
    expect(c2.verdict).toBe("fail");
    expect(codes(c2)).toContain("RMS_OUTSIDE");
  });
  it("an allowance lets a share of the lines lie outside; an outer limit no line may cross", () => {
    const bump = (db: number) =>
      shapedRecord(
        (f) => (f >= 20 && f <= 1000 ? 0.01 * (f > 400 && f < 430 ? 10 ** (db / 10) : 1) : 0),
        2560,
        1 << 18,
        12,
      );
    const allowed = flat(20, 1000, {
      tolerance: {
        bands: [{ fromHz: 20, toHz: 1000, upperDb: 1.5, lowerDb: 1.5 }],
        rmsDb: 1,
        allowedOutsidePercent: 5,
      },
    });
    const strict = flat(20, 1000);
    const sp = spectrum(bump(4), 2560, 1024);
    expect(judgeSpectrum(sp, strict).verdict).toBe("fail");
    const c = judgeSpectrum(sp, allowed);
    expect(c.rule.allowanceLines).toBe(Math.floor(0.05 * c.lines.length));
    expect(c.verdict).toBe("pass");
    const outer = flat(20, 1000, {
      tolerance: {
        bands: [{ fromHz: 20, toHz: 1000, upperDb: 1.5, lowerDb: 1.5 }],
        rmsDb: 1,
        allowedOutsidePercent: 5,
        outerLimits: [{ fromHz: 20, toHz: 1000, upperDb: 6, lowerDb: 6 }],
      },
    });
    const c3 = judgeSpectrum(spectrum(bump(10), 2560, 1024), outer);
    expect(c3.verdict).toBe("fail");
    expect(codes(c3)).toContain("OUTER_LIMIT");
  });
  it("a profile's own power requirement decides the DOF a pass needs; every verdict states the power against the default too; none asks nothing", () => {
    const x = shapedRecord((f) => (f >= 20 && f <= 1000 ? 0.01 : 0), 2560, 1 << 16, 13);
    const sp = spectrum(x, 2560, 1024);
    const dflt = judgeSpectrum(sp, flat(20, 1000));
    const lax = judgeSpectrum(sp, flat(20, 1000, { power: { departureDb: 3, probabilityPercent: 90 } }));
    const none = judgeSpectrum(sp, flat(20, 1000, { power: "none" }));
    expect(dflt.rule.requirement!.source).toBe("default");
    expect(lax.rule.requirement).toMatchObject({ source: "profile", departureDb: 3, probability: 0.9, widthLines: 3 });
    expect(lax.dof.forPower).toBeLessThan(dflt.dof.forPower);
    expect(lax.rule.powerDefault.least).toBeCloseTo(dflt.rule.power.least, 12);
    expect(lax.rule.dofForDefaultPower).toBe(dflt.dof.forPower);
    expect(none.rule.requirement).toBeNull();
    expect(none.dof.forPower).toBe(0);
    expect(none.findings.some((f) => f.code === "DOF_BELOW_POWER")).toBe(false);
    expect(() => flat(20, 1000, { power: { departureDb: 3, share: 5 } })).toThrow(/power/);
  });
  it("the bottom of a 40 dB notch: what the line should show matches the exact expected Welch value (direct DTFT of the window, 1/64 bin, +-48 bins) within 0.01 dB; the 1 %-tail kernel alone was 0.3 dB off", () => {
    const p = parseProfile(
      JSON.stringify({
        title: "notch",
        units: "g2/Hz",
        points: [
          { hz: 20, level: 0.01 },
          { hz: 460, level: 0.01 },
          { hz: 500, level: 0.000001 },
          { hz: 540, level: 0.01 },
          { hz: 1000, level: 0.01 },
        ],
        tolerance: { bands: [{ fromHz: 20, toHz: 1000, upperDb: 1.5, lowerDb: 1.5 }], rmsDb: 1 },
      }),
      "notch.json",
    );
    const fs = 2560;
    const n = 256;
    const df = fs / n;
    const x = shapedRecord((f) => (f >= 20 && f <= 1000 ? profileLevel(p, f) : 0), fs, 1 << 16, 14);
    const c = judgeSpectrum(spectrum(x, fs, n), p);
    const bottom = c.lines.find((l) => Math.abs(l.frequencyHz - 500) < 1e-9)!;
    // Exact E[P(f_k)] = integral of G(f_k - delta df) |W(delta)|^2 / (N sum w^2) d delta (Percival & Walden 1993, sec. 6.3), by the rectangle rule.
    const w = spectralWindow("hann", n);
    let sw2 = 0;
    for (const v of w) sw2 += v * v;
    const h = (delta: number) => {
      let re = 0;
      let im = 0;
      for (let t = 0; t < n; t++) {
        re += w[t]! * Math.cos((2 * Math.PI * delta * t) / n);
        im -= w[t]! * Math.sin((2 * Math.PI * delta * t) / n);
      }
      return (re * re + im * im) / (n * sw2);
    };
    let exact = 0;
    let core = 0;
    let coreW = 0;
    const step = 1 / 64;
    for (let delta = -48; delta <= 48; delta += step) {
      const f = 500 - delta * df;
      const g = f >= 20 && f <= 1000 ? profileLevel(p, f) : 0;
      const k = h(delta) * step;
      exact += g * k;
      if (Math.abs(delta) <= 2) {
        core += g * k;
        coreW += k;
      }
    }
    expect(Math.abs(10 * Math.log10(bottom.required / exact))).toBeLessThan(0.01);
    // The core kernel (+-2 bins, 1 % tails each side, renormalised) reads the bottom well above the exact value.
    expect(10 * Math.log10(core / coreW / exact)).toBeLessThan(-0.2);
  }, 60_000);
  it("band RMS counts the part of each end line inside the band: 100-110 Hz of a flat 0.01 g2/Hz is sqrt(0.1), a one-line band its width", () => {
    const n = 2049;
    const est = {
      psd: new Float64Array(n).fill(0.01),
      frequencyHz: new Float64Array(n).map((_, k) => k * 1.25),
      lineSpacingHz: 1.25,
    };
    expect(bandRms(est, 100, 110)).toBeCloseTo(Math.sqrt(0.1), 12); // common practice: integrate the band's width, not whole end lines
    expect(bandRms(est, 100, 101.25)).toBeCloseTo(Math.sqrt(0.0125), 12);
    expect(bandMeanSquare(est, 0, 2560)).toBeCloseTo(0.01 * 2049 * 1.25, 9); // the whole band is sum(P) df (docs/REFERENCES.md sec. 11)
  });
});
