import { readFileSync, statSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { cli, tempDir } from "../helpers.js";
import { flat, writeFieldRecord } from "../fieldRecords.js";

const K7 = ["samples/corran-k7-motorway.wav", "samples/corran-k7-cobbles.wav", "samples/corran-k7-quarry.wav"];

describe("psdgate derive", () => {
  it("--json carries fnHz, fieldFatigue, testFatigue, fieldExtreme, testExtreme, basquinB, q, testDurationS, lifeS and the written profile", async () => {
    const dir = tempDir();
    const out = join(dir, "k7.yaml");
    const r = await cli(
      "derive",
      "--mix",
      "samples/corran-k7-mix.yaml",
      "--test-duration",
      "2h",
      "--fmin",
      "5",
      "--fmax",
      "500",
      "--out",
      out,
      "--json",
    );
    expect(r.stderr).toBe("");
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    const n = j.fnHz.length;
    expect(n).toBe(41);
    for (const k of ["fieldFatigue", "testFatigue", "fieldExtreme", "testExtreme"]) expect(j[k].length).toBe(n);
    j.fnHz.forEach((_: number, i: number) => expect(j.testFatigue[i]).toBeGreaterThanOrEqual(j.fieldFatigue[i]));
    expect(j.basquinB).toBe(8);
    expect(j.q).toBe(10);
    expect(j.testDurationS).toBe(7200);
    expect(j.lifeS).toBe(2000 * 3600);
    expect(j.profile.points.length).toBeLessThanOrEqual(8);
    expect(j.profile.points[0]).toEqual({ hz: 5, level: expect.any(Number) });
    expect(j.profile.durationS).toBe(7200);
    expect(j.profile.provenance.inputs.map((i: { role: string }) => i.role)).toEqual([
      "recording",
      "recording",
      "recording",
      "mix",
    ]);
    expect(j.field.tolerance.k).toBeCloseTo(1.9384, 4);
    expect(j.caution).toMatch(/qualified engineer/);
    // The profile written is the one printed, and `profile` reads it unchanged and shows where it came from.
    const p = await cli("profile", out, "--json");
    expect(p.code).toBe(0);
    const pj = JSON.parse(p.stdout);
    expect(pj.points.map((x: { hz: number; level: number }) => [x.hz, x.level])).toEqual(
      j.profile.points.map((x: { hz: number; level: number }) => [x.hz, x.level]),
    );
    expect(pj.provenance.parameters.basquinB).toBe(8);
    const pt = await cli("profile", out);
    expect(pt.stdout).toMatch(
      /origin +derived from 3 recording\(s\): corran-k7-motorway\.wav \(motorway\) [0-9a-f]{12}/,
    );
    expect(pt.stdout).toMatch(/parameters lifeS 7200000, lifeHours 2000/);
  });

  it("derive → synth → check: a lab run synthesised from the derived profile passes, and the check names the profile's origin", async () => {
    const dir = tempDir();
    const files = [1, 2, 3].map((s) => writeFieldRecord(dir, `road${s}.wav`, flat(0.004 * s), 600 + s, 1 << 16));
    const profile = join(dir, "lab.json");
    const d = await cli(
      "derive",
      ...files,
      "--life",
      "20h",
      "--test-duration",
      "120",
      "--fmin",
      "10",
      "--fmax",
      "400",
      "--resolution",
      "2",
      "--out",
      profile,
    );
    expect(d.stderr).toBe("");
    expect(d.code).toBe(0);
    expect(d.stdout).toMatch(/coverage +test FDS \/ field FDS ≥ 1\.0\d+ everywhere/);
    const run = join(dir, "lab-run.wav");
    const s = await cli(
      "synth",
      "--profile",
      profile,
      "--duration",
      "130",
      "--rate",
      "2048",
      "--seed",
      "17",
      "--out",
      run,
    );
    expect(s.code, s.stderr).toBe(0);
    const c = await cli("check", run, "--profile", profile);
    expect(c.stdout).toMatch(/VERDICT +PASS/);
    expect(c.code).toBe(0);
    expect(c.stdout).toMatch(/profile derived from 3 recording\(s\): road1\.wav \(field\) [0-9a-f]{12}/);
    const cj = JSON.parse((await cli("check", run, "--profile", profile, "--json")).stdout);
    expect(cj.profile.origin).toMatch(/^derived from 3 recording/);
    expect(cj.profile.provenance.inputs[0].sha256).toMatch(/^[0-9a-f]{64}$/);
    const html = join(dir, "check.html");
    await cli("check", run, "--profile", profile, "--report", html);
    expect(readFileSync(html, "utf8")).toContain("profile derived from 3 recording(s)");
  });

  it("--report writes a self-contained record with the field PSDs, limits, profile, FDS, ERS and the cautions", async () => {
    const dir = tempDir();
    const out = join(dir, "k7.json");
    const rep = join(dir, "k7.html");
    const r = await cli(
      "derive",
      ...K7,
      "--life",
      "2000h",
      "--test-duration",
      "90min",
      "--fmin",
      "5",
      "--fmax",
      "500",
      "--out",
      out,
      "--report",
      rep,
      "--breakpoints",
      "6",
    );
    expect(r.code, r.stderr).toBe(0);
    const h = readFileSync(rep, "utf8");
    for (const id of [
      "field-0",
      "envelope",
      "mean",
      "tolerance-limit",
      "profile",
      "field-fds",
      "test-fds",
      "field-ers",
      "test-ers",
      "extreme-ratio",
    ])
      expect(h).toContain(`data-series="${id}"`);
    expect(h).toMatch(
      /linear, lightly damped single-degree-of-freedom model with Gaussian, stationary response and on Miner's rule/,
    );
    expect(h).toMatch(/governing test standard's tailoring process and a qualified engineer decide/);
    expect(h).not.toMatch(/<script/i);
    expect(h).toContain(JSON.parse(readFileSync(out, "utf8")).provenance.inputs[0].sha256);
    // The K7 recordings hold no shocks: the shock section says the test reaches the field's SRS.
    expect(h).toContain("The test's expected largest response reaches the field's SRS at every natural frequency.");
    // verify re-runs the derivation from the recorded settings on the recordings it finds by SHA-256.
    const v = await cli("verify", rep);
    expect(v.stdout).toMatch(/rerun +\d+ numbers of the derivation reproduced/);
    expect(v.code).toBe(0);
  });

  it("--report shows the field's shocks: the events table, the field SRS against the test's ERS, and that a shock test is needed where the ERS falls short", async () => {
    const dir = tempDir();
    const rep = join(dir, "ft2.html");
    const r = await cli(
      "derive",
      "samples/brackley-ft2-warehouse.csv",
      "--life",
      "2h",
      "--test-duration",
      "1h",
      "--fmin",
      "5",
      "--fmax",
      "400",
      "--out",
      join(dir, "ft2.json"),
      "--report",
      rep,
      "--json",
    );
    expect(r.code, r.stderr).toBe(0);
    const j = JSON.parse(r.stdout);
    const h = readFileSync(rep, "utf8");
    const section = h.slice(h.indexOf("<h2>Field shocks</h2>"), h.indexOf("<h2>Notes</h2>"));
    expect(section.length).toBeGreaterThan(100);
    // The sample's five events (samples/README.md), largest first, as the JSON has them.
    expect(j.shocks.eventsPerRecording).toEqual([5]);
    expect(section).toContain("5 in the field recordings");
    const peaks = [
      ...section.matchAll(
        /<tr><td class="num">\d<\/td><td>[^<]*<\/td><td class="num">[^<]*<\/td><td class="num">([^<]*)<\/td>/g,
      ),
    ].map((m) => Number(m[1]));
    expect(peaks).toHaveLength(j.shocks.largestEvents.length);
    peaks.forEach((p, i) => expect(Math.abs(p / j.shocks.largestEvents[i].peak - 1)).toBeLessThan(5e-4));
    for (const id of ["field-srs", "test-ers-shock", "shock-shortfall"])
      expect(section).toContain(`data-series="${id}"`);
    expect(j.shocks.shortfallHz.length).toBeGreaterThan(0);
    expect(section).toMatch(/The test falls short<\/strong> at 35 of 39 natural frequencies \(5, 5\.612, 6\.3/);
    const v = await cli("verify", rep);
    expect(v.code, v.stdout).toBe(0);
  });

  it("the motorway recording's 22 Hz mount resonance (Q 6, random) stays in the field spectrum: no tone candidate, band RMS as psd gives it", async () => {
    const dir = tempDir();
    const r = await cli(
      "derive",
      "--mix",
      "samples/corran-k7-mix.yaml",
      "--test-duration",
      "1h",
      "--fmin",
      "5",
      "--fmax",
      "500",
      "--out",
      join(dir, "k7.yaml"),
      "--json",
    );
    expect(r.code, r.stderr).toBe(0);
    const j = JSON.parse(r.stdout);
    // Before 0.4.0 the resonance passed as a tone and its lines took the background: 0.4662 g of 0.6788 g.
    expect(j.candidateTones).toEqual([]);
    const motorway = j.recordings.find((x: { file: string }) => x.file.endsWith("corran-k7-motorway.wav"));
    const psd = JSON.parse(
      (
        await cli(
          "psd",
          "samples/corran-k7-motorway.wav",
          "--segment",
          "2048",
          "--fmin",
          "5",
          "--fmax",
          "500",
          "--json",
        )
      ).stdout,
    );
    expect(psd.channels[0].tones).toEqual([]);
    expect(Math.abs(motorway.bandRms / psd.channels[0].band.rms - 1)).toBeLessThan(0.01);
  }, 60_000);

  it("two recordings: no tolerance limit, said so", async () => {
    const dir = tempDir();
    const r = await cli(
      "derive",
      K7[0]!,
      K7[1]!,
      "--life",
      "100h",
      "--test-duration",
      "1h",
      "--fmin",
      "5",
      "--fmax",
      "500",
      "--out",
      join(dir, "p.yaml"),
      "--json",
    );
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.field.tolerance.limit).toBeNull();
    expect(j.field.tolerance.missing).toMatch(/at least 3 recordings; 2 given/);
    expect(j.lifeRule).toBe("recorded durations");
    expect(j.recordings[0].serviceS).toBeCloseTo(50 * 3600, 6);
  });

  it("bad input: one line with a code, exit 2, nothing on stdout, no output file, an existing --out untouched", async () => {
    const dir = tempDir();
    const exists = join(dir, "exists.yaml");
    writeFileSync(exists, "keep me\n");
    const before = statSync(exists).mtimeMs;
    const badMix = join(dir, "bad-mix.yaml");
    writeFileSync(badMix, "groups:\n  - name: a\n    hours: -5\n    recordings: [x.wav]\n");
    const typoMix = join(dir, "typo-mix.yaml");
    writeFileSync(typoMix, "groups:\n  - name: a\n    hour: 5\n    recordings: [x.wav]\n");
    const synMix = join(dir, "syntax-mix.yaml");
    writeFileSync(synMix, "groups: [\n");
    const odd = writeFieldRecord(dir, "odd-rate.wav", flat(0.01), 9, 1 << 14);
    // A record at another rate has other lines: write it at 3000 Hz by hand.
    const buf = readFileSync(odd);
    buf.writeUInt32LE(3000, 24);
    buf.writeUInt32LE(3000 * 4, 28);
    const oddRate = join(dir, "rate-3000.wav");
    writeFileSync(oddRate, buf);
    const out = join(dir, "p.yaml");
    const cases: [string[], string, RegExp][] = [
      [
        [K7[0]!, "--life", "3 weeks", "--test-duration", "1h", "--out", out],
        "OPTION_INVALID",
        /option --life: expected a duration above 0/,
      ],
      [[K7[0]!, "--life", "100h", "--test-duration", "-3", "--out", out], "OPTION_INVALID", /--test-duration/],
      [[K7[0]!, "--life", "100h", "--test-duration", "07:30", "--out", out], "OPTION_INVALID", /--test-duration/],
      [[K7[0]!, "--life", "0", "--test-duration", "1h", "--out", out], "OPTION_INVALID", /--life/],
      [[K7[0]!, "--test-duration", "1h", "--out", out], "OPTION_MISSING", /--life/],
      [
        ["samples/no-such-road.wav", "--life", "100h", "--test-duration", "1h", "--out", out],
        "FILE_UNREADABLE",
        /no-such-road\.wav/,
      ],
      [
        [K7[0]!, "--life", "100h", "--test-duration", "1h", "--out", exists],
        "OUTPUT_EXISTS",
        /exists\.yaml \(exists\)/,
      ],
      [
        [K7[0]!, "--life", "100h", "--test-duration", "1h", "--out", join(dir, "p.txt")],
        "OUTPUT_FORMAT",
        /\.yaml, \.yml or \.json/,
      ],
      [[K7[0]!, "--life", "100h", "--test-duration", "1h", "--out", K7[0]!], "OUTPUT_FORMAT", /--out/],
      [
        ["--mix", "samples/corran-k7-mix.yaml", "--life", "100h", "--test-duration", "1h", "--out", out],
        "OPTION_CONFLICT",
        /--life/,
      ],
      [
        ["--mix", badMix, "--test-duration", "1h", "--out", out],
        "MIX_INVALID",
        /groups\[0\]\.hours: expected service hours above 0, received -5/,
      ],
      [
        ["--mix", typoMix, "--test-duration", "1h", "--out", out],
        "MIX_INVALID",
        /groups\[0\]\.hour.*unknown key "hour"/,
      ],
      [["--mix", synMix, "--test-duration", "1h", "--out", out], "MIX_SYNTAX", /syntax-mix\.yaml/],
      [
        [K7[0]!, oddRate, "--life", "100h", "--test-duration", "1h", "--out", out],
        "RECORDINGS_UNLIKE",
        /rate-3000\.wav: expected the line spacing/,
      ],
      [[K7[0]!, "--life", "100h", "--test-duration", "1h", "--fmax", "5000", "--out", out], "OPTION_INVALID", /--fmax/],
      [
        [K7[0]!, "--life", "100h", "--test-duration", "1h", "--breakpoints", "1", "--out", out],
        "OPTION_INVALID",
        /--breakpoints/,
      ],
    ];
    for (const [args, code, place] of cases) {
      const r = await cli("derive", ...args);
      expect(r.code, args.join(" ")).toBe(2);
      expect(r.stdout).toBe("");
      expect(r.stderr.trim().split("\n").length, r.stderr).toBe(1);
      expect(r.stderr).toContain(`[${code}]`);
      expect(r.stderr).toMatch(place);
      expect(r.stderr).toMatch(/expected/);
    }
    expect(readFileSync(exists, "utf8")).toBe("keep me\n");
    expect(statSync(exists).mtimeMs).toBe(before);
    expect(() => statSync(out)).toThrow();
  });
});

describe("derive on no data: exit 2 with a code, never an internal error", () => {
  it("an all-zero or constant recording is NO_VIBRATION; a life of 1e-300 h is OPTION_INVALID", async () => {
    const d = tempDir();
    const rows = (v: (i: number) => string) =>
      `time,az [g]\n${Array.from({ length: 1024 * 20 }, (_, i) => `${(i / 1024).toFixed(6)},${v(i)}`).join("\n")}\n`;
    writeFileSync(
      join(d, "zero.csv"),
      rows(() => "0"),
    );
    writeFileSync(
      join(d, "const.csv"),
      rows(() => "0.5"),
    );
    for (const f of ["zero.csv", "const.csv"]) {
      const r = await cli(
        "derive",
        join(d, f),
        "--life",
        "10h",
        "--test-duration",
        "1h",
        "--out",
        join(d, `${f}.yaml`),
      );
      expect(r.code, r.stderr).toBe(2);
      expect(r.stderr).toMatch(/a PSD of zero at every line in the band .*\[NO_VIBRATION\]/);
    }
    writeFileSync(
      join(d, "tiny.yaml"),
      `groups:\n  - name: a\n    hours: 1e-300\n    recordings: [${join(process.cwd(), "samples/corran-k7-motorway.wav")}]\n`,
    );
    const t = await cli("derive", "--mix", join(d, "tiny.yaml"), "--test-duration", "1h", "--out", join(d, "t.yaml"));
    expect(t.code, t.stderr).toBe(2);
    expect(t.stderr).toMatch(/\[OPTION_INVALID\]/);
    const short = await cli(
      "derive",
      "samples/corran-k7-motorway.wav",
      "--life",
      "10h",
      "--test-duration",
      "1e-300",
      "--out",
      join(d, "s.yaml"),
    );
    expect(short.code, short.stderr).toBe(2);
    expect(short.stderr).toMatch(
      /option --test-duration: expected a test duration over which a finite level covers the field's damage.*\[OPTION_INVALID\]/,
    );
  }, 60_000);

  it("a recording listed twice in a mix (its windows overlapping) is MIX_INVALID; two windows of it that do not overlap are two field records", async () => {
    const dir = tempDir();
    const wav = join(process.cwd(), "samples/corran-k7-motorway.wav");
    const mix = (recs: string) => `title: one road\ngroups:\n  - name: lane\n    hours: 100\n    recordings:\n${recs}`;
    writeFileSync(join(dir, "twice.yaml"), mix(`      - ${wav}\n      - file: ${wav}\n        from: 5\n`));
    const twice = await cli(
      "derive",
      "--mix",
      join(dir, "twice.yaml"),
      "--test-duration",
      "1h",
      "--out",
      join(dir, "a.yaml"),
    );
    expect(twice.code).toBe(2);
    expect(twice.stderr).toMatch(/twice\.yaml: expected each field recording once.*the same samples.*\[MIX_INVALID\]/);
    writeFileSync(
      join(dir, "halves.yaml"),
      mix(`      - file: ${wav}\n        to: 15\n      - file: ${wav}\n        from: 15\n`),
    );
    const halves = await cli(
      "derive",
      "--mix",
      join(dir, "halves.yaml"),
      "--test-duration",
      "1h",
      "--out",
      join(dir, "b.yaml"),
      "--json",
    );
    expect(halves.code, halves.stderr).toBe(0);
    expect(JSON.parse(halves.stdout).recordings.length).toBe(2);
  }, 60_000);
});
