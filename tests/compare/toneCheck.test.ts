import { describe, expect, it } from "vitest";
import { judgeSpectrum } from "../../src/compare/complianceCheck.js";
import { profileLevel } from "../../src/compare/testProfile.js";
import { welchPsd } from "../../src/estimate/spectral/psdEstimate.js";
import { shapedRecord } from "../shapedRecords.js";
import { addTones, FS, judgeMixed, mixedProfile, N, TONES } from "./toneRecords.js";
import { findingText } from "../../src/report/findingTexts.js";

const LENGTH = 1 << 18; // 51.2 s: 255 segments, about 480 DOF
const nominal = (f: number) => (f >= 20 && f <= 2000 ? profileLevel(mixedProfile, f) : 0);
const at = (db: number, only?: number) =>
  TONES.map((t, i) => ({
    hz: t.hz,
    peak: t.peak * 10 ** ((only === undefined || only === i ? db : 0) / 20),
    phase: 0.3 + i,
  }));

describe("judgeMixedMode (mixed-mode check on records the test makes)", () => {
  it("random at the profile with its tones at their peaks passes, tones and all, with the RMS taken as the total", () => {
    const c = judgeMixed(addTones(shapedRecord(nominal, FS, LENGTH, 501), at(0)));
    expect(c.verdict).toBe("pass");
    expect(c.tones!.map((t) => t.verdict)).toEqual(["pass", "pass", "pass"]);
    for (const [i, t] of c.tones!.entries()) expect(Math.abs(t.measuredPeak / TONES[i]!.peak - 1)).toBeLessThan(0.03);
    expect(c.rms.required).toBeCloseTo(mixedProfile.totalRms, 9);
    expect(Math.abs(c.rms.deviationDb)).toBeLessThan(0.2);
    expect(c.unjudged.excluded).toBeGreaterThan(0);
  });

  it("the same record judged as random only FAILs on the tone lines: the tones' lines must be left out", () => {
    const x = addTones(shapedRecord(nominal, FS, LENGTH, 501), at(0));
    const p = welchPsd(x, FS, { segmentLength: N });
    const plain = judgeSpectrum(
      {
        name: "x",
        frequencyHz: p.frequencyHz,
        psd: p.psd,
        dof: p.dof,
        lineSpacingHz: p.lineSpacingHz,
        sampleRateHz: FS,
        durationS: LENGTH / FS,
        window: "hann",
        segmentLength: N,
        detrend: "mean",
        confidence: 0.9,
      },
      mixedProfile,
    );
    expect(plain.verdict).toBe("fail");
  });

  it("a tone 2 dB low FAILs and names the tone (its tolerance is ±1 dB)", () => {
    const c = judgeMixed(addTones(shapedRecord(nominal, FS, LENGTH, 502), at(-2, 1)));
    expect(c.verdict).toBe("fail");
    const f = c.findings.filter((x) => x.code.startsWith("TONE_") && x.code !== "TONES_PASS");
    expect(f.map((x) => x.code)).toEqual(["TONE_OUTSIDE"]);
    expect(findingText(f[0]!)).toMatch(/^gear mesh \(101\.25 Hz\): peak 3\.9\d* is -(1\.9\d|2\.0\d) dB/);
    expect(c.tones![1]!.verdict).toBe("fail");
    expect(c.tones![1]!.status).toBe("low");
    expect(c.tones!.filter((t) => t.verdict === "pass").length).toBe(2);
  });

  it("the random without its tones FAILs, naming every tone as missing", () => {
    const c = judgeMixed(shapedRecord(nominal, FS, LENGTH, 503));
    expect(c.verdict).toBe("fail");
    expect(c.findings.filter((x) => x.code === "TONE_MISSING").map((x) => findingText(x).split(" (")[0])).toEqual([
      "shaft",
      "gear mesh",
      "vane pass",
    ]);
  });

  it("a tone 1 Hz off its frequency (0.5 Hz allowed) FAILs as off frequency", () => {
    const tones = at(0);
    tones[1]!.hz = 102.25;
    const c = judgeMixed(addTones(shapedRecord(nominal, FS, LENGTH, 504), tones));
    expect(c.verdict).toBe("fail");
    expect(c.tones![1]!.status).toBe("off-frequency");
    expect(c.tones![1]!.measuredHz).toBeCloseTo(102.25, 2);
    expect(c.findings.map((x) => x.code)).toContain("TONE_OFF_FREQUENCY");
  });

  it("a short record cannot resolve a tone near its limit: inconclusive, not pass", () => {
    const c = judgeMixed(addTones(shapedRecord(nominal, FS, 1 << 14, 505), at(-0.9, 0)));
    expect(c.tones![0]!.verdict === "inconclusive" || c.verdict === "inconclusive").toBe(true);
    expect(c.verdict).not.toBe("pass");
  });
});
