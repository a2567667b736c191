import { describe, expect, it } from "vitest";
import { bandAt, longerRecordFactor, overallVerdict } from "../../src/compare/complianceCheck.js";
import { chiSquareIntervalFactors } from "../../src/estimate/chiSquare.js";
import { cli } from "../helpers.js";

const kb210 = "samples/profiles/kb210-controller.json";

describe("bandAt", () => {
  const bands = [{ fromHz: 20, toHz: 1000, upperDb: 1.5, lowerDb: 1.5 }, { fromHz: 1000, toHz: 2000, upperDb: 3, lowerDb: 3 }];
  it("a line exactly at a shared edge (1000 Hz) takes the tighter band (common practice)", () => {
    expect(bandAt(bands, 1000)!.upperDb).toBe(1.5);
    expect(bandAt(bands, 1000.1)!.upperDb).toBe(3);
    expect(bandAt(bands, 2001)).toBeUndefined();
  });
});

describe("longerRecordFactor", () => {
  it("is the DOF multiple at which the interval first excludes the limit", () => {
    const f = longerRecordFactor(1.2, 30, 0.9)!;
    expect(f).toBeGreaterThan(1);
    expect(1.2 * chiSquareIntervalFactors(30 * f, 0.9).lower).toBeGreaterThan(1);
    expect(1.2 * chiSquareIntervalFactors(30 * f * 0.99, 0.9).lower).toBeLessThan(1);
    expect(longerRecordFactor(0.8, 30, 0.9)).toBeGreaterThan(1);
    expect(longerRecordFactor(3, 100, 0.9)).toBe(1);
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
  it("the same run scaled by 2 (+6 dB) fails (exit 1) with clear excursions and the RMS out", async () => {
    const r = await cli("check", "samples/kb210-run.wav", "--profile", kb210, "--scale", "2", "--json");
    expect(r.code).toBe(1);
    const c = JSON.parse(r.stdout).channels[0];
    expect(c.rms.deviationDb).toBeCloseTo(6.02, 1);
    expect(c.rms.ok).toBe(false);
    expect(c.excursions.every((e: { clear: boolean; direction: string }) => e.clear && e.direction === "above")).toBe(true);
  });
  it("the run through a fixture resonance fails one band near 480 Hz", async () => {
    const r = await cli("check", "samples/kb210-run-resonance.wav", "--profile", kb210, "--json");
    expect(r.code).toBe(1);
    const ex = JSON.parse(r.stdout).channels[0].excursions;
    expect(ex.length).toBe(1);
    expect(ex[0].fromHz).toBeLessThan(480);
    expect(ex[0].toHz).toBeGreaterThan(480);
    expect(ex[0].clearAmongAllLines).toBe(true);
  });
  it("the 4-second run is inconclusive (exit 3): DOF below the profile's 120", async () => {
    const r = await cli("check", "samples/kb210-run-short.wav", "--profile", kb210);
    expect(r.code).toBe(3);
    expect(r.stdout).toContain("VERDICT  INCONCLUSIVE");
    expect(r.stdout).toMatch(/degrees of freedom [\d.]+ below the required 120/);
    expect(r.stdout).toContain("CAUTION");
  });
  it("synth then check passes for every sample profile", async () => {
    for (const [p, rate] of [["samples/profiles/kb210-controller.json", "5120"], ["samples/profiles/tern7-gimbal.yaml", "4096"]] as const) {
      const out = `${(await import("node:os")).tmpdir()}/psdgate-synth-${Date.now()}-${rate}.wav`;
      expect((await cli("synth", "--profile", p, "--duration", "30", "--rate", rate, "--seed", "99", "--out", out)).code).toBe(0);
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
    (await import("node:fs")).writeFileSync(prof, JSON.stringify({ title: "flat", units: "g2/Hz", points: [{ hz: 10, level: 0.002 }, { hz: 400, level: 0.002 }], tolerance: { bands: [{ fromHz: 10, toHz: 400, upperDb: 6, lowerDb: 6 }] } }));
    const r = await cli("check", f, "--profile", prof, "--segment", "512");
    expect(r.code).toBe(3);
    expect(r.stdout).toMatch(/NaN or infinite/);
  });
});
