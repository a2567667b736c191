import { copyFileSync, existsSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { cli, tempDir } from "../helpers.js";

const SAMPLE = "samples/brackley-ft2-warehouse.csv";
// The events scripts/make-shock-sample.mjs puts into z (start s, duration s, peak g): the known answer.
const KNOWN = [
  { t: 19.5, T: 0.006, peak: -3.1 },
  { t: 11.8, T: 0.016, peak: 2.4 },
  { t: 4.2, T: 0.01, peak: 1.6 },
  { t: 24.05, T: 0.01, peak: 1.5 },
  { t: 5.35, T: 0.01, peak: 1.3 },
];

describe("psdgate shock", () => {
  it("--json: per channel events [{timeS, peak, durationS, srs {fnHz, maximax, positive, negative}, pvss}] largest first, and the record's srs; the sample's known events found, none invented", async () => {
    const r = await cli("shock", SAMPLE, "--fn", "5:200:3", "--json");
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.channels.map((c: { name: string }) => c.name)).toEqual(["z", "x"]);
    const z = j.channels[0];
    // Gravity on z: removed as the record's mean.
    expect(z.mean).toBeGreaterThan(0.99);
    expect(z.mean).toBeLessThan(1.01);
    expect(z.events).toHaveLength(KNOWN.length);
    for (let k = 0; k < KNOWN.length; k++) {
      const e = z.events[k];
      const want = KNOWN[k]!;
      for (const key of ["timeS", "peak", "durationS", "srs", "pvss"]) expect(e).toHaveProperty(key);
      for (const key of ["fnHz", "maximax", "positive", "negative"]) expect(e.srs[key]).toHaveLength(17);
      expect(e.timeS).toBeGreaterThanOrEqual(want.t);
      expect(e.timeS).toBeLessThanOrEqual(want.t + want.T);
      // Background 0.08 g r.m.s. (the script's) at the peak: within 4 sigma.
      expect(Math.abs(e.peak - want.peak)).toBeLessThan(0.32);
      expect(e.durationS).toBeLessThanOrEqual(want.T + 0.001);
    }
    expect(z.srs.fnHz).toHaveLength(17);
    expect(z.srs.pvss).toHaveLength(17);
    expect(z.threshold / z.backgroundRms).toBeCloseTo(6, 9);
    expect(j.caution).toMatch(/not a structural verdict/);
    expect(j.method).toMatch(/ISO 18431-4/);
  });

  it("text lists the largest events first with channel, time, signed peak and duration, and carries the caution", async () => {
    const r = await cli("shock", SAMPLE, "--fn", "5:200:3", "--top", "3", "--channel", "z");
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/ 1 +z +19\.50\d +-3\.\d+ g/);
    expect(r.stdout).toContain("(3 of 5; --top for more, --json for all)");
    expect(r.stdout).toContain("not a structural verdict");
  });

  it("--threshold in units and --hold: a threshold between the events' peaks keeps only the larger ones", async () => {
    const j = JSON.parse(
      (await cli("shock", SAMPLE, "--fn", "10,50,100", "--threshold", "2", "--channel", "z", "--json")).stdout,
    );
    expect(j.channels[0].events.map((e: { peak: number }) => Math.sign(e.peak))).toEqual([-1, 1]);
    expect(j.channels[0].threshold).toBe(2);
  });

  it("--csv writes one row per natural frequency for the record and each event; it refuses to clobber", async () => {
    const dir = tempDir();
    const out = join(dir, "srs.csv");
    expect((await cli("shock", SAMPLE, "--fn", "10,50,100", "--channel", "z", "--csv", out)).code).toBe(0);
    const rows = readFileSync(out, "utf8").trim().split("\n");
    expect(rows[0]).toBe(
      "channel,source,event,time_s,peak,duration_s,fn_hz,maximax,positive,negative,pvss_m_per_s,units",
    );
    expect(rows).toHaveLength(1 + 3 * (1 + 5));
    const again = await cli("shock", SAMPLE, "--fn", "10,50,100", "--channel", "z", "--csv", out);
    expect(again.code).not.toBe(0);
    expect(again.stderr).toMatch(/OUTPUT_EXISTS/);
  });

  it("refuses natural frequencies the rate cannot carry (above fs/4) and notes those above fs/10", async () => {
    const bad = await cli("shock", SAMPLE, "--fn", "10,600");
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/SRS_RATE_TOO_LOW/);
    expect(bad.stderr.trim().split("\n")).toHaveLength(1);
    const warn = await cli("shock", SAMPLE, "--fn", "10,400", "--channel", "z");
    expect(warn.code).toBe(0);
    expect(warn.stdout).toMatch(/note: the highest natural frequency 400 Hz has 5\.0 samples per period/);
  });

  it("bad options are one line with a code: both thresholds, a bad grid", async () => {
    const both = await cli("shock", SAMPLE, "--fn", "10:100", "--threshold", "1", "--threshold-factor", "5");
    expect(both.stderr).toMatch(/OPTION_CONFLICT/);
    const grid = await cli("shock", SAMPLE, "--fn", "100:10");
    expect(grid.stderr).toMatch(/--fn.*OPTION_INVALID|OPTION_INVALID.*--fn/);
  });

  it("a phone-rate record with --from/--to: times stay on the file's clock", async () => {
    const dir = tempDir();
    const f = join(dir, "phone.csv");
    const lines = ["t,a"];
    // 200 Hz, 20 s, a little deterministic texture, one 30 ms bump at 12 s of 2 g.
    for (let i = 0; i < 4000; i++) {
      const t = i / 200;
      const bump = t >= 12 && t < 12.03 ? 2 * Math.sin((Math.PI * (t - 12)) / 0.03) : 0;
      lines.push(
        `${t.toFixed(3)},${(0.02 * Math.sin(2 * Math.PI * 3.1 * t) + 0.015 * Math.sin(2 * Math.PI * 7.3 * t + 1) + bump).toFixed(4)}`,
      );
    }
    writeFileSync(f, lines.join("\n") + "\n");
    const j = JSON.parse((await cli("shock", f, "--fn", "2:20", "--from", "5", "--to", "18", "--json")).stdout);
    expect(existsSync(f)).toBe(true);
    expect(j.channels[0].events).toHaveLength(1);
    expect(j.channels[0].events[0].timeS).toBeCloseTo(12.015, 2);
  });

  it("--report writes a record on the shared frame (identity from --meta, event table, SRS plot, sign-off) that verify re-runs; a changed recording differs", async () => {
    const dir = tempDir();
    const rec = join(dir, "brackley-ft2-warehouse.csv");
    copyFileSync(SAMPLE, rec);
    const out = join(dir, "shock.html");
    const r = await cli(
      "shock",
      rec,
      "--fn",
      "5:160:2",
      "--channel",
      "z",
      "--report",
      out,
      "--meta",
      "samples/kb210-run-meta.yaml",
    );
    expect(r.code).toBe(0);
    const html = readFileSync(out, "utf8");
    expect(html).toContain('id="identity"');
    expect(html).toContain('id="signoff"');
    expect(html).toContain('id="srs-1"');
    expect(html).toContain('id="timeline-1"');
    // The timeline draws the threshold either side of zero: the two rules are the embedded result's threshold.
    const { extractResult } = await import("../../src/report/embeddedResult.js");
    const threshold = (extractResult(html).doc!.result as { channels: { threshold: number }[] }).channels[0]!.threshold;
    const timeline = html.slice(
      html.indexOf('id="timeline-1"'),
      html.indexOf("</svg>", html.indexOf('id="timeline-1"')),
    );
    const rules = [...timeline.matchAll(/data-rule="([^"]+)"/g)].map((m) => Number(m[1]));
    expect(rules).toHaveLength(2);
    expect(threshold).toBeGreaterThan(0);
    expect(rules).toEqual([threshold, -threshold]);
    expect(html).toContain("not a structural verdict");
    expect(html).not.toMatch(/<script/i);
    const v = await cli("verify", out);
    expect(v.code).toBe(0);
    expect(v.stdout).toMatch(/\(shock report\)/);
    expect(v.stdout).toMatch(/REPRODUCED/);
    // The same bytes but one sample changed: the SHA-256 differs, so verify does not re-run.
    writeFileSync(rec, readFileSync(rec, "utf8").replace("\n0.0005,", "\n0.0005,9"));
    const w = await cli("verify", out);
    expect(w.code).not.toBe(0);
    expect(w.stdout).toMatch(/SHA-256 differs/);
  });

  it("a channel name from the file with ESC and a formula start is printed escaped and written to --csv as text", async () => {
    const dir = tempDir();
    const f = join(dir, "names.csv");
    const rows = ['time,"=cmd\u001b[2J"'];
    for (let i = 0; i < 4000; i++)
      rows.push(`${(i / 1000).toFixed(3)},${(0.01 * Math.sin(0.7 * i) + (i === 2000 ? 1 : 0)).toFixed(4)}`);
    writeFileSync(f, rows.join("\n") + "\n");
    const out = join(dir, "o.csv");
    const r = await cli("shock", f, "--fn", "5:50", "--csv", out);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).not.toContain("\u001b");
    expect(r.stdout).toContain("=cmd\\x1b[2J");
    expect(readFileSync(out, "utf8").split("\n")[1]).toMatch(/^'=cmd/);
  });

  it("a clipped shock carries the read's clipping doubt into the result (its peak and SRS are too low)", async () => {
    const dir = tempDir();
    const f = join(dir, "clip.csv");
    const rows = ["t,a"];
    for (let i = 0; i < 20000; i++) {
      const t = i / 1000;
      let v = 0.05 * Math.sin(2 * Math.PI * 7 * t) + 0.03 * Math.sin(2 * Math.PI * 23 * t + 1);
      if (t >= 10 && t < 10.02) v += 3 * Math.sin((Math.PI * (t - 10)) / 0.02);
      rows.push(`${t.toFixed(3)},${Math.max(-1, Math.min(1, v)).toFixed(4)}`);
    }
    writeFileSync(f, rows.join("\n") + "\n");
    const j = JSON.parse((await cli("shock", f, "--fn", "2:100", "--json")).stdout);
    expect(j.channels[0].events).toHaveLength(1);
    expect(j.doubts.join(" ")).toMatch(/clipping/);
  });
});
