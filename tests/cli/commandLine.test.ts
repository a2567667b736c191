import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { cli, tempDir } from "../helpers.js";

describe("one command line across the commands", () => {
  it("bare psdgate names every command, exit 2", async () => {
    const r = await cli();
    expect(r.code).toBe(2);
    for (const c of [
      "inspect",
      "psd",
      "profile",
      "check",
      "synth",
      "ride",
      "transfer",
      "respond",
      "derive",
      "queue",
      "verify",
    ])
      expect(r.stderr).toContain(c);
    expect(r.stderr).toMatch(
      /expected a command: inspect, psd, profile, check, synth, ride, transfer, respond, .*derive, .*queue or verify/,
    );
  });

  it("an unknown option is named before a missing required one, with 'did you mean' and the command's own help", async () => {
    const r = await cli("ride", "samples/marlow-uv3-ride.wav", "--axis", "x=1");
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
    expect(r.stderr).toMatch(
      /unknown option '--axis' \(Did you mean --axes\?\) \[USAGE\] \(hint: run psdgate ride --help\)/,
    );
    const t = await cli("transfer", "samples/quarry-bend-bracket.csv", "--in", "base", "--out", "tip");
    expect(t.code).toBe(2);
    expect(t.stderr).toMatch(/--output-channel CH.*unknown option '--out'/);
  });

  it("transfer without --output-channel takes every channel but --in as an output", async () => {
    const r = await cli("transfer", "samples/quarry-bend-bracket.csv", "--in", "base", "--json");
    expect(r.code, r.stderr).toBe(0);
    expect(JSON.parse(r.stdout).outputs.map((o: { name: string }) => o.name)).toEqual(["tip", "clamp"]);
  });

  it("--life 5 days is read as a duration (120 h), never as a file named days; 5 weeks is refused", async () => {
    const d = tempDir();
    const r = await cli(
      "derive",
      "samples/corran-k7-motorway.wav",
      "--life",
      "5",
      "days",
      "--test-duration",
      "1",
      "h",
      "--out",
      join(d, "p.yaml"),
      "--json",
    );
    expect(r.code, r.stderr).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.lifeS).toBe(5 * 86400);
    expect(j.testDurationS).toBe(3600);
    const w = await cli(
      "derive",
      "samples/corran-k7-motorway.wav",
      "--life",
      "5",
      "weeks",
      "--test-duration",
      "1h",
      "--out",
      join(d, "q.yaml"),
    );
    expect(w.code).toBe(2);
    expect(w.stderr).toMatch(/option --life: .*received "5 weeks" \[OPTION_INVALID\]/);
  });

  it("respond prints no path of psdgate's own test files; inspect and synth take --json and -q", async () => {
    const r = await cli("respond", "samples/profiles/quarry-bend-bracket.yaml", "--fn", "20:1000:3", "--q", "10");
    expect(r.code).toBe(0);
    expect(r.stdout).not.toMatch(/tests\//);
    const d0 = tempDir();
    const c = await cli(
      "respond",
      "samples/profiles/quarry-bend-bracket.yaml",
      "--fn",
      "20:1000:3",
      "--q",
      "10",
      "--csv",
      join(d0, "r.csv"),
      "-q",
    );
    expect(c.code, c.stderr).toBe(0);
    const rows = readFileSync(join(d0, "r.csv"), "utf8").trim().split("\n");
    expect(rows[0]).toMatch(/^fn_hz,accel_rms \[g\],miles_rms \[g\]/);
    expect(rows).toHaveLength(1 + 18);
    const i = await cli("inspect", "samples/kb210-run.wav", "--json", "-q");
    expect(i.code).toBe(0);
    expect(JSON.parse(i.stdout).channels).toHaveLength(2);
    const d = tempDir();
    const s = await cli(
      "synth",
      "-p",
      "samples/profiles/kb210-controller.json",
      "-d",
      "1",
      "--rate",
      "4096",
      "-o",
      join(d, "s.csv"),
      "--json",
      "-q",
    );
    expect(s.code, s.stderr).toBe(0);
    const j = JSON.parse(s.stdout);
    expect(j.profile.displacementPeakToPeakM).toBeGreaterThan(0);
    expect(j.caution).toMatch(/stroke/);
    expect(readFileSync(join(d, "s.csv"), "utf8").split("\n").length).toBeGreaterThan(4096);
  });
  it("profile and verify take -q/--quiet (no progress output), and print the same without it", async () => {
    const plain = await cli("profile", "samples/profiles/kb210-controller.json", "--json");
    const quiet = await cli("profile", "samples/profiles/kb210-controller.json", "--json", "-q");
    expect(quiet.code, quiet.stderr).toBe(0);
    expect(quiet.stderr).toBe("");
    expect(quiet.stdout).toBe(plain.stdout);
    expect((await cli("profile", "samples/profiles/kb210-controller.json", "--quiet")).code).toBe(0);
    const d = tempDir();
    const rep = join(d, "psd.html");
    expect((await cli("psd", "samples/kb210-run.wav", "--report", rep, "-q")).code).toBe(0);
    const v = await cli("verify", rep, "-q");
    expect(v.code, v.stdout + v.stderr).toBe(0);
    expect(v.stderr).toBe("");
    expect(v.stdout).toMatch(/REPRODUCED/);
    const vj = await cli("verify", rep, "--json", "--quiet");
    expect(JSON.parse(vj.stdout).status).toBe("reproduced");
    const notReport = await cli("verify", "samples/profiles/kb210-controller.json", "-q");
    expect(notReport.code).toBe(2);
    expect(notReport.stderr.trim().split("\n")).toHaveLength(1);
  });
});
