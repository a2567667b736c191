import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyzeRecording } from "../src/pass/analyzeRecording.js";
import { analyzeTransfer } from "../src/analyses/analyzeTransfer.js";
import { checkRecording, loadProfile } from "../src/analyses/checkRecording.js";
import { parseProfile } from "../src/compare/testProfile.js";
import { deriveProfile, plainInputs } from "../src/analyses/deriveProfile.js";
import { InputError } from "../src/errors.js";
import { roundRate } from "../src/read/roundRate.js";
import { loadSpectrumSource, responseSpectra } from "../src/analyses/responseSpectra.js";
import { cli, gaussian, tempDir } from "./helpers.js";
import {
  onGravity,
  printStamp,
  settlingStart,
  writeFloatWav,
  writeInt16Wav,
  writeStampedCsv,
  type StampFormat,
} from "./instrumentRecords.js";
import { shapedRecord } from "./shapedRecords.js";
import { findingText } from "../src/report/findingTexts.js";

/**
 * Files shaped the way loggers, phones and DAQs write them (tests/instrumentRecords.ts), read by every
 * command that shares the path: --from/--to windows, stamps rounded by print formats, units rows, integer
 * WAVs with and without calibration, gravity and a settling offset at the start (issue #20).
 */

const dir = tempDir();

async function inputError(p: Promise<unknown>): Promise<InputError> {
  try {
    await p;
  } catch (e) {
    if (e instanceof InputError) return e;
    throw e;
  }
  throw new Error("expected an InputError");
}

describe("--from/--to: what depends on the record's length is of the analysed window", () => {
  it("check kb210-run.wav --to 25 (the profile asks 40 s) is INCONCLUSIVE with DURATION_SHORT naming the window; the whole record passes", async () => {
    const profile = await loadProfile("samples/profiles/kb210-controller.json");
    const whole = await checkRecording("samples/kb210-run.wav", profile, { histogram: false });
    expect(whole.verdict).toBe("pass");
    const cut = await checkRecording("samples/kb210-run.wav", profile, { histogram: false, toS: 25 });
    expect(cut.verdict).toBe("inconclusive");
    const f = cut.channels[0]!.findings.find((x) => x.code === "DURATION_SHORT")!;
    expect(f.values).toEqual({ durationS: 25, requiredDurationS: 40, fromS: 0, toS: 25 });
    expect(findingText(f)).toBe(
      "the analysed window 0.000 to 25.000 s lasts 25.00 s, shorter than the 40 s the profile requires: it cannot show the whole test",
    );
  });

  it("the text, JSON and HTML report of check show the window (from, to, length) and judge the duration on it; exit 3", async () => {
    const report = join(dir, "window.html");
    const r = await cli(
      "check",
      "samples/kb210-run.wav",
      "-p",
      "samples/profiles/kb210-controller.json",
      "--to",
      "25",
      "--report",
      report,
    );
    expect(r.code).toBe(3);
    expect(r.stdout).toContain("  window     0.000 to 25.000 s (25.000 s): 128000 samples analysed");
    const html = (await import("node:fs")).readFileSync(report, "utf8");
    expect(html).toContain("0.000 to 25.000 s (25.000 s): 128000 samples analysed");
    expect(html).toMatch(/Duration required.*NOT met by the analysed window's/);
    const j = JSON.parse(
      (
        await cli(
          "check",
          "samples/kb210-run.wav",
          "-p",
          "samples/profiles/kb210-controller.json",
          "--from",
          "10",
          "--to",
          "35",
          "--json",
        )
      ).stdout,
    );
    expect(j.input.window).toEqual({ fromS: 10, toS: 35, durationS: 25, frames: 128000 });
    expect(j.channels[0].findings.map((x: { code: string }) => x.code)).toContain("DURATION_SHORT");
  });

  it("a gravity axis whose sensor settles for 2 s: --from 2 gives exactly the PSD of the record without those 2 s (psd and check)", async () => {
    const fs = 2048;
    const x = settlingStart(
      onGravity(shapedRecord((f) => (f >= 10 && f <= 800 ? 0.002 : 0), fs, 1 << 15, 41)),
      fs,
      2,
      3,
    );
    const full = writeFloatWav(dir, "settling.wav", [x], fs);
    const tail = writeFloatWav(dir, "settled.wav", [x.subarray(2 * fs)], fs);
    const a = await analyzeRecording(full, { segmentLength: 1024, fromS: 2 });
    const b = await analyzeRecording(tail, { segmentLength: 1024 });
    expect(a.window).toMatchObject({ fromS: 2, toS: 16, frames: 14 * fs });
    expect(Array.from(a.channels[0]!.psd.psd)).toEqual(Array.from(b.channels[0]!.psd.psd));
    expect(a.channels[0]!.stats.mean).toBeCloseTo(1, 2); // gravity stays; the settling offset is cut
  });

  it("respond's exposure is the window's length, not the file's", async () => {
    const s = await loadSpectrumSource("samples/kb210-run.wav", { fromS: 5, toS: 15 });
    expect(s.durationS).toBe(10);
    expect(s.window).toEqual({ fromS: 5, toS: 15, durationS: 10, whole: false });
    const r = responseSpectra(s, { fnHz: Float64Array.of(100), q: 10 });
    expect(r.durationS).toBe(10);
  });

  it("transfer honours --from/--to: the window gives exactly the spectra of a file cut to it", async () => {
    const fs = 2048;
    const base = gaussian(1 << 15, 51);
    const tip = base.map((v, i) => 0.5 * v + 0.3 * (i > 0 ? base[i - 1]! : 0));
    const full = writeFloatWav(dir, "pair.wav", [base, tip], fs);
    const cut = writeFloatWav(dir, "pair-cut.wav", [base.subarray(3 * fs, 11 * fs), tip.subarray(3 * fs, 11 * fs)], fs);
    const a = await analyzeTransfer(full, {
      inputChannel: "1",
      outputChannels: ["2"],
      segmentLength: 1024,
      fromS: 3,
      toS: 11,
    });
    const b = await analyzeTransfer(cut, { inputChannel: "1", outputChannels: ["2"], segmentLength: 1024 });
    const whole = await analyzeTransfer(full, { inputChannel: "1", outputChannels: ["2"], segmentLength: 1024 });
    expect(a.window).toEqual({ fromS: 3, toS: 11, durationS: 8, frames: 8 * fs });
    expect(a.averages).toBe(b.averages);
    expect(a.averages).toBeLessThan(whole.averages);
    expect(Array.from(a.outputs[0]!.coherence)).toEqual(Array.from(b.outputs[0]!.coherence));
    expect(Array.from(a.reference.psd)).toEqual(Array.from(b.reference.psd));
    const empty = await inputError(
      analyzeTransfer(full, { inputChannel: "1", outputChannels: ["2"], segmentLength: 1024, fromS: 30 }),
    );
    expect(empty.code).toBe("WINDOW_EMPTY");
  });

  it("transfer refuses a segment whose spectra exceed the memory limit before it reads a byte", async () => {
    let read = 0;
    const e = await inputError(
      analyzeTransfer("samples/quarry-bend-bracket.csv", {
        inputChannel: "base",
        outputChannels: ["tip", "clamp"],
        segmentLength: 1 << 21,
        onProgress: (b) => (read = b),
      }),
    );
    expect(e.code).toBe("ANALYSIS_TOO_LARGE");
    expect(e.message).toContain("received 5 spectra x 2097152");
    expect(read).toBe(0);
  });
});

describe("a rate from rounded time stamps snaps to the round rate they cannot tell apart", () => {
  // The rule (src/read/roundRate.ts, README "Time"): the fewest significant digits inside rate x q / span.
  it("roundRate: a round rate inside the margin, a round period, or the estimate unchanged", () => {
    expect(roundRate(5120.0000195, 1.3e-4)).toBe(5120);
    expect(roundRate(204.80003, 1e-3)).toBe(204.8);
    expect(roundRate(1 / 0.0003 + 1e-5, 1e-3)).toBe(1 / 0.0003);
    expect(roundRate(5119.93, 1e-4)).toBe(5119.93);
    expect(roundRate(5119.9300123, 1e-5)).toBe(5119.9300123);
    // Stamps too coarse to pin the rate to 0.1 %: a whole-Hz rate only (never 5000 for 5120).
    expect(roundRate(5121.3, 20)).toBe(5121);
    expect(roundRate(5121.3, 0.2)).toBe(5121.3);
    // A whole-Hz rate before a round period: 1652 Hz, not 1 / 0.000605 s = 1652.89 Hz, when both lie inside.
    expect(roundRate(1652.4, 0.9)).toBe(1652);
  });

  const fs = 5120;
  const x = shapedRecord((f) => (f >= 20 && f <= 2000 ? 0.01 : 0), fs, 1 << 15, 61);
  const wav = writeFloatWav(dir, "kb.wav", [x], fs);
  // The WAV of the same samples, checked once: the reference every stamp format is held to.
  const kb210 = loadProfile("samples/profiles/kb210-controller.json");
  const wavCheck = kb210.then((p) => checkRecording(wav, p, { histogram: false }));
  const formats: [string, "s" | "ms", StampFormat][] = [
    ["ms %.6f", "ms", { fixed: 6 }],
    ["ms %.4f", "ms", { fixed: 4 }],
    ["ms %.3f", "ms", { fixed: 3 }],
    ["s %.6g", "s", { significant: 6 }],
  ];
  it.each(formats)(
    "stamps in %s at 5120 Hz: exactly 5120 Hz, the WAV's 2048-point segment for 2.5 Hz lines, the WAV's PSD and verdict",
    async (label, unit, format) => {
      const csv = writeStampedCsv(dir, `kb-${label.replace(/\W+/g, "_")}.csv`, {
        channels: [{ name: "a", unit: "g", samples: x }],
        sampleRateHz: fs,
        timeUnit: unit,
        format,
      });
      const a = await analyzeRecording(csv, { resolutionHz: 2.5 });
      const b = (await wavCheck).analysis;
      expect(a.input.sampleRateHz).toBe(5120);
      expect(a.analysis.reading.designRateHz).toBe(5120);
      expect(a.settings.segmentLength).toBe(2048);
      expect(a.channels[0]!.psd.dof).toBe(b.channels[0]!.psd.dof);
      expect(Array.from(a.channels[0]!.psd.psd)).toEqual(Array.from(b.channels[0]!.psd.psd));
      const c = await checkRecording(csv, await kb210, { histogram: false });
      const w = await wavCheck;
      expect(w.analysis.settings.segmentLength).toBe(2048);
      expect(c.verdict).toBe(w.verdict);
      expect(c.channels[0]!.dof.achieved).toBe(w.channels[0]!.dof.achieved);
    },
  );

  it("a phone at 128 Hz with whole-millisecond epoch stamps (7.8125 ms steps printed 8, 16, 23, …) and gravity on z: 128 Hz and 256-point segments for 0.5 Hz lines", async () => {
    const n = 128 * 60;
    const x = gaussian(n, 64, 0.3);
    const file = join(dir, "phone.csv");
    const rows = ["timestamp_ms,ax,ay,az"];
    for (let i = 0; i < n; i++)
      rows.push(
        `${Math.round(1700000000000 + (i * 1000) / 128)},${x[i]!.toFixed(4)},${(0.5 * x[(i + 7) % n]!).toFixed(4)},${(9.81 + x[(i + 13) % n]!).toFixed(4)}`,
      );
    writeFileSync(file, rows.join("\n") + "\n");
    // `timestamp_ms` is found as the time column, in ms, without options (a phone app's header).
    const a = await analyzeRecording(file, { inputUnits: "m/s2", resolutionHz: 0.5 });
    expect(a.analysis.reading.dialect).toMatchObject({ timeColumn: "timestamp_ms", timeUnitS: 0.001 });
    expect(a.input.sampleRateHz).toBe(128);
    expect(a.settings.segmentLength).toBe(256);
    expect(a.channels[2]!.stats.mean).toBeCloseTo(9.81, 1);
  });

  it("ISO 8601 date-time stamps with milliseconds at 512 Hz (a DAQ's export): exactly 512 Hz, 1024-point segments for 0.5 Hz lines, and --from as a clock time", async () => {
    const n = 512 * 20;
    const x = gaussian(n, 65);
    const stamp = (i: number) => {
      const ms = Math.round((14 * 3600 + 3 * 60 + 7.5 + i / 512) * 1000);
      const p = (v: number, w = 2) => String(v).padStart(w, "0");
      return `2024-05-17T${p(Math.floor(ms / 3600000))}:${p(Math.floor(ms / 60000) % 60)}:${p(Math.floor(ms / 1000) % 60)}.${p(ms % 1000, 3)}Z`;
    };
    const file = join(dir, "daq-iso.csv");
    writeFileSync(file, ["time,z [g]", ...Array.from(x, (v, i) => `${stamp(i)},${v}`)].join("\n") + "\n");
    const a = await analyzeRecording(file, { resolutionHz: 0.5, fromClock: "14:03:10.5Z" });
    expect(a.analysis.reading.designRateHz).toBe(512);
    expect(a.input.sampleRateHz).toBe(512);
    expect(a.settings.segmentLength).toBe(1024);
    expect(a.window.fromS).toBe(3);
    expect(a.window.frames).toBe(n - 3 * 512);
    // A time of day alone on stamps with a zone is UTC, as the error's own example writes it; --to in exponent form.
    const b = await analyzeRecording(file, { resolutionHz: 0.5, fromClock: "14:03:10.5" });
    expect(b.window.fromS).toBe(3);
    const c = await cli("psd", file, "--from", "14:03:10.5", "--to", "1e9", "--json", "-q");
    expect(c.code, c.stderr).toBe(0);
    expect(JSON.parse(c.stdout).input.window).toMatchObject({ fromS: 3, toS: 20, requestedToS: 1e9 });
  });

  it("`elapsed_s` and `seconds_elapsed` headers are time columns in s; `ax_s` is not", async () => {
    for (const [name, isTime] of [
      ["elapsed_s", true],
      ["seconds_elapsed", true],
      ["ax_s", false],
    ] as const) {
      const file = join(dir, `${name}.csv`);
      writeFileSync(
        file,
        [`${name},az`, ...Array.from({ length: 600 }, (_, i) => `${(i / 200).toFixed(3)},${i % 7}`)].join("\n") + "\n",
      );
      if (isTime) expect((await analyzeRecording(file, { spectrum: false })).input.sampleRateHz).toBe(200);
      else expect((await inputError(analyzeRecording(file, { spectrum: false }))).code).toBe("CSV_NO_RATE");
    }
  });

  it("a logger at a 300 us period (stamps %.3f ms) gets 1 / 0.0003 s, its round period", async () => {
    const csv = writeStampedCsv(dir, "period.csv", {
      channels: [{ name: "a", samples: gaussian(8192, 62) }],
      sampleRateHz: 1 / 0.0003,
      timeUnit: "ms",
      format: { fixed: 3 },
    });
    const a = await analyzeRecording(csv, { segmentLength: 1024 });
    expect(a.input.sampleRateHz).toBe(1 / 0.0003);
  });

  it("a rate that stays non-round (a clock 14 ppm slow, stamps %.6f s) is kept and printed in full", async () => {
    const rate = 5120 * (1 - 14e-6);
    const csv = writeStampedCsv(dir, "slow.csv", {
      channels: [{ name: "a", samples: gaussian(1 << 15, 63) }],
      sampleRateHz: rate,
      timeUnit: "s",
      format: { fixed: 6 },
      startS: 1234.5,
    });
    const r = await cli("psd", csv, "--json");
    const got = JSON.parse(r.stdout).input.sampleRateHz as number;
    expect(Math.abs(got / rate - 1)).toBeLessThan(1e-7);
    expect(Number(got.toPrecision(6))).not.toBe(got);
    const text = (await cli("psd", csv)).stdout;
    expect(text).toContain(`samples at ${String(got)} Hz`);
  });

  it("derive on three 1024 Hz CSVs printed three ways (%.3f ms, %.6g s, %.4f s from 3600 s) is no longer RECORDINGS_UNLIKE: 1 Hz lines on each", async () => {
    const files = (
      [
        [{ fixed: 3 }, "ms", 0],
        [{ significant: 6 }, "s", 0],
        [{ fixed: 4 }, "s", 3600.125],
      ] as [StampFormat, "s" | "ms", number][]
    ).map(([format, unit, startS], i) =>
      writeStampedCsv(dir, `road-${i}.csv`, {
        channels: [
          {
            name: "z",
            unit: "g",
            samples: shapedRecord((f) => (f >= 2 && f <= 400 ? 0.004 * (i + 1) : 0), 1024, 1 << 15, 70 + i),
          },
        ],
        sampleRateHz: 1024,
        timeUnit: unit,
        format,
        startS,
      }),
    );
    const r = await deriveProfile({
      ...plainInputs(files, 100 * 3600),
      testDurationS: 3600,
      fminHz: 5,
      fmaxHz: 300,
      version: "test",
      created: new Date(0),
    });
    expect(r.recordings.map((x) => x.sampleRateHz)).toEqual([1024, 1024, 1024]);
    expect(r.document.resolutionHz).toBe(1);
  });

  it("printStamp prints as C's printf does for these formats", () => {
    expect(printStamp(0.1953125, { fixed: 3 })).toBe("0.195");
    expect(printStamp(39.9998046875, { significant: 6 })).toBe("39.9998");
    expect(printStamp(0.5, { significant: 6 })).toBe("0.5");
  });
});

describe("units rows", () => {
  it("`ms,gee` is UNIT_UNKNOWN at line 2, column 2, naming the text, with or without --rate; never read as g", async () => {
    const x = gaussian(4096, 81);
    const file = join(dir, "gee.csv");
    writeFileSync(
      file,
      ["time,accel", "ms,gee", ...Array.from(x, (v, i) => `${printStamp((i * 1000) / 1024, { fixed: 3 })},${v}`)].join(
        "\n",
      ) + "\n",
    );
    for (const extra of [[], ["--rate", "1024"]]) {
      const r = await cli("psd", file, ...extra);
      expect(r.code).toBe(2);
      expect(r.stdout).toBe("");
      expect(r.stderr.trim().split("\n")).toHaveLength(1);
      expect(r.stderr).toMatch(
        /gee\.csv:2:2 \(accel\): expected an acceleration unit .* received "gee" \[UNIT_UNKNOWN\]/,
      );
    }
  });

  it("a header `sec,ch1` under a logger's preamble line stays a header (its `sec` is the time column), not a units row", async () => {
    const file = join(dir, "preamble.csv");
    writeFileSync(
      file,
      [
        "Device,KX9",
        "sec,ch1",
        ...Array.from({ length: 2048 }, (_, i) => `${(i / 1000).toFixed(3)},${Math.sin(i)}`),
      ].join("\n") + "\n",
    );
    const a = await analyzeRecording(file, { segmentLength: 256 });
    expect(a.analysis.reading.dialect).toMatchObject({ timeColumn: "sec", unitsRow: false, preambleLines: 1 });
    expect(a.input.sampleRateHz).toBe(1000);
    expect(a.channels.map((c) => c.name)).toEqual(["ch1"]);
  });

  it("an m/s2 column beside an unknown one is read in m/s2 when only it is chosen", async () => {
    const file = join(dir, "mixed.csv");
    writeFileSync(
      file,
      [
        "time,x,y",
        "s,gee,m/s2",
        ...Array.from(
          { length: 2048 },
          (_, i) => `${(i / 1024).toFixed(6)},1,${8.5 * Math.SQRT2 * Math.sin((2 * Math.PI * 50 * i) / 1024)}`,
        ),
      ].join("\n") + "\n",
    );
    const a = await analyzeRecording(file, { channels: ["y"], segmentLength: 1024 });
    expect(a.channels[0]!.units).toBe("m/s2");
    expect(a.channels[0]!.stats.rms).toBeCloseTo(8.5, 3);
    expect((await inputError(analyzeRecording(file, { segmentLength: 1024 }))).code).toBe("UNIT_UNKNOWN");
  });

  it("a units row with every unit psdgate knows reads each column in its own unit (exact factors: NIST SP 811, g_n = 9.80665)", async () => {
    const units: [string, number, "g" | "m/s2"][] = [
      ["g", 1, "g"],
      ["mg", 1e-3, "g"],
      ["ug", 1e-6, "g"],
      ["µg", 1e-6, "g"],
      ["m/s2", 1, "m/s2"],
      ["m/s^2", 1, "m/s2"],
      ["m/s**2", 1, "m/s2"],
      ["m/s²", 1, "m/s2"],
      ["mm/s2", 1e-3, "m/s2"],
      ["cm/s2", 1e-2, "m/s2"],
      ["in/s2", 0.0254, "m/s2"],
      ["ft/s2", 0.3048, "m/s2"], // NIST SP 811, Appendix B
    ];
    const file = join(dir, "units.csv");
    const rows = ["time," + units.map((_, i) => `a${i}`).join(","), "s," + units.map((u) => u[0]).join(",")];
    for (let i = 0; i < 1024; i++) rows.push(`${(i / 512).toFixed(6)},${units.map(() => (i % 2 ? 3 : 1)).join(",")}`);
    writeFileSync(file, rows.join("\n") + "\n");
    const a = await analyzeRecording(file, { spectrum: false });
    expect(a.analysis.reading.dialect?.unitsRow).toBe(true);
    units.forEach(([, factor, base], c) => {
      expect(a.channels[c]!.units).toBe(base);
      expect(a.channels[c]!.reading.unitFrom).toBe("header");
      expect(a.channels[c]!.stats.mean).toBeCloseTo(2 * factor, 12);
    });
  });
});

describe("integer WAVs with and without calibration", () => {
  const fs = 2048;
  const x = shapedRecord((f) => (f >= 10 && f <= 900 ? 0.02 : 0), fs, 1 << 14, 91);
  const bare = writeInt16Wav(dir, "bare.wav", [x], fs, 16);
  const calibrated = writeInt16Wav(dir, "cal.wav", [x], fs, 16, { unit: "g", scale: 16 });
  const line = `  reading    "ch1": integer WAV codes with no calibration, read as ±1 g full scale (no calibration chunk, --scale or --sensitivity); --scale K reads K g per full scale`;

  it("without calibration: read as ±1 g full scale (RMS 1/16 of the calibrated one), said on the terminal of psd, check, inspect, transfer and respond", async () => {
    const a = await analyzeRecording(bare, { segmentLength: 1024 });
    const b = await analyzeRecording(calibrated, { segmentLength: 1024 });
    expect(a.channels[0]!.reading.fullScaleAssumed).toBe(true);
    expect(b.channels[0]!.reading.fullScaleAssumed).toBe(false);
    expect(a.channels[0]!.stats.rms * 16).toBeCloseTo(b.channels[0]!.stats.rms, 12);
    for (const argv of [
      ["psd", bare],
      ["inspect", bare],
      ["check", bare, "-p", "samples/profiles/kb210-controller.json"],
      ["respond", bare, "--fn", "20:200", "--q", "10"],
    ]) {
      expect((await cli(...argv)).stdout).toContain(line);
    }
    const two = writeInt16Wav(dir, "bare2.wav", [x, x.map((v) => 0.5 * v)], fs, 16);
    expect((await cli("transfer", two, "--in", "1", "--output-channel", "2", "--segment", "1024")).stdout).toContain(
      `  reading    "ch1", "ch2": integer WAV codes with no calibration, read as ±1 g full scale`,
    );
  });

  it("a batch of several recordings says it under its summary table, for the uncalibrated file only", async () => {
    for (const cmd of [["psd"], ["check", "-p", "samples/profiles/kb210-controller.json"]]) {
      const out = (await cli(cmd[0]!, bare, calibrated, ...cmd.slice(1))).stdout;
      expect(out).toContain(
        `  reading    ${bare}: "ch1": integer WAV codes with no calibration, read as ±1 g full scale`,
      );
      expect(out).not.toContain(`${calibrated}: "ch1"`);
    }
  });

  it("with a calibration chunk, --scale or a float WAV: no such line", async () => {
    expect((await cli("psd", calibrated)).stdout).not.toContain("  reading ");
    expect((await cli("psd", bare, "--scale", "16")).stdout).not.toContain("  reading ");
    expect((await cli("psd", writeFloatWav(dir, "float.wav", [x], fs))).stdout).not.toContain("  reading ");
  });

  it("a sensitivity alone: the codes are still read as ±1 V full scale, said so (a ±10 V recorder would read 20 dB low)", async () => {
    const r = await cli("psd", bare, "--sensitivity", "100mV/g", "--json");
    const j = JSON.parse(r.stdout);
    expect(j.channels[0].reading.fullScaleAssumed).toBe(true);
    expect(j.channels[0].reading.fileUnit).toBe("V");
    expect((await cli("psd", bare, "--sensitivity", "100mV/g")).stdout).toContain(
      `  reading    "ch1": integer WAV codes with no calibration, read as ±1 V full scale (no calibration chunk or --scale; the sensitivity turns volts into acceleration, not codes into volts); --scale K reads K V per full scale`,
    );
    // With the recorder's full scale given as well, nothing is assumed.
    const k = JSON.parse((await cli("psd", bare, "--sensitivity", "100mV/g", "--scale", "10", "--json")).stdout);
    expect(k.channels[0].reading.fullScaleAssumed).toBe(false);
  });

  it("the JSON says it per channel (reading.fullScaleAssumed)", async () => {
    const j = JSON.parse((await cli("psd", bare, "--json")).stdout);
    expect(j.channels[0].reading.fullScaleAssumed).toBe(true);
  });
});

describe("a profile is judged on the window of a record that holds the whole test elsewhere", () => {
  it("a 16 s record against a 15 s profile: the whole record meets the duration, --from 4 does not", async () => {
    const fs = 2048;
    const profile = parseProfile(
      JSON.stringify({
        title: "flat",
        units: "g2/Hz",
        points: [
          { hz: 20, level: 0.01 },
          { hz: 800, level: 0.01 },
        ],
        durationS: 15,
        resolutionHz: 4,
        tolerance: { bands: [{ fromHz: 20, toHz: 800, upperDb: 3, lowerDb: 3 }], rmsDb: 1 },
      }),
      "flat.json",
    );
    const file = writeFloatWav(
      dir,
      "sixteen.wav",
      [shapedRecord((f) => (f >= 20 && f <= 800 ? 0.01 : 0), fs, 1 << 15, 95)],
      fs,
    );
    const codes = async (o: { fromS?: number }) =>
      (await checkRecording(file, profile, { histogram: false, ...o })).channels[0]!.findings.map((f) => f.code);
    expect(await codes({})).not.toContain("DURATION_SHORT");
    expect(await codes({ fromS: 4 })).toContain("DURATION_SHORT");
  });
});
