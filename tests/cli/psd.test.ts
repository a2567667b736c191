import { readFileSync, writeFileSync } from "node:fs";
import { basename, join } from "node:path";
import { spawnSync } from "node:child_process";
import { describe, expect, it } from "vitest";
import { cli, maxRelDiff, python, tempDir } from "../helpers.js";

const dir = tempDir();

describe("psdgate psd --json against scipy.signal.welch (live, when python3 with scipy is present)", () => {
  it("the Tern-7 CSV sample: numpy.loadtxt + scipy.signal.welch, every window and detrend mode, to 1e-9", async () => {
    for (const [w, sw, detrend, sd] of [
      ["hann", "hann", "mean", "constant"],
      ["flattop", "flattop", "linear", "linear"],
      ["hamming", "hamming", "none", "False"],
    ] as const) {
      const r = await cli(
        "psd",
        "samples/tern7-flight.csv",
        "--segment",
        "1024",
        "--overlap",
        "0.6",
        "--window",
        w,
        "--detrend",
        detrend,
        "--json",
      );
      expect(r.code).toBe(0);
      const ours = JSON.parse(r.stdout);
      // scipy 1.17.1 (the version this machine has; see TOOLCHAIN.md)
      const ref = JSON.parse(
        python(`
import json, numpy as np, scipy.signal as ss
d = np.loadtxt("samples/tern7-flight.csv", delimiter=",", skiprows=1)
out = []
for c in (1, 2):
    f, p = ss.welch(d[:, c], fs=4096, window="${sw}", nperseg=1024, noverlap=614, detrend=${sd === "False" ? "False" : `"${sd}"`})
    out.append(p.tolist())
print(json.dumps({"f": f.tolist(), "p": out}))`),
      );
      expect(ours.settings.hop).toBe(1024 - 614);
      expect(maxRelDiff(ours.frequencyHz, ref.f)).toBeLessThan(1e-12);
      expect(maxRelDiff(ours.channels[0].psd, ref.p[0])).toBeLessThan(1e-9);
      expect(maxRelDiff(ours.channels[1].psd, ref.p[1])).toBeLessThan(1e-9);
    }
  });
  it("the KB-210 float WAV: scipy.io.wavfile.read + welch, to 1e-9", async () => {
    const r = await cli("psd", "samples/kb210-run.wav", "--segment", "4096", "--json");
    const ours = JSON.parse(r.stdout);
    const ref = JSON.parse(
      python(`
import json, scipy.io.wavfile as wf, scipy.signal as ss
fs, x = wf.read("samples/kb210-run.wav")
print(json.dumps([ss.welch(x[:, c].astype("float64"), fs=fs, nperseg=4096, noverlap=2048)[1].tolist() for c in (0, 1)]))`),
    );
    expect(maxRelDiff(ours.channels[0].psd, ref[0])).toBeLessThan(1e-9);
    expect(maxRelDiff(ours.channels[1].psd, ref[1])).toBeLessThan(1e-9);
  });
});

describe("psdgate psd", () => {
  it("prints the human summary: RMS both ways, averages, DOF, peaks, band RMS", async () => {
    const r = await cli("psd", "samples/tern7-flight.csv", "--fmin", "10", "--fmax", "1500");
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(
      /RMS +3\.5\d+ g from the time history \(trend removed\), 3\.5\d+ g of the detrended segments, 3\.5\d+ g from the PSD\n +Parseval +PSD \/ segments (1\.00|0\.99)\d+ \(agree/,
    );
    expect(r.stdout).toMatch(/averages +\d+, [\d.]+ degrees of freedom/);
    expect(r.stdout).toMatch(/band +10–1500 Hz: RMS/);
    expect(r.stdout).toContain("g²/Hz");
  });
  it("--json carries the documented keys", async () => {
    const j = JSON.parse((await cli("psd", "samples/kb210-run.wav", "--json", "--channel", "2")).stdout);
    expect(Object.keys(j)).toEqual(["tool", "meta", "input", "settings", "analysis", "frequencyHz", "channels"]);
    expect(j.tool.name).toBe("psdgate");
    for (const k of ["file", "sha256", "sampleRateHz", "samples", "durationS"]) expect(j.input).toHaveProperty(k);
    for (const k of ["window", "segment", "overlap", "detrend", "confidence", "resolutionHz"])
      expect(j.settings).toHaveProperty(k);
    expect(j.channels.length).toBe(1);
    const c = j.channels[0];
    for (const k of [
      "name",
      "units",
      "psd",
      "lower",
      "upper",
      "averages",
      "dof",
      "rmsTime",
      "rmsPsd",
      "parsevalRatio",
      "stats",
    ])
      expect(c).toHaveProperty(k);
    expect(c.name).toBe("ch2");
    expect(c.units).toBe("g2/Hz");
    expect(c.psd.length).toBe(j.frequencyHz.length);
    expect(j.input.sha256).toBe(
      (await import("node:crypto")).createHash("sha256").update(readFileSync("samples/kb210-run.wav")).digest("hex"),
    );
  });
  it("--result-units m/s2 scales the PSD by g_n^2 = 9.80665^2 (CGPM 1901)", async () => {
    const a = JSON.parse((await cli("psd", "samples/kb210-run-short.wav", "--json")).stdout).channels[0];
    const b = JSON.parse((await cli("psd", "samples/kb210-run-short.wav", "--json", "--result-units", "m/s2")).stdout)
      .channels[0];
    expect(b.units).toBe("(m/s2)2/Hz");
    expect(b.psd[100] / a.psd[100]).toBeCloseTo(9.80665 ** 2, 9);
  });
  it("--sensitivity CH=S and --scale CH=K are recorded per channel in the JSON (reading)", async () => {
    const f = join(dir, "volts.csv");
    let s = "time,v1 [mV],v2 [V]\n";
    for (let i = 0; i < 64; i++)
      s += `${(i / 100).toFixed(2)},${(Math.sin(i) * 100).toFixed(3)},${Math.cos(i).toFixed(4)}\n`;
    writeFileSync(f, s);
    const r = await cli(
      "psd",
      f,
      "--segment",
      "16",
      "--sensitivity",
      "v1=100mV/g",
      "--sensitivity",
      "v2=10mV/(m/s2)",
      "--scale",
      "v2=0.5",
      "--json",
    );
    expect(r.code, r.stderr).toBe(0);
    const j = JSON.parse(r.stdout);
    expect(j.channels[0].reading).toMatchObject({
      fileUnit: "mV",
      unitFrom: "sensitivity",
      sensitivity: "100mV/g",
      scale: 1,
    });
    expect(j.channels[0].units).toBe("g2/Hz");
    expect(j.channels[1].reading).toMatchObject({ fileUnit: "V", sensitivity: "10mV/(m/s2)", scale: 0.5 });
    expect(j.channels[1].units).toBe("(m/s2)2/Hz");
    expect(j.channels[1].reading.factor).toBeCloseTo(50, 12);
  });
  it("CSV and WAV of the same synthesised record give the same PSD (to float32 precision)", async () => {
    const wav = join(dir, "same.wav");
    const csv = join(dir, "same.csv");
    for (const out of [wav, csv])
      expect(
        (
          await cli(
            "synth",
            "-p",
            "samples/profiles/tern7-gimbal.yaml",
            "-d",
            "5",
            "--rate",
            "4096",
            "--seed",
            "5",
            "-o",
            out,
          )
        ).code,
      ).toBe(0);
    const a = JSON.parse((await cli("psd", wav, "--json", "--segment", "1024")).stdout);
    const b = JSON.parse((await cli("psd", csv, "--json", "--segment", "1024")).stdout);
    expect(b.input.sampleRateHz).toBe(4096);
    expect(maxRelDiff(a.channels[0].psd, b.channels[0].psd)).toBeLessThan(1e-6);
  });
  it("--csv writes frequency, psd, lower, upper per channel; refuses an existing file without --force and the input itself", async () => {
    const out = join(dir, "psd.csv");
    expect((await cli("psd", "samples/kb210-run.wav", "--csv", out)).code).toBe(0);
    const lines = readFileSync(out, "utf8").trim().split("\n");
    expect(lines[0]).toBe(
      "frequency_hz,ch1_psd [g2/Hz],ch1_lower [g2/Hz],ch1_upper [g2/Hz],ch2_psd [g2/Hz],ch2_lower [g2/Hz],ch2_upper [g2/Hz]",
    );
    expect(lines.length).toBe(2049 + 1);
    const again = await cli("psd", "samples/kb210-run.wav", "--csv", out);
    expect(again.code).toBe(2);
    expect(again.stderr).toContain("[OUTPUT_EXISTS]");
    expect((await cli("psd", "samples/kb210-run.wav", "--csv", out, "--force")).code).toBe(0);
    const self = await cli("psd", "samples/kb210-run.wav", "--csv", "samples/kb210-run.wav", "--force");
    expect(self.code).toBe(2);
    expect(self.stderr).toContain("[OUTPUT_IS_INPUT]");
    expect(readFileSync("samples/kb210-run.wav").subarray(0, 4).toString()).toBe("RIFF");
  });
  it("--peak-hold: --csv adds a peak_hold column per channel (the --json peakHold line by line), and --report draws it beside the average with a legend entry, which verify reproduces", async () => {
    const out = join(dir, "hold.csv");
    const page = join(dir, "hold.html");
    const r = await cli("psd", "samples/kb210-run.wav", "--peak-hold", "2", "--csv", out, "--report", page);
    expect(r.code).toBe(0);
    const lines = readFileSync(out, "utf8").trim().split("\n");
    expect(lines[0]).toBe(
      "frequency_hz,ch1_psd [g2/Hz],ch1_lower [g2/Hz],ch1_upper [g2/Hz],ch1_peak_hold [g2/Hz],ch2_psd [g2/Hz],ch2_lower [g2/Hz],ch2_upper [g2/Hz],ch2_peak_hold [g2/Hz]",
    );
    const j = JSON.parse((await cli("psd", "samples/kb210-run.wav", "--peak-hold", "2", "--json")).stdout);
    const hold = j.channels[1].peakHold.psd as number[];
    expect(lines.length).toBe(hold.length + 1);
    for (const k of [1, 100, 1000, hold.length - 1]) expect(Number(lines[k + 1]!.split(",")[8])).toBe(hold[k]);
    const html = readFileSync(page, "utf8");
    expect(html.match(/data-series="peak-hold"/g)).toHaveLength(2);
    expect(html.match(/class="legend-text"[^>]*>peak-hold \(2 s stretches\)</g)).toHaveLength(2);
    expect(html).toContain("Peak-hold (largest stretch level at each line)");
    const v = await cli("verify", page);
    expect(v.code).toBe(0);
    expect(v.stdout).toMatch(/REPRODUCED/);
    // Without --peak-hold: no column, no curve, no extra style element.
    expect((await cli("psd", "samples/kb210-run.wav", "--report", page, "--force")).code).toBe(0);
    expect(readFileSync(page, "utf8")).not.toContain("peak-hold");
  });
  it("synth never replaces its profile (a CSV profile is also a valid output), however the path is spelled, even with --force", async () => {
    const prof = join(dir, "spec.csv");
    writeFileSync(prof, "hz,level\n20,0.01\n80,0.04\n350,0.04\n2000,0.007\n");
    const before = readFileSync(prof);
    const r = await cli(
      "synth",
      "-p",
      prof,
      "-d",
      "1",
      "--rate",
      "5120",
      "-o",
      join(dir, ".", "..", basename(dir), "spec.csv"),
      "--force",
    );
    expect(r.code).toBe(2);
    expect(r.stderr).toContain("[OUTPUT_IS_INPUT]");
    expect(readFileSync(prof).equals(before)).toBe(true);
  });
  it("an output onto an input is refused by real path, for every writer", async () => {
    const prof = join(dir, "p2.json");
    writeFileSync(prof, readFileSync("samples/profiles/kb210-controller.json"));
    const { createTimeHistoryWriter } = await import("../../src/report/timeHistoryWriter.js");
    await expect(
      createTimeHistoryWriter(`${dir}/./p2.wav`, {
        sampleRateHz: 10,
        channelNames: ["a"],
        units: "g",
        force: true,
        option: "--out",
        inputs: [`${dir}/p2.wav`],
      }),
    ).rejects.toThrow(/OUTPUT_IS_INPUT/);
  });
  it("inspect shows channels, rate, duration and statistics", async () => {
    const r = await cli("inspect", "samples/tern7-flight.csv");
    expect(r.code).toBe(0);
    expect(r.stdout).toContain("81920 samples at 4096 Hz = 20.000 s");
    expect(r.stdout).toMatch(/kurtosis 2\.9\d\d/);
  });
});

describe("exit codes and messages", () => {
  const bad = join(dir, "bad.csv");
  writeFileSync(bad, "time,ax\n0,1\n0.001,2\n0.002,x\n");
  const cases: [string, string[], RegExp][] = [
    [
      "segment not a power of two",
      ["psd", "samples/kb210-run.wav", "--segment", "1000"],
      /option --segment: expected a power of two/,
    ],
    [
      "overlap >= 1",
      ["psd", "samples/kb210-run.wav", "--overlap", "1"],
      /option --overlap: expected a fraction 0 <= F < 1/,
    ],
    [
      "confidence outside (0, 1)",
      ["psd", "samples/kb210-run.wav", "--confidence", "1.5"],
      /option --confidence: expected a level between 0 and 1/,
    ],
    [
      "fmin >= fmax",
      ["psd", "samples/kb210-run.wav", "--fmin", "500", "--fmax", "100"],
      /option --fmin: expected --fmin below --fmax/,
    ],
    [
      "a band above the record's Nyquist frequency",
      ["psd", "samples/kb210-run.wav", "--fmin", "3000"],
      /option --fmin: expected a frequency inside the record's 0–2560 Hz/,
    ],
    [
      "a channel that does not exist",
      ["psd", "samples/kb210-run.wav", "--channel", "az"],
      /option --channel: expected a channel name or position: 1=ch1, 2=ch2, received "az"/,
    ],
    [
      "an unknown window",
      ["psd", "samples/kb210-run.wav", "--window", "kaiser"],
      /option --window: expected one of hann/,
    ],
    [
      "both --segment and --resolution",
      ["psd", "samples/kb210-run.wav", "--segment", "1024", "--resolution", "2"],
      /either --segment or --resolution/,
    ],
    [
      "a record shorter than one segment",
      ["psd", "samples/kb210-run-short.wav", "--segment", "65536"],
      /expected at least one segment of 65536 samples, received 20480 samples/,
    ],
    [
      "a text cell",
      ["psd", bad],
      /bad\.csv:4:2 \(ax\): expected a number in column "ax", received "x" \[CSV_NOT_A_NUMBER\]/,
    ],
    ["a missing file", ["psd", join(dir, "nope.csv")], /nope\.csv: expected a readable file, received no such file/],
    ["a folder", ["psd", dir], /expected a readable file, received a folder/],
    [
      "units that conflict with the header",
      ["psd", "samples/tern7-flight.csv", "--units", "m/s2"],
      /--units to agree with the header's unit g/,
    ],
    ["an unknown command", ["frobnicate"], /unknown command/],
    ["no recording given", ["psd"], /expected a recording to analyse/],
  ];
  for (const [name, argv, message] of cases) {
    it(`${name}: exit 2, one line naming the place`, async () => {
      const r = await cli(...argv);
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(message);
      expect(r.stderr).not.toMatch(/\n\s+at /);
      expect(r.stdout).toBe("");
    });
  }
  it("an unexpected internal error says so, asks for a report and exits 70, without a stack trace", async () => {
    const { runCli } = await import("../../src/cli/main.js");
    let err = "";
    const code = await runCli(["profile", "samples/profiles/kb210-controller.json"], {
      stdout: () => {
        throw new TypeError("simulated failure");
      },
      stderr: (s) => (err += s),
    });
    expect(code).toBe(70);
    expect(err).toContain("internal error: simulated failure");
    expect(err).toContain("please report it");
    expect(err).not.toMatch(/\n\s+at /);
  });
  it("--help and --version exit 0", async () => {
    expect((await cli("--help")).code).toBe(0);
    expect((await cli("psd", "--help")).stdout).toContain("--segment <n>");
    const check = (await cli("check", "--help")).stdout;
    expect(check).toMatch(/\(default the\s+profile's resolutionHz, else 4096\)/);
    expect(check).toMatch(/Decision rule:[\s\S]*at most 5\s%/);
    expect(check).toMatch(/inconclusive \(exit 3\): /);
    expect(check).toContain("--control <channels>");
    expect((await cli("--version")).stdout.trim()).toBe(JSON.parse(readFileSync("package.json", "utf8")).version);
  });
  it("the installed executable sets the process exit code (bin/psdgate.js)", () => {
    const r = spawnSync(
      "node",
      [
        "bin/psdgate.js",
        "check",
        "samples/kb210-run-short.wav",
        "--profile",
        "samples/profiles/kb210-controller.json",
        "--json",
      ],
      { encoding: "utf8" },
    );
    expect(r.status).toBe(3);
    expect(JSON.parse(r.stdout).verdict).toBe("inconclusive");
    const e = spawnSync("node", ["bin/psdgate.js", "psd", "nope.wav"], { encoding: "utf8" });
    expect(e.status).toBe(2);
    expect(e.stderr.trim().split("\n").length).toBe(1);
  });
  it("a reader that stops early (| head) gets no stack trace, and the exit code is the work's", () => {
    // 250 KB of JSON Lines into a reader that takes 100 bytes and leaves.
    const piped = spawnSync(
      "bash",
      [
        "-c",
        "set -o pipefail; node bin/psdgate.js check samples/kb210-run*.wav --profile samples/profiles/kb210-controller.json --json | head -c 100 > /dev/null",
      ],
      { encoding: "utf8" },
    );
    expect(piped.stderr).toBe("");
    expect(piped.status).toBe(1); // one of the three runs fails the profile: the worst verdict, as without the pipe
  });
  it("an unwritable standard output is one line on stderr and exit 2", () => {
    const r = spawnSync("sh", ["-c", "node bin/psdgate.js psd samples/kb210-run.wav > /dev/full"], {
      encoding: "utf8",
    });
    expect(r.status).toBe(2);
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
    expect(r.stderr).toContain("[OUTPUT_UNWRITABLE]");
  });
});
