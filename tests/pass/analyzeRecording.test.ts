import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import {
  analyzeRecording,
  analyzeSource,
  clippingHintCount,
  type PassAccumulator,
} from "../../src/pass/analyzeRecording.js";
import type { TimeHistorySource } from "../../src/read/timeHistory.js";
import { cli, gaussian, maxRelDiff, tempDir } from "../helpers.js";
import { wavBytes } from "../wavBytes.js";
import { findingText, findingTexts } from "../../src/report/findingTexts.js";

const dir = tempDir();

describe("clipping hint", () => {
  it("needs at least 3 samples, and at least 2e-5 of the record, at an extreme (common practice)", () => {
    expect(clippingHintCount(1000)).toBe(3);
    expect(clippingHintCount(1_000_000)).toBe(20);
  });
  it("a quiet 16-bit recording (sigma = 2 LSB) is not flagged, though its top code repeats", async () => {
    const x = gaussian(400_000, 8, 2).map(Math.round);
    const f = join(dir, "quiet.wav");
    writeFileSync(f, wavBytes({ bits: 16, channels: 1, samples: Array.from(x) }));
    const a = await analyzeRecording(f, { segmentLength: 1024 });
    expect(a.channels[0]!.stats.atMax).toBeGreaterThan(0);
    expect(findingTexts(a.channels[0]!.doubts).filter((d) => d.includes("clipping"))).toEqual([]);
  });
  it("a record near the quantisation step (16-bit, sigma = 0.4 LSB: 45 samples expected in the top code) is not flagged; sigma = 3 LSB cut at 4 LSB is", async () => {
    // Expected in the top code 2 LSB: n Q((2 - 0.5) / 0.4) = 512000 x 8.84e-5 = 45 (scipy.stats.norm.sf(3.75)).
    const x = gaussian(512_000, 41, 0.4).map(Math.round);
    const f = join(dir, "floor.wav");
    writeFileSync(f, wavBytes({ bits: 16, channels: 1, samples: Array.from(x) }));
    const a = await analyzeRecording(f, { segmentLength: 1024, scale: 10 });
    expect(a.channels[0]!.stats.atMax).toBeGreaterThanOrEqual(clippingHintCount(512_000));
    expect(a.channels[0]!.doubts.map((d) => d.code)).not.toContain("CLIPPING");
    const cut = join(dir, "floor-cut.wav");
    const y = gaussian(512_000, 42, 3).map((v) => Math.max(-4, Math.min(4, Math.round(v))));
    writeFileSync(cut, wavBytes({ bits: 16, channels: 1, samples: Array.from(y) }));
    const b = await analyzeRecording(cut, { segmentLength: 1024, scale: 10 });
    expect(b.channels[0]!.doubts.map((d) => d.code)).toContain("CLIPPING");
  });
  it("a recording clipped at 4 sigma is flagged (Gaussian tail beyond 4 sigma: 6.3e-5, docs/REFERENCES.md sec. 10)", async () => {
    const x = gaussian(400_000, 9, 3000).map((v) => Math.round(Math.max(-12000, Math.min(12000, v))));
    const f = join(dir, "clipped.wav");
    writeFileSync(f, wavBytes({ bits: 16, channels: 1, samples: Array.from(x) }));
    const a = await analyzeRecording(f, { segmentLength: 1024 });
    expect(a.channels[0]!.stats.atMax).toBeGreaterThanOrEqual(clippingHintCount(400_000));
    expect(findingTexts(a.channels[0]!.doubts).join()).toContain("possible clipping");
  });
});

describe("kurtosis above 3 near the quantisation step", () => {
  // A Gaussian rounded to whole codes at sigma 0.3 LSB has kurtosis about 10.5 (the codes' exact probabilities,
  // scipy.stats.norm.cdf over +-0.5 LSB bins): not Gaussian by construction, so "shocks" would be the wrong word.
  it("a quiet 16-bit record (sigma 0.3 LSB) gets KURTOSIS_QUANTISED naming the step, not KURTOSIS_HIGH's shocks", async () => {
    const x = gaussian(400_000, 51, 0.3).map(Math.round);
    const f = join(dir, "quantised.wav");
    writeFileSync(f, wavBytes({ bits: 16, channels: 1, samples: Array.from(x) }));
    const a = await analyzeRecording(f, { segmentLength: 1024, scale: 10 });
    const notes = a.channels[0]!.notes;
    expect(notes.map((n) => n.code)).not.toContain("KURTOSIS_HIGH");
    expect(notes.map((n) => n.code)).not.toContain("CREST_HIGH");
    const q = notes.find((n) => n.code === "KURTOSIS_QUANTISED")!;
    expect(q.values.quantum).toBeCloseTo(10 / 32768, 12);
    expect(findingText(q)).toMatch(/quantisation step/);
    expect(findingText(q)).not.toMatch(/shocks, impacts/);
  });
  it("a 16-bit record far above the step (sigma 300 LSB) with real shocks keeps KURTOSIS_HIGH", async () => {
    const x = gaussian(400_000, 52, 300);
    for (let i = 5000; i < x.length; i += 20_000)
      for (let k = 0; k < 40; k++) x[i + k] = 6000 * Math.exp(-k / 8) * Math.cos(k);
    const f = join(dir, "shocks.wav");
    writeFileSync(f, wavBytes({ bits: 16, channels: 1, samples: Array.from(x, Math.round) }));
    const a = await analyzeRecording(f, { segmentLength: 1024 });
    const codes = a.channels[0]!.notes.map((n) => n.code);
    expect(codes).toContain("KURTOSIS_HIGH");
    expect(codes).not.toContain("KURTOSIS_QUANTISED");
  });
});

describe("a dead channel (every sample the one value)", () => {
  it("is one NO_SIGNAL doubt, not clipping at 0 and a Parseval ratio of NaN; the live channel beside it is untouched", async () => {
    const x = gaussian(1 << 15, 31, 0.3);
    const f = join(dir, "dead.wav");
    const samples: number[] = [];
    for (const v of x) samples.push(v, 0);
    writeFileSync(f, wavBytes({ tag: 3, bits: 32, channels: 2, sampleRate: 25600, samples }));
    for (const spectrum of [true, false]) {
      const a = await analyzeRecording(f, { segmentLength: 1024, spectrum });
      expect(a.channels[0]!.doubts).toEqual([]);
      expect(a.channels[1]!.doubts.map((d) => d.code)).toEqual(["NO_SIGNAL"]);
      expect(a.channels[1]!.doubts[0]!.values).toEqual({ samples: 1 << 15, value: 0 });
    }
  });
});

describe("inspect", () => {
  it("reports statistics without any PSD finding, even for a record shorter than a segment", async () => {
    const r = await cli("inspect", "tests/bad-inputs/cases/jitter-small.csv");
    expect(r.code).toBe(0);
    expect(r.stdout).toContain("64 samples at 100 Hz");
    expect(r.stdout).not.toMatch(/segment|Parseval/);
  });
});

describe("analyzeRecording: logger exports give the plain CSV's PSD (within 1e-12)", () => {
  const n = 8192;
  const x = gaussian(n, 31, 0.7);
  const plainFile = join(dir, "plain-g.csv");
  writeFileSync(plainFile, "time,ax\n" + Array.from(x, (v, i) => `${(i / 1024).toFixed(6)},${v}`).join("\n") + "\n");
  const opts = { segmentLength: 1024 };
  async function expectSamePsd(file: string, o: Parameters<typeof analyzeRecording>[1] = {}, factor = 1) {
    const a = await analyzeRecording(plainFile, opts);
    const b = await analyzeRecording(file, { ...opts, ...o });
    expect(b.input.sampleRateHz).toBe(a.input.sampleRateHz);
    expect(b.input.samples).toBe(n);
    const pa = a.channels[0]!.psd.psd;
    const pb = b.channels[0]!.psd.psd;
    expect(
      maxRelDiff(
        pb.map((v) => v / factor),
        pa,
      ),
    ).toBeLessThanOrEqual(1e-12);
    return b;
  }
  const write = (name: string, head: string, cell: (v: number, i: number) => string) => {
    const f = join(dir, name);
    writeFileSync(f, head + "\n" + Array.from(x, (v, i) => cell(v, i)).join("\n") + "\n");
    return f;
  };
  it("a header in mg is read as g (factor 1e-3) and the reading is recorded", async () => {
    const b = await expectSamePsd(write("mg.csv", "time,ax [mg]", (v, i) => `${(i / 1024).toFixed(6)},${v * 1000}`));
    expect(b.channels[0]!.units).toBe("g");
    expect(b.channels[0]!.reading).toMatchObject({ fileUnit: "mg", unitFrom: "header", factor: 1e-3 });
  });
  it("a header in µg, and --units mg for a file that says nothing", async () => {
    await expectSamePsd(write("ug.csv", "time,ax (µg)", (v, i) => `${(i / 1024).toFixed(6)},${v * 1e6}`));
    await expectSamePsd(
      write("mg-opt.csv", "time,ax", (v, i) => `${(i / 1024).toFixed(6)},${v * 1000}`),
      { inputUnits: "mg" },
    );
  });
  it("headers in mm/s^2, cm/s², in/s**2, ft s-2 and ms^-2 read as m/s^2 and give the g PSD times g_n^2 (SI Brochure 9th ed.)", async () => {
    const gn = 9.80665;
    for (const [unit, k] of [
      ["mm/s^2", 1e-3],
      ["cm/s²", 1e-2],
      ["in/s**2", 0.0254],
      ["ft s-2", 0.3048],
      ["ms^-2", 1],
    ] as const) {
      const b = await expectSamePsd(
        write(`u${k}.csv`, `time,ax [${unit}]`, (v, i) => `${(i / 1024).toFixed(6)},${(v * gn) / k}`),
        {},
        gn * gn,
      );
      expect(b.channels[0]!.units, unit).toBe("m/s2");
    }
  });
  it("a channel in mV with --sensitivity 100mV/g, and one in V with 500mV/g for every channel", async () => {
    await expectSamePsd(
      write("mv.csv", "time,ax [mV]", (v, i) => `${(i / 1024).toFixed(6)},${v * 100}`),
      { sensitivities: [{ channel: "ax", value: "100mV/g" }] },
    );
    const b = await expectSamePsd(
      write("v.csv", "time,ax [V]", (v, i) => `${(i / 1024).toFixed(6)},${v * 0.5}`),
      { sensitivities: [{ value: "500mV/g" }] },
    );
    expect(b.channels[0]!.reading).toMatchObject({ fileUnit: "V", unitFrom: "sensitivity", sensitivity: "500mV/g" });
  });
  it("per-channel --scale ax=K", async () => {
    await expectSamePsd(
      write("scaled.csv", "time,ax", (v, i) => `${(i / 1024).toFixed(6)},${v / 4}`),
      { channelScales: [{ channel: "ax", value: 4 }] },
    );
  });
});

describe("analyzeRecording: time stamps and export quirks give the plain CSV's PSD (within 1e-12)", () => {
  const n = 8192;
  const x = gaussian(n, 32, 0.4);
  const plainFile = join(dir, "plain-t.csv");
  writeFileSync(
    plainFile,
    "time,ax,ay\n" + Array.from(x, (v, i) => `${(i / 1024).toFixed(6)},${v},${-v}`).join("\n") + "\n",
  );
  const opts = { segmentLength: 1024 };
  async function expectSamePsd(file: string, o: Parameters<typeof analyzeRecording>[1] = {}) {
    const a = await analyzeRecording(plainFile, opts);
    const b = await analyzeRecording(file, { ...opts, ...o });
    expect(b.input.sampleRateHz).toBe(1024);
    expect(b.input.samples).toBe(n);
    expect(maxRelDiff(b.channels[0]!.psd.psd, a.channels[0]!.psd.psd)).toBeLessThanOrEqual(1e-12);
    return b;
  }
  const write = (name: string, text: string) => {
    const f = join(dir, name);
    writeFileSync(f, text);
    return f;
  };
  const rows = (stamp: (i: number) => string, sep = ",", end = "") =>
    Array.from(x, (v, i) => `${stamp(i)}${sep}${v}${sep}${-v}${end}`).join("\n") + "\n";
  /** Microseconds since the start, as a date-time stamp from 2024-05-17 14:03:00. */
  const iso = (i: number, t: string, zone: string) => {
    const us = Math.round((i * 1e6) / 1024);
    const s = Math.floor(us / 1e6);
    return `2024-05-17${t}14:${String(3 + Math.floor(s / 60)).padStart(2, "0")}:${String(s % 60).padStart(2, "0")}.${String(us % 1e6).padStart(6, "0")}${zone}`;
  };

  it("scientific-notation stamps (%.6e, as numpy.savetxt writes them): the resolution comes from the digits and the exponent", async () => {
    await expectSamePsd(
      write("sci-t.csv", "time,ax,ay\n" + rows((i) => (i / 1024).toExponential(6).replace(/e([+-])(\d)$/, "e$10$2"))),
    );
  });
  it("significant-digit stamps (%.6g, trailing zeros dropped)", async () => {
    await expectSamePsd(write("g6-t.csv", "time,ax,ay\n" + rows((i) => String(Number((i / 1024).toPrecision(6))))));
  });
  it("ISO 8601 stamps with T and Z: the rate from their differences, the start time in the results", async () => {
    const b = await expectSamePsd(write("iso-z.csv", "timestamp,ax,ay\n" + rows((i) => iso(i, "T", "Z"))));
    expect(b.input.startTime).toBe("2024-05-17T14:03:00.000000Z");
  });
  it("'YYYY-MM-DD hh:mm:ss.ffffff' stamps without a zone, semicolon-delimited; and with an offset (start time in UTC)", async () => {
    const b = await expectSamePsd(write("iso-space.csv", "Date/Time;ax;ay\n" + rows((i) => iso(i, " ", ""), ";")));
    expect(b.input.startTime).toBe("2024-05-17T14:03:00.000000");
    const c = await expectSamePsd(write("iso-offset.csv", "time,ax,ay\n" + rows((i) => iso(i, "T", "+02:00"))));
    expect(c.input.startTime).toBe("2024-05-17T12:03:00.000000Z");
  });
  it("a time column in milliseconds: --time-unit ms", async () => {
    await expectSamePsd(write("ms-t.csv", "Time,ax,ay\n" + rows((i) => ((i * 1000) / 1024).toFixed(6))), {
      csv: { timeUnit: "ms" },
    });
  });
  it("spreadsheet serial day numbers with --time-unit serial-days: the rate from their differences, the start time from 1899-12-30", async () => {
    // 45429.5 is 2024-05-17 12:00 in the 1900 date system (45292 = 2024-01-01, from memory; 137 days on).
    const b = await expectSamePsd(
      write("serial.csv", "Time,ax,ay\n" + rows((i) => (45429.5 + i / (1024 * 86400)).toFixed(10))),
      { csv: { timeUnit: "serial-days" } },
    );
    expect(b.input.startTime).toBe("2024-05-17T12:00:00.000000");
  });
  it("--no-time-column --rate with a date-time column: the column is neither read nor a channel", async () => {
    const b = await expectSamePsd(write("iso-ignored.csv", "stamp,ax,ay\n" + rows((i) => iso(i, " ", ""))), {
      csv: { timeColumn: false, sampleRateHz: 1024 },
    });
    expect(b.channels.map((c) => c.name)).toEqual(["ax", "ay"]);
    const c = await expectSamePsd(plainFile, { csv: { timeColumn: false, sampleRateHz: 1024 } });
    expect(c.channels.map((ch) => ch.name)).toEqual(["ax", "ay"]);
  });
  it("--rate that agrees with the time column is accepted", async () => {
    await expectSamePsd(plainFile, { csv: { sampleRateHz: 1024 } });
  });
  it("a trailing delimiter on every row (an empty last column) is ignored, with or without -c", async () => {
    const f = write("trailing.csv", "time,ax,ay,\n" + rows((i) => (i / 1024).toFixed(6), ",", ","));
    const b = await expectSamePsd(f);
    expect(b.channels.map((c) => c.name)).toEqual(["ax", "ay"]);
    expect(b.input.layout).toContain("empty last column ignored");
    await expectSamePsd(f, { channels: ["ax"] });
  });
  it("a units row under the header is read as units (s, mg, mg)", async () => {
    const b = await analyzeRecording(
      write(
        "units-row.csv",
        "time,ax,ay\ns,mg,mg\n" +
          Array.from(x, (v, i) => `${(i / 1024).toFixed(6)},${v * 1000},${-v * 1000}`).join("\n") +
          "\n",
      ),
      opts,
    );
    const a = await analyzeRecording(plainFile, opts);
    expect(b.channels[0]!.reading).toMatchObject({ fileUnit: "mg", unitFrom: "header" });
    expect(maxRelDiff(b.channels[0]!.psd.psd, a.channels[0]!.psd.psd)).toBeLessThanOrEqual(1e-12);
  });
  it("a preamble of metadata lines before the header is skipped, kept, and counted", async () => {
    const b = await expectSamePsd(
      write(
        "preamble.csv",
        "Logger LX-9 field export\nSerial: 0042-K\nChannels: ax, ay\ntime,ax,ay\n" + rows((i) => (i / 1024).toFixed(6)),
      ),
    );
    expect(b.input.preamble).toEqual(["Logger LX-9 field export", "Serial: 0042-K", "Channels: ax, ay"]);
    expect(b.input.layout).toContain("3 preamble lines before the header kept as metadata");
  });
  it("channels in %.6e, in %.6e with decimal commas, and integer counts read as the plain CSV of the same values", async () => {
    const e6 = (v: number) => v.toExponential(6).replace(/e([+-])(\d)$/, "e$10$2");
    const plain = write(
      "plain-e6.csv",
      "time,ax,ay\n" +
        Array.from(x, (v, i) => `${(i / 1024).toFixed(6)},${Number(e6(v))},${Number(e6(-v))}`).join("\n") +
        "\n",
    );
    const sci = write(
      "e6.csv",
      "time,ax,ay\n" + Array.from(x, (v, i) => `${(i / 1024).toFixed(6)},${e6(v)},${e6(-v)}`).join("\n") + "\n",
    );
    const comma = write(
      "e6-comma.csv",
      "time;ax;ay\n" +
        Array.from(x, (v, i) => `${(i / 1024).toFixed(6)};${e6(v)};${e6(-v)}`.replace(/\./g, ",")).join("\n") +
        "\n",
    );
    const a = await analyzeRecording(plain, opts);
    for (const f of [sci, comma]) {
      const b = await analyzeRecording(f, opts);
      expect(b.input.sampleRateHz).toBe(1024);
      expect(maxRelDiff(b.channels[0]!.psd.psd, a.channels[0]!.psd.psd)).toBeLessThanOrEqual(1e-12);
    }
    const counts = write(
      "counts.csv",
      "time,ax,ay\n" + Array.from(x, (v, i) => `${(i / 1024).toFixed(6)},${Math.round(v * 3000)},0`).join("\n") + "\n",
    );
    const countsPlain = write(
      "counts-plain.csv",
      "time,ax,ay\n" +
        Array.from(x, (v, i) => `${(i / 1024).toFixed(6)},${Math.round(v * 3000)}.0,0.0`).join("\n") +
        "\n",
    );
    expect(
      maxRelDiff(
        (await analyzeRecording(counts, opts)).channels[0]!.psd.psd,
        (await analyzeRecording(countsPlain, opts)).channels[0]!.psd.psd,
      ),
    ).toBeLessThanOrEqual(1e-12);
  });
  it("a 'sep=;' first line names the delimiter", async () => {
    const b = await expectSamePsd(write("sep.csv", "sep=;\ntime;ax;ay\n" + rows((i) => (i / 1024).toFixed(6), ";")));
    expect(b.input.layout).toContain("sep=");
  });
});

describe("analyzeSource: extra accumulators, the rate contract and the frame window", () => {
  /** A source made here: one channel of `x`, announcing `designHz` and finishing at `finalHz`. */
  function source(x: Float64Array, designHz: number, finalHz: number): TimeHistorySource {
    return {
      info: {
        file: "made.csv",
        format: "csv",
        sampleRateHz: designHz,
        channels: [{ name: "a" }],
        bytes: 0,
        layout: "test",
      },
      async read(_select, sink) {
        const b = new Float64Array(700);
        for (let i = 0; i < x.length; i += 700) {
          const n = Math.min(700, x.length - i);
          b.set(x.subarray(i, i + n));
          sink([b], n);
        }
        return { frames: x.length, sampleRateHz: finalHz, sha256: "", bytes: 0 };
      },
    };
  }
  class Counter implements PassAccumulator<{ design: number; final: number; frames: number; first: number }> {
    design = NaN;
    frames = 0;
    first = NaN;
    start(r: number) {
      this.design = r;
    }
    push(blocks: Float64Array[], frames: number) {
      if (this.frames === 0) this.first = blocks[0]![0]!;
      this.frames += frames;
    }
    finish(r: number) {
      return { design: this.design, final: r, frames: this.frames, first: this.first };
    }
  }
  it("an extra accumulator is told the design rate first, sees every conditioned block, and gets the final rate", async () => {
    const x = Float64Array.from({ length: 5000 }, (_, i) => i);
    const a = await analyzeSource(source(x, 100, 100), {
      segmentLength: 256,
      accumulators: [new Counter()],
      inputUnits: "g",
      resultUnits: "m/s2",
    });
    expect(a.extras[0]).toEqual({ design: 100, final: 100, frames: 5000, first: 0 });
    expect(a.passDoubts).toEqual([]);
  });
  it("a final rate other than the design rate is a doubt on the pass (the rate contract)", async () => {
    const a = await analyzeSource(source(new Float64Array(5000), 100, 100.5), {
      segmentLength: 256,
      accumulators: [new Counter()],
    });
    expect(findingTexts(a.passDoubts).join()).toMatch(/100\.5 Hz .* 100 Hz/);
  });
  it("--from/--to cut frames i with from <= i/fs < to, recorded in the window, for every accumulator alike", async () => {
    const x = Float64Array.from({ length: 5000 }, (_, i) => i);
    const a = await analyzeSource(source(x, 100, 100), {
      segmentLength: 256,
      fromS: 7.005,
      toS: 31,
      accumulators: [new Counter()],
    });
    const c = a.extras[0] as { frames: number; first: number };
    expect(c.first).toBe(701); // crosses a block boundary
    expect(c.frames).toBe(3100 - 701);
    expect(a.window).toEqual({ fromS: 7.01, toS: 31, frames: 2399 });
    expect(a.channels[0]!.stats.count).toBe(2399);
    expect(a.channels[0]!.stats.min).toBe(701);
  });
  it("a window past the end is an input error naming the option (the library key); toS past the end is kept with a note", async () => {
    await expect(
      analyzeSource(source(new Float64Array(5000), 100, 100), { segmentLength: 256, fromS: 60 }),
    ).rejects.toThrow(/option fromS.*WINDOW_EMPTY/);
    const a = await analyzeSource(source(new Float64Array(5000), 100, 100), { segmentLength: 256, toS: 80 });
    expect(a.window.toS).toBe(50);
    expect(findingTexts(a.channels[0]!.notes).join()).toContain("the window's end 80 s lies past the end");
  });
});

describe("psd says when a record fails the stationarity test", () => {
  it("a WAV of white noise (made here) with a +3 dB step halfway carries the note; the same noise without the step does not", async () => {
    const fs = 1000;
    const x = gaussian(60 * fs, 31);
    const f1 = join(dir, "steady.wav");
    writeFileSync(
      f1,
      wavBytes({ tag: 3, bits: 32, channels: 1, sampleRate: fs, samples: Array.from(x, (v) => v * 0.1) }),
    );
    const f2 = join(dir, "step.wav");
    writeFileSync(
      f2,
      wavBytes({
        tag: 3,
        bits: 32,
        channels: 1,
        sampleRate: fs,
        samples: Array.from(x, (v, i) => v * 0.1 * (i >= 30 * fs ? Math.SQRT2 : 1)),
      }),
    );
    const steady = await cli("psd", f1, "--segment", "1024");
    const step = await cli("psd", f2, "--segment", "1024", "--json");
    expect(steady.stdout).not.toContain("not stationary");
    const j = JSON.parse(step.stdout);
    expect(j.channels[0].stationarity.stationary).toBe(false);
    expect(j.channels[0].stationarity.stretches).toBe(60);
    expect(j.channels[0].warnings.join()).toMatch(/not stationary: reverse arrangements A = \d+ outside/);
    expect(j.input.window).toEqual({ fromS: 0, toS: 60, durationS: 60, frames: 60000 });
  });
});

describe("--from/--to on psd and check (CLI)", () => {
  it("psd and check record the window in their JSON and analyse only it", async () => {
    const p = JSON.parse((await cli("psd", "samples/tern7-flight.csv", "--from", "5", "--to", "15", "--json")).stdout);
    expect(p.input.window).toEqual({ fromS: 5, toS: 15, durationS: 10, frames: 40960 });
    expect(p.channels[0].stats.count).toBe(40960);
    const c = await cli(
      "check",
      "samples/tern7-flight.csv",
      "-p",
      "samples/profiles/tern7-gimbal.yaml",
      "--from",
      "5",
      "--json",
    );
    const j = JSON.parse(c.stdout);
    expect(j.input.window).toEqual({ fromS: 5, toS: 20, durationS: 15, frames: 61440 });
  });
});

describe("analyzeRecording with --from/--to as clock times (records with date-time stamps)", () => {
  const dir = tempDir();
  const iso = (i: number) => {
    const ms = 14 * 3600 * 1000 + 3 * 60 * 1000 + i; // 14:03:00.000 + i ms, at 1000 Hz
    const p2 = (n: number, w = 2) => String(n).padStart(w, "0");
    return `2024-05-17 ${p2(Math.floor(ms / 3600000))}:${p2(Math.floor(ms / 60000) % 60)}:${p2(Math.floor(ms / 1000) % 60)}.${p2(ms % 1000, 3)}`;
  };
  const x = gaussian(10000, 21);
  const file = join(dir, "stamped.csv");
  writeFileSync(file, ["time,az [g]", ...Array.from(x, (v, i) => `${iso(i)},${v}`)].join("\n"));
  it("a time of day and a full date-time select the same window as seconds from the first sample", async () => {
    const byClock = await analyzeRecording(file, {
      segmentLength: 256,
      fromClock: "14:03:02",
      toClock: "2024-05-17 14:03:05.5",
    });
    const bySeconds = await analyzeRecording(file, { segmentLength: 256, fromS: 2, toS: 5.5 });
    // The frame window is set at the head's provisional rate, so it lands within a sample of the time asked.
    expect(byClock.window.fromS).toBeCloseTo(2, 2);
    expect(byClock.window.toS).toBeCloseTo(5.5, 2);
    expect(byClock.window.fromS).toBe(bySeconds.window.fromS);
    expect(byClock.window.fromClock).toBe("14:03:02");
    expect(Array.from(byClock.channels[0]!.psd.psd)).toEqual(Array.from(bySeconds.channels[0]!.psd.psd));
  });
  it("a clock time before the first sample, in another zone form, or on a record without date-time stamps is an option error", async () => {
    await expect(analyzeRecording(file, { segmentLength: 256, fromClock: "14:02:59" })).rejects.toThrow(
      /option fromClock: expected a time at or after the first sample/,
    );
    await expect(analyzeRecording(file, { segmentLength: 256, fromClock: "2024-05-17T14:03:02Z" })).rejects.toThrow(
      /like the record's stamps \(without a zone\)/,
    );
    await expect(analyzeRecording("samples/kb210-run.wav", { fromClock: "14:03:02" })).rejects.toThrow(
      /a clock time needs a record with date-time stamps/,
    );
  });
});

describe("the resolved analysis is recorded whole in the result (issue #10)", () => {
  it("says how the CSV was read and with which settings; re-running from it alone gives the same PSD bit for bit", async () => {
    const dir = tempDir();
    const file = join(dir, "rec.csv");
    const x = gaussian(20000, 7);
    // A semicolon file with decimal commas and a time column in ms: the dialect must be found, not assumed.
    writeFileSync(
      file,
      "time [ms];az [mg];ay [mg]\n" +
        Array.from(
          x,
          (v, i) =>
            `${(i * 0.5).toFixed(1).replace(".", ",")};${(1000 * v).toFixed(3).replace(".", ",")};${(500 * v).toFixed(3).replace(".", ",")}`,
        ).join("\n") +
        "\n",
    );
    const a = await analyzeRecording(file, {
      channels: ["ay"],
      segmentLength: 1024,
      overlap: 0.25,
      detrend: "linear",
      fromS: 1,
      toS: 8,
    });
    const r = a.analysis;
    expect(r.reading.dialect).toMatchObject({
      delimiter: ";",
      decimal: ",",
      header: true,
      timeColumn: "time",
      timeUnitS: 0.001,
      rateFrom: "time column",
    });
    expect(r.channels).toEqual([expect.objectContaining({ name: "ay", position: 2, resultUnits: "g" })]);
    expect(r.channels[0]!.reading).toMatchObject({ fileUnit: "mg", unitFrom: "header", unitFactor: 0.001 });
    expect(r.welch).toMatchObject({
      window: "hann",
      segmentLength: 1024,
      overlap: 0.25,
      hop: 768,
      detrend: "linear",
      resolutionHz: 2000 / 1024,
    });
    expect(r.window).toEqual({ fromS: 1, toS: 8 });
    const again = await analyzeRecording(file, {
      csv: {
        delimiter: r.reading.dialect!.delimiter,
        decimal: r.reading.dialect!.decimal,
        timeColumn: r.reading.dialect!.timeColumn!,
        timeUnit: "ms",
      },
      channels: r.channels.map((c) => String(c.position)),
      window: r.welch.window,
      segmentLength: r.welch.segmentLength,
      overlap: r.welch.overlap,
      detrend: r.welch.detrend,
      confidence: r.welch.confidence,
      fromS: r.window.fromS,
      toS: r.window.toS,
    });
    expect(Array.from(again.channels[0]!.psd.psd)).toEqual(Array.from(a.channels[0]!.psd.psd));
    const json = JSON.parse((await cli("psd", file, "-c", "ay", "--json")).stdout) as { analysis: typeof r };
    expect(json.analysis.reading.dialect?.decimal).toBe(",");
  });
});

describe("sample-and-hold on the shared pass (psd, check and ride all read it)", () => {
  // A phone app logging a 50 Hz sensor at 200 Hz: every reading four times (and 2x: 100 Hz held to 200 Hz).
  const readings = gaussian(12000, 31, 0.2);
  for (const factor of [2, 4]) {
    it(`held ${factor}x: HELD_SAMPLES names the update rate ${200 / factor} Hz; the repeated extremes raise no clipping doubt; check with a profile above its Nyquist is in doubt (HELD_BAND)`, async () => {
      const x: number[] = [];
      for (const v of readings.subarray(0, (12000 * factor) / 4))
        for (let j = 0; j < factor; j++) x.push(Math.fround(v));
      const file = join(tempDir(), `held-${factor}x.wav`);
      writeFileSync(file, wavBytes({ tag: 3, bits: 32, channels: 1, sampleRate: 200, samples: x }));
      const a = await analyzeRecording(file, { segmentLength: 256 });
      const c = a.channels[0]!;
      const note = c.notes.find((f) => f.code === "HELD_SAMPLES")!;
      expect(note.values.updateRateHz).toBe(200 / factor);
      expect(note.values.nyquistHz).toBe(100 / factor);
      expect(findingText(note)).toContain(`about ${200 / factor} Hz`);
      expect(c.stats.atMax).toBe(factor); // the samples repeat: the old count would call it clipping
      expect(c.doubts.map((f) => f.code)).not.toContain("CLIPPING");
      const { checkRecording } = await import("../../src/analyses/checkRecording.js");
      const { parseProfile } = await import("../../src/compare/testProfile.js");
      const profile = parseProfile(
        JSON.stringify({
          title: "to 80 Hz",
          units: "g2/Hz",
          points: [
            { hz: 5, level: 1e-5 },
            { hz: 80, level: 1e-5 },
          ],
          tolerance: { bands: [{ fromHz: 5, toHz: 80, upperDb: 3, lowerDb: 3 }] },
        }),
        "p.json",
      );
      const r = await checkRecording(file, profile, { inputUnits: "g", histogram: false });
      const band = r.channels[0]!.findings.find((f) => f.code === "HELD_BAND");
      expect(band?.values.nyquistHz).toBe(100 / factor);
      expect(r.verdict).not.toBe("PASS");
    });
  }
  it("not held: seeded noise at 200 Hz carries no HELD_SAMPLES note", async () => {
    const file = join(tempDir(), "unheld.wav");
    writeFileSync(file, wavBytes({ tag: 3, bits: 32, channels: 1, sampleRate: 200, samples: Array.from(readings) }));
    const a = await analyzeRecording(file, { segmentLength: 256 });
    expect(a.channels[0]!.notes.map((f) => f.code)).not.toContain("HELD_SAMPLES");
    expect(a.channels[0]!.hold!.held).toBe(false);
  });
});

describe("the built-in statistics can be left out only without a spectrum (transfer's pass)", () => {
  it("statistics: false with spectrum: false leaves the channels' stats empty, says so in the resolved analysis, and the listeners hear every sample; with a spectrum it is ignored", async () => {
    const heard: number[] = [];
    const listener: PassAccumulator<number> = {
      start: () => undefined,
      push: (_b, n) => void heard.push(n),
      finish: () => heard.reduce((s, n) => s + n, 0),
    };
    const off = await analyzeRecording("samples/kb210-run-short.wav", {
      spectrum: false,
      statistics: false,
      accumulators: [listener],
    });
    expect(off.analysis.statistics).toBe(false);
    expect(off.channels[0]!.stats.count).toBe(0);
    expect(off.extras[0]).toBe(off.window.frames);
    const on = await analyzeRecording("samples/kb210-run-short.wav", { statistics: false });
    expect("statistics" in on.analysis).toBe(false);
    expect(on.channels[0]!.stats.count).toBe(on.window.frames);
  });
});
