import { existsSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { cli, gaussian, tempDir } from "../helpers.js";

/**
 * Hostile and odd numbers: every one is exit 2 with one line naming the option or the data, never Infinity,
 * NaN or a zero printed as a result with exit 0, and never a message that contradicts itself.
 */
const PROFILE = "samples/profiles/kb210-controller.json";

describe("no figures from no data, no message that contradicts itself", () => {
  it("--scale outside 1e-12..1e12 is refused (1e200 gave NaN results with exit 0, 1e308 a RECORD_TOO_SHORT of a long record)", async () => {
    for (const k of ["1e308", "1e200", "-1e13", "1e-13", "0"]) {
      const r = await cli("psd", "samples/kb210-run-short.wav", "--scale", k);
      expect(r.code, k).toBe(2);
      expect(r.stderr, k).toMatch(
        /option --scale: expected a number K with 1e-12 <= \|K\| <= 1e12.*\[OPTION_INVALID\]/,
      );
    }
    expect((await cli("psd", "samples/kb210-run-short.wav", "--scale", "1e12", "--json")).code).toBe(0);
  });

  it("every segment holding a NaN: RECORD_TOO_SHORT says so, not that a long record is short", async () => {
    const d = tempDir();
    writeFileSync(
      join(d, "nan.csv"),
      `time,az [g]\n${Array.from({ length: 10240 }, (_, i) => `${(i / 1024).toFixed(6)},${i % 500 === 0 ? "nan" : "0.1"}`).join("\n")}\n`,
    );
    const r = await cli("psd", join(d, "nan.csv"));
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(
      /expected at least one segment of 4096 samples free of NaN and infinite values, received 10240 samples, 21 of them NaN or infinite, in every segment \[RECORD_TOO_SHORT\]/,
    );
  });

  it("ride on an all-NaN recording is refused, not 'A(8) 0 m/s², below the action value'", async () => {
    const d = tempDir();
    writeFileSync(
      join(d, "nan.csv"),
      `time,x [m/s2],y [m/s2],z [m/s2]\n${Array.from({ length: 6000 }, (_, i) => `${(i / 400).toFixed(4)},nan,nan,nan`).join("\n")}\n`,
    );
    const r = await cli("ride", join(d, "nan.csv"), "--axes", "x=x,y=y,z=z", "--exposure", "8h");
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toMatch(
      /\(x\): expected finite samples to weight, received 6000 samples, all of them NaN or infinite \[RECORD_TOO_SHORT\]/,
    );
  });

  it("respond: an exposure or stress so large that a figure overflows names its option (was Infinity, exit 0)", async () => {
    const dur = await cli("respond", PROFILE, "--fn", "10:1000:10", "--q", "10", "--duration", "1e308");
    expect(dur.code).toBe(2);
    expect(dur.stderr).toMatch(
      /option --duration: expected an exposure for which the largest peak is a finite number.*\[OPTION_INVALID\]/,
    );
    const k = await cli("respond", PROFILE, "--fn", "10:1000:10", "--q", "10", "--stress-per-metre", "1e300");
    expect(k.code).toBe(2);
    expect(k.stderr).toMatch(/option --stress-per-metre: .*damage Infinity.*\[OPTION_INVALID\]/);
    expect(`${dur.stdout}${k.stdout}`).not.toMatch(/Infinity|NaN/);
  });

  it("synth: a duration under 2 samples and an output that is neither .wav nor .csv are refused, nothing written", async () => {
    const d = tempDir();
    const short = await cli("synth", "-p", PROFILE, "--rate", "5120", "--duration", "1e-6", "--out", join(d, "s.wav"));
    expect(short.code).toBe(2);
    expect(short.stderr).toMatch(
      /option --duration: expected a duration of at least 2 samples at the rate, received 0\.000001 s x 5120 Hz = 0 samples \[OPTION_INVALID\]/,
    );
    expect(existsSync(join(d, "s.wav"))).toBe(false);
    const txt = await cli("synth", "-p", PROFILE, "--rate", "5120", "--duration", "2", "--out", join(d, "x.txt"));
    expect(txt.code).toBe(2);
    expect(txt.stderr).toMatch(/option --out: expected a file name ending \.wav or \.csv.*\[OUTPUT_FORMAT\]/);
    expect(existsSync(join(d, "x.txt"))).toBe(false);
  });

  it("a WAV whose fmt chunk claims more bytes than the file holds says so (was 'at least 16 bytes, received 16 bytes')", async () => {
    const d = tempDir();
    const b = Buffer.alloc(12 + 8 + 16);
    b.write("RIFF", 0, "ascii");
    b.writeUInt32LE(b.length - 8, 4);
    b.write("WAVE", 8, "ascii");
    b.write("fmt ", 12, "ascii");
    b.writeUInt32LE(20, 16);
    b.writeUInt16LE(1, 20);
    writeFileSync(join(d, "cut.wav"), b);
    const r = await cli("psd", join(d, "cut.wav"));
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(
      /chunk 'fmt ': expected the 20 bytes its chunk header gives, received 16 bytes before the file ends \[WAV_BAD_FMT\]/,
    );
  });
  it("check on a dead channel: the NO_SIGNAL doubt is the answer, no RMS of -Infinity dB, excursion or Parseval NaN", async () => {
    const d = tempDir();
    writeFileSync(
      join(d, "dead.csv"),
      `time,az [g]\n${Array.from({ length: 2048 * 30 }, (_, i) => `${(i / 2048).toFixed(6)},0.5`).join("\n")}\n`,
    );
    const r = await cli("check", join(d, "dead.csv"), "-p", PROFILE);
    expect(r.code).toBe(3);
    expect(r.stdout).toMatch(/because {4}no signal: all 61440 finite sample\(s\) hold the one value 0\.5/);
    const channel = r.stdout.slice(r.stdout.indexOf('channel 1 "az"'), r.stdout.indexOf("RULE:"));
    expect(channel.trim().split("\n")).toHaveLength(2);
    expect(r.stdout).not.toMatch(/Infinity|NaN|within what chance explains|excursions|Parseval {3}|failure was shown/);
    const j = JSON.parse((await cli("check", join(d, "dead.csv"), "-p", PROFILE, "--json")).stdout);
    expect(j.verdict).toBe("inconclusive");
    expect(j.channels[0].findings.map((f: { code: string }) => f.code)).toEqual(["NO_SIGNAL"]);
    // Nothing of the dead channel is shown outside its band in the JSON either (a reader counting shown lines).
    expect(JSON.stringify(j.channels[0])).not.toMatch(/"shown":true|"beyondOuter":true/);
    const html = join(d, "dead.html");
    expect((await cli("check", join(d, "dead.csv"), "-p", PROFILE, "--report", html)).code).toBe(3);
    const page = readFileSync(html, "utf8");
    expect(page).not.toMatch(/Infinity|NaN|No line lies outside/);
    expect(page).toContain("None judged: the channel has no signal.");
  });

  it("psd on a dead channel: the NO_SIGNAL doubt, and no Parseval ratio, crest factor or kurtosis of 0 / 0 (text and page)", async () => {
    const d = tempDir();
    writeFileSync(
      join(d, "dead.csv"),
      `time,az [g]\n${Array.from({ length: 2048 * 30 }, (_, i) => `${(i / 2048).toFixed(6)},0.5`).join("\n")}\n`,
    );
    const html = join(d, "dead-psd.html");
    const r = await cli("psd", join(d, "dead.csv"), "--report", html);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/DOUBT {6}no signal: all 61440 finite sample\(s\) hold the one value 0\.5/);
    expect(r.stdout).not.toMatch(/NaN|Parseval|crest factor|kurtosis/);
    expect(readFileSync(html, "utf8")).not.toMatch(/NaN|Parseval ratio|Crest factor/);
  });

  it("transfer with a dead output channel is NO_VIBRATION naming the file and the channel (was 'NaN % of the mean square')", async () => {
    const d = tempDir();
    const x = gaussian(2048 * 10, 5, 1);
    writeFileSync(
      join(d, "deadout.csv"),
      `time,in [g],out [g]\n${Array.from(x, (v, i) => `${(i / 2048).toFixed(6)},${v.toFixed(5)},0.25`).join("\n")}\n`,
    );
    const r = await cli("transfer", join(d, "deadout.csv"), "--in", "in");
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toMatch(
      /deadout\.csv: expected vibration on the output channel "out", received a PSD of zero at every line \(a channel that is all zero or constant\) \[NO_VIBRATION\] \(hint: leave it out with --output-channel\)/,
    );
  });

  it("ride on a window shorter than the filters' settling is refused naming --to (was an a_w, A(8) and NaN MTVV from 0.1 s)", async () => {
    const base = ["samples/marlow-uv3-ride.wav", "--units", "m/s2", "--scale", "40", "--axes", "x=1,y=2,z=3"];
    const r = await cli("ride", ...base, "--exposure", "8h", "--from", "100", "--to", "100.1");
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toMatch(
      /marlow-uv3-ride\.wav: option --to: expected an analysed window of at least 5 s \(the weighting filters settle over 5 s; the running r\.m\.s\. integrates over 1 s\), received 0\.1 s \[RECORD_TOO_SHORT\]/,
    );
    const long = await cli("ride", ...base, "--from", "100", "--to", "130", "--running-rms", "40");
    expect(long.code).toBe(2);
    expect(long.stderr).toMatch(/at least 40 s .*received 30 s \[RECORD_TOO_SHORT\] \(hint: a shorter --running-rms\)/);
    expect((await cli("ride", ...base, "--from", "100", "--to", "105")).code).toBe(0);
  });

  it("respond: a damage that underflows to 0 on a quiet record with a large Basquin exponent names --basquin (was 0.000e+0)", async () => {
    const d = tempDir();
    const x = gaussian(4096 * 20, 2, 1e-6);
    writeFileSync(
      join(d, "quiet.csv"),
      `time,az [g]\n${Array.from(x, (v, i) => `${(i / 4096).toFixed(6)},${v.toExponential(4)}`).join("\n")}\n`,
    );
    const r = await cli("respond", join(d, "quiet.csv"), "--fn", "100:2000:3", "--q", "10", "--basquin", "30");
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toMatch(
      /option --basquin: expected a Basquin exponent with which the damage is a number a double holds \(above 2\.2e-308\), received b 30: the (record's )?damage at ([\d.]+) Hz is [\de.+-]+ \(the response there, in metres, to the power b underflows\) \[OPTION_INVALID\] \(hint: a smaller b, or natural frequencies that stop below \2 Hz \(--fn\)\)/,
    );
    expect((await cli("respond", join(d, "quiet.csv"), "--fn", "100:2000:3", "--q", "10", "--basquin", "4")).code).toBe(
      0,
    );
  });
  it("check of a record whose Nyquist frequency lies below the profile's first frequency is refused (was 'RMS 0 g measured, 0 g required: NaN dB', exit 3)", async () => {
    const d = tempDir();
    // 120 s at 32 Hz: Nyquist 16 Hz, below the KB-210 profile's 20 Hz, so the record shows none of its range.
    const x = gaussian(3840, 7);
    writeFileSync(
      join(d, "slow.csv"),
      `time,az [g]\n${Array.from(x, (v, i) => `${(i / 32).toFixed(5)},${v.toFixed(6)}`).join("\n")}\n`,
    );
    const r = await cli("check", join(d, "slow.csv"), "--profile", PROFILE);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(
      /slow\.csv: expected a sample rate above 40 Hz \(twice the profile's first frequency, 20 Hz\), received 32 Hz \[CHECK_RATE_TOO_LOW\]/,
    );
    expect(r.stdout).not.toMatch(/NaN|Infinity/);
  });
});
