import { describe, expect, it } from "vitest";
import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { cli, tempDir } from "../helpers.js";

describe("psdgate respond", () => {
  it("--json carries the documented keys: fnHz, q, accelRms, milesRms, relDispRms (m), extremePeak, durationS, fatigueDamage, basquinB", async () => {
    const r = await cli(
      "respond",
      "samples/profiles/quarry-bend-bracket.yaml",
      "--fn",
      "20:1000:3",
      "--q",
      "10",
      "--basquin",
      "6",
      "--json",
    );
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    const n = j.fnHz.length;
    expect(n).toBe(Math.floor(3 * Math.log2(50)) + 2);
    for (const k of ["accelRms", "milesRms", "relDispRms", "extremePeak", "fatigueDamage"]) {
      expect(j[k].length).toBe(n);
      for (const v of j[k]) expect(v).toBeGreaterThan(0);
    }
    expect(j.q).toBe(10);
    expect(j.basquinB).toBe(6);
    expect(j.durationS).toBe(600);
    expect(j.units.relDisp).toBe("m");
    expect(j.kinematics.displacementPeakToPeak.units).toBe("m");
    expect(j.caution).toMatch(/qualified engineer/);
    // At 200-ish Hz, mid-plateau (0.005 g^2/Hz): exact / Miles near sqrt(1 + 1/Q^2) = 1.005.
    const i = j.fnHz.findIndex((f: number) => f > 150 && f < 300);
    expect(Math.abs(j.accelRms[i] / j.milesRms[i] - 1.005)).toBeLessThan(0.01);
  });
  it("a recording with --against the lab profile and --stroke-mm prints the comparison, the stroke check and both cautions", async () => {
    const r = await cli(
      "respond",
      "samples/quarry-bend-bracket.csv",
      "--channel",
      "base",
      "--fmin",
      "20",
      "--fmax",
      "1000",
      "--fn",
      "20:1000:1",
      "--q",
      "10",
      "--duration",
      "3600",
      "--against",
      "samples/profiles/quarry-bend-bracket.yaml",
      "--stroke-mm",
      "25",
    );
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/against +samples\/profiles\/quarry-bend-bracket\.yaml .*exposure 600 s against 3600 s/);
    expect(r.stdout).toMatch(/B under-tests A in RMS at /);
    expect(r.stdout).toMatch(/stroke +[\d.]+ mm estimated against 25 mm rated: within the rating/);
    expect(r.stdout).toMatch(/CAUTION: The stroke figure is an estimate/);
    expect(r.stdout).toMatch(/CAUTION: Single-degree-of-freedom estimates/);
  });
  it("a recording: fatigueDamage and extremePeak from the record itself, the PSD's beside them, the ratio and the kurtosis in the text; a profile keeps the PSD figures", async () => {
    const j = JSON.parse(
      (
        await cli(
          "respond",
          "samples/brackley-ft2-warehouse.csv",
          "--channel",
          "z",
          "--fn",
          "10,40,160",
          "--q",
          "10",
          "--json",
        )
      ).stdout,
    );
    for (const k of ["fatigueDamage", "extremePeak", "fatigueDamageFromPsd", "extremePeakFromPsd"])
      expect(j[k]).toHaveLength(3);
    expect(j.timeDomain.kurtosis).toBeGreaterThan(10);
    expect(j.timeDomain.recordS).toBeCloseTo(30, 6);
    // The forklift's shocks: the record's damage and largest response above the Gaussian PSD's at every fn.
    for (let i = 0; i < 3; i++) {
      expect(j.fatigueDamage[i] / j.fatigueDamageFromPsd[i]).toBeGreaterThan(1);
      expect(j.extremePeak[i] / j.extremePeakFromPsd[i]).toBeGreaterThan(1);
      // Exposure = the record: the largest peak is the record's own.
      expect(j.extremePeak[i]).toBeCloseTo(j.timeDomain.recordPeak[i], 12);
    }
    const t = await cli(
      "respond",
      "samples/brackley-ft2-warehouse.csv",
      "--channel",
      "z",
      "--fn",
      "10,40,160",
      "--q",
      "10",
      "--duration",
      "3600",
    );
    expect(t.stdout).toMatch(/peak rec\/PSD +damage rec\/PSD/);
    expect(t.stdout).toMatch(/kurtosis \d+\.\d\d; 3 for a Gaussian record/);
    const p = JSON.parse(
      (await cli("respond", "samples/profiles/quarry-bend-bracket.yaml", "--fn", "100", "--q", "10", "--json")).stdout,
    );
    expect(p.fatigueDamageFromPsd).toBeUndefined();
  });
  it("bad input: one line, a code, exit 2, nothing on stdout", async () => {
    for (const [args, code] of [
      [["samples/profiles/quarry-bend-bracket.yaml", "--fn", "100:50", "--q", "10"], "OPTION_INVALID"],
      [["samples/profiles/quarry-bend-bracket.yaml", "--fn", "100", "--q", "0.3"], "OPTION_INVALID"],
      [["samples/kb210-run.wav", "--fn", "100", "--q", "10", "--as", "table"], "OPTION_INVALID"],
      [["samples/no-such.yaml", "--fn", "100", "--q", "10"], "FILE_UNREADABLE"],
      [["samples/quarry-bend-bracket.csv", "--channel", "seat", "--fn", "100", "--q", "10"], "CHANNEL_NOT_FOUND"],
    ] as const) {
      const r = await cli("respond", ...args);
      expect(r.code, args.join(" ")).toBe(2);
      expect(r.stdout).toBe("");
      expect(r.stderr.trim().split("\n").length).toBe(1);
      expect(r.stderr).toContain(`[${code}]`);
    }
  });
  it("a profile without durationS and no --duration: exit 0 with the response RMS and Miles; the largest peak and damage are null and the text says they need --duration", async () => {
    const file = join(tempDir(), "no-duration.yaml");
    writeFileSync(
      file,
      "title: flat\nunits: g2/Hz\npoints: [{hz: 20, level: 0.04}, {hz: 2000, level: 0.04}]\ntolerance: {bands: [{fromHz: 20, toHz: 2000, upperDb: 3, lowerDb: 3}]}\n",
    );
    const r = await cli("respond", file, "--fn", "100", "--q", "10", "--json");
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.durationS).toBeNull();
    expect(j.accelRms[0]).toBeGreaterThan(7.8); // 7.914 g (docs/REFERENCES.md sec. 4)
    expect(j.milesRms[0]).toBeCloseTo(7.927, 3);
    expect(j.extremePeak).toEqual([null]);
    expect(j.fatigueDamage).toEqual([null]);
    expect(j.needsDuration).toEqual(["the largest peak (Davenport)", "the fatigue damage"]);
    const t = await cli("respond", file, "--fn", "100", "--q", "10");
    expect(t.code).toBe(0);
    expect(t.stdout).toContain("need one (--duration)");
  });
  it("a dead channel (all zero) is NO_VIBRATION naming the file, not an --duration error about a NaN peak", async () => {
    const file = join(tempDir(), "dead.csv");
    let text = "time,a,b\n";
    for (let i = 0; i < 4096; i++) text += `${(i / 1024).toFixed(6)},${Math.sin(i * 0.7).toFixed(4)},0\n`;
    writeFileSync(file, text);
    const r = await cli("respond", file, "-c", "b", "--fn", "10,100", "--q", "10");
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
    expect(r.stderr).toMatch(/dead\.csv.*no vibration|dead\.csv.*PSD of zero.*\[NO_VIBRATION\]/);
  });
});
