import { existsSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { cli, maxRelDiff, python, tempDir } from "../helpers.js";

const dir = tempDir();
const sample = "samples/quarry-bend-bracket.csv";

describe("psdgate transfer", () => {
  it("--json on the Quarry Bend survey matches scipy 1.17.1 csd/welch/coherence (numpy.loadtxt) to 1e-9: |H1|, |H2|, phase, coherence, both PSDs", async () => {
    const r = await cli(
      "transfer",
      sample,
      "--in",
      "base",
      "--output-channel",
      "tip",
      "--output-channel",
      "clamp",
      "--segment",
      "2048",
      "--json",
    );
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    // scipy 1.17.1 (the version on this machine; TOOLCHAIN.md)
    const ref = JSON.parse(
      python(`
import json, numpy as np, scipy.signal as ss
d = np.loadtxt("${sample}", delimiter=",", skiprows=1)
x = d[:, 1]
out = []
for c in (2, 3):
    kw = dict(fs=2560, window="hann", nperseg=2048, noverlap=1024, detrend="constant")
    f, pxy = ss.csd(x, d[:, c], **kw)
    _, pxx = ss.welch(x, **kw)
    _, pyy = ss.welch(d[:, c], **kw)
    _, coh = ss.coherence(x, d[:, c], **kw)
    out.append({"h1": (np.abs(pxy) / pxx).tolist(), "h2": (pyy / np.abs(pxy)).tolist(), "phase": np.degrees(np.angle(pxy)).tolist(), "coh": coh.tolist(), "pyy": pyy.tolist()})
print(json.dumps({"f": f.tolist(), "pxx": pxx.tolist(), "out": out}))`),
    );
    expect(maxRelDiff(j.frequencyHz, ref.f)).toBeLessThan(1e-12);
    expect(maxRelDiff(j.inputChannel.psd, ref.pxx)).toBeLessThan(1e-9);
    for (const [i, o] of j.outputs.entries()) {
      const s = ref.out[i];
      // Lines 1..N/2-1 (DC after mean removal is 0/0 in both).
      const inner = (a: number[]) => a.slice(1, -1);
      expect(maxRelDiff(inner(o.h1.magnitude), inner(s.h1))).toBeLessThan(1e-9);
      expect(maxRelDiff(inner(o.h2.magnitude), inner(s.h2))).toBeLessThan(1e-9);
      expect(maxRelDiff(inner(o.coherence), inner(s.coh))).toBeLessThan(1e-9);
      expect(maxRelDiff(o.measuredOutputPsd, s.pyy)).toBeLessThan(1e-9);
      let worst = 0;
      for (let k = 1; k < s.phase.length - 1; k++)
        worst = Math.max(worst, Math.abs(((o.h1.phaseDeg[k] - s.phase[k] + 540) % 360) - 180));
      expect(worst).toBeLessThan(1e-7);
    }
  });
  it("--json carries the documented keys; the sample's invented modes come out (tip 185 Hz Q 12 and 620 Hz Q 18, clamp 410 Hz Q 8, within 3 % and 8 %)", async () => {
    const r = await cli(
      "transfer",
      sample,
      "--in",
      "base",
      "--output-channel",
      "tip",
      "--output-channel",
      "3",
      "--json",
    );
    expect(r.code).toBe(0);
    const j = JSON.parse(r.stdout);
    for (const k of ["tool", "input", "settings", "frequencyHz", "inputChannel", "outputs"])
      expect(j).toHaveProperty(k);
    expect(j.outputs.map((o: { name: string }) => o.name)).toEqual(["tip", "clamp"]);
    for (const o of j.outputs) {
      for (const h of [o.h1, o.h2]) {
        expect(h.magnitude.length).toBe(j.frequencyHz.length);
        expect(h.phaseDeg.length).toBe(j.frequencyHz.length);
      }
      for (const k of ["coherence", "predictedOutputPsd", "measuredOutputPsd"])
        expect(o[k].length).toBe(j.frequencyHz.length);
      for (const res of o.resonances)
        for (const k of ["frequencyHz", "magnitude", "q"]) expect(typeof res[k]).toBe("number");
    }
    const modes = j.outputs.map((o: { resonances: { frequencyHz: number; q: number }[] }) =>
      o.resonances.map((x) => [x.frequencyHz, x.q]),
    );
    const near = ([f, q]: number[], F: number, Q: number) => Math.abs(f! / F - 1) < 0.03 && Math.abs(q! / Q - 1) < 0.08;
    expect(modes[0].length).toBe(2);
    expect(near(modes[0][0], 185, 12) && near(modes[0][1], 620, 18)).toBe(true);
    expect(modes[1].length).toBe(1);
    expect(near(modes[1][0], 410, 8)).toBe(true);
  });
  it("prints the summary: RMS measured against predicted, coherence, resonances table", async () => {
    const r = await cli("transfer", sample, "--in", "base", "--output-channel", "tip");
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(
      /RMS +measured [\d.]+ g; predicted from the input \|H1\|² G_in [\d.]+ g \(\d+\.\d % of the mean square\)/,
    );
    expect(r.stdout).toMatch(/resonances \(peaks of \|H1\|, Q from the half-power band\)/);
  });
  it("--csv writes one row per line with each output's columns, and refuses to overwrite without --force", async () => {
    const out = join(dir, "h.csv");
    expect((await cli("transfer", sample, "--in", "base", "--output-channel", "tip", "--csv", out)).code).toBe(0);
    const lines = readFileSync(out, "utf8").trim().split("\n");
    expect(lines[0]).toBe(
      "frequency_hz,base_psd [g2/Hz],tip_h1,tip_phase_deg,tip_h2,tip_coherence,tip_predicted_psd [g2/Hz],tip_measured_psd [g2/Hz]",
    );
    expect(lines.length).toBe(4096 / 2 + 2);
    const again = await cli("transfer", sample, "--in", "base", "--output-channel", "tip", "--csv", out);
    expect(again.code).toBe(2);
    expect(again.stderr).toMatch(/OUTPUT_EXISTS/);
    expect(existsSync(out)).toBe(true);
  });
  it("bad input: one line, a code, exit 2, nothing on stdout", async () => {
    for (const [args, code] of [
      [["--in", "base", "--output-channel", "base"], "OPTION_INVALID"],
      [["--in", "seat", "--output-channel", "tip"], "CHANNEL_NOT_FOUND"],
      [["--in", "base", "--output-channel", "tip", "--channel", "tip"], "OPTION_CONFLICT"],
      [["--in", "base", "--output-channel", "tip", "--segment", "262144"], "RECORD_TOO_SHORT"],
    ] as const) {
      const r = await cli("transfer", sample, ...args);
      expect(r.code).toBe(2);
      expect(r.stdout).toBe("");
      expect(r.stderr.trim().split("\n").length).toBe(1);
      expect(r.stderr).toContain(`[${code}]`);
      expect(r.stderr).toMatch(/expected /);
    }
  });
});

describe("psdgate transfer --report", () => {
  it("writes the HTML page atomically beside the text output", async () => {
    const out = join(dir, "survey.html");
    const r = await cli("transfer", sample, "--in", "base", "--output-channel", "clamp", "--report", out);
    expect(r.code).toBe(0);
    expect(readFileSync(out, "utf8")).toMatch(/^<!DOCTYPE html>[\s\S]*id="coherence-1"[\s\S]*<\/html>\n$/);
    expect(r.stdout).toMatch(/output clamp/);
  });
  it("a dead input channel (all zero) is NO_VIBRATION naming the file, not H1 and predictions of NaN with exit 0", async () => {
    const { writeFileSync } = await import("node:fs");
    const file = join(dir, "dead-input.csv");
    let text = "time,base,item\n";
    for (let i = 0; i < 8192; i++) text += `${(i / 1024).toFixed(6)},0,${Math.sin(i * 0.7).toFixed(4)}\n`;
    writeFileSync(file, text);
    const r = await cli("transfer", file, "--in", "base", "-s", "1024");
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toMatch(/dead-input\.csv.*\[NO_VIBRATION\]/);
  });
});
