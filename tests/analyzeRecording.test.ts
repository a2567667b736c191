import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyzeRecording, analyzeSource, clippingHintCount, type PassAccumulator } from "../src/analyzeRecording.js";
import type { TimeHistorySource } from "../src/read/timeHistory.js";
import { cli, gaussian, tempDir } from "./helpers.js";
import { wavBytes } from "./wavBytes.js";

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
    expect(a.channels[0]!.doubts.filter((d) => d.includes("clipping"))).toEqual([]);
  });
  it("a recording clipped at 4 sigma is flagged (Gaussian tail beyond 4 sigma: 6.3e-5, REFERENCES.md sec. 10)", async () => {
    const x = gaussian(400_000, 9, 3000).map((v) => Math.round(Math.max(-12000, Math.min(12000, v))));
    const f = join(dir, "clipped.wav");
    writeFileSync(f, wavBytes({ bits: 16, channels: 1, samples: Array.from(x) }));
    const a = await analyzeRecording(f, { segmentLength: 1024 });
    expect(a.channels[0]!.stats.atMax).toBeGreaterThanOrEqual(clippingHintCount(400_000));
    expect(a.channels[0]!.doubts.join()).toContain("possible clipping");
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

describe("analyzeSource: extra accumulators, the rate contract and the frame window", () => {
  /** A source made here: one channel of `x`, announcing `designHz` and finishing at `finalHz`. */
  function source(x: Float64Array, designHz: number, finalHz: number): TimeHistorySource {
    return {
      info: { file: "made.csv", format: "csv", sampleRateHz: designHz, channels: [{ name: "a" }], bytes: 0, layout: "test" },
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
    start(r: number) { this.design = r; }
    push(blocks: Float64Array[], frames: number) { if (this.frames === 0) this.first = blocks[0]![0]!; this.frames += frames; }
    finish(r: number) { return { design: this.design, final: r, frames: this.frames, first: this.first }; }
  }
  it("an extra accumulator is told the design rate first, sees every conditioned block, and gets the final rate", async () => {
    const x = Float64Array.from({ length: 5000 }, (_, i) => i);
    const a = await analyzeSource(source(x, 100, 100), { segmentLength: 256, accumulators: [new Counter()], inputUnits: "g", resultUnits: "m/s2" });
    expect(a.extras[0]).toEqual({ design: 100, final: 100, frames: 5000, first: 0 });
    expect(a.passDoubts).toEqual([]);
  });
  it("a final rate other than the design rate is a doubt on the pass (the rate contract)", async () => {
    const a = await analyzeSource(source(new Float64Array(5000), 100, 100.5), { segmentLength: 256, accumulators: [new Counter()] });
    expect(a.passDoubts.join()).toMatch(/100\.5 Hz .* 100 Hz/);
  });
  it("--from/--to cut frames i with from <= i/fs < to, recorded in the window, for every accumulator alike", async () => {
    const x = Float64Array.from({ length: 5000 }, (_, i) => i);
    const a = await analyzeSource(source(x, 100, 100), { segmentLength: 256, fromS: 7.005, toS: 31, accumulators: [new Counter()] });
    const c = a.extras[0] as { frames: number; first: number };
    expect(c.first).toBe(701); // crosses a block boundary
    expect(c.frames).toBe(3100 - 701);
    expect(a.window).toEqual({ fromS: 7.01, toS: 31, frames: 2399 });
    expect(a.channels[0]!.stats.count).toBe(2399);
    expect(a.channels[0]!.stats.min).toBe(701);
  });
  it("a window past the end is an input error naming the option; --to past the end is kept with a note", async () => {
    await expect(analyzeSource(source(new Float64Array(5000), 100, 100), { segmentLength: 256, fromS: 60 })).rejects.toThrow(/--from.*WINDOW_EMPTY/);
    const a = await analyzeSource(source(new Float64Array(5000), 100, 100), { segmentLength: 256, toS: 80 });
    expect(a.window.toS).toBe(50);
    expect(a.channels[0]!.warnings.join()).toContain("--to 80 s lies past the end");
  });
});

describe("psd says when a record fails the stationarity test", () => {
  it("a WAV of white noise (made here) with a +3 dB step halfway carries the note; the same noise without the step does not", async () => {
    const fs = 1000;
    const x = gaussian(60 * fs, 31);
    const f1 = join(dir, "steady.wav");
    writeFileSync(f1, wavBytes({ tag: 3, bits: 32, channels: 1, sampleRate: fs, samples: Array.from(x, (v) => v * 0.1) }));
    const f2 = join(dir, "step.wav");
    writeFileSync(f2, wavBytes({ tag: 3, bits: 32, channels: 1, sampleRate: fs, samples: Array.from(x, (v, i) => v * 0.1 * (i >= 30 * fs ? Math.SQRT2 : 1)) }));
    const steady = await cli("psd", f1, "--segment", "1024");
    const step = await cli("psd", f2, "--segment", "1024", "--json");
    expect(steady.stdout).not.toContain("not stationary");
    const j = JSON.parse(step.stdout);
    expect(j.channels[0].stationarity.stationary).toBe(false);
    expect(j.channels[0].stationarity.stretches).toBe(60);
    expect(j.channels[0].warnings.join()).toMatch(/not stationary: reverse arrangements A = \d+ outside/);
    expect(j.input.window).toEqual({ fromS: 0, toS: 60, frames: 60000 });
  });
});

describe("--from/--to on psd and check (CLI)", () => {
  it("psd and check record the window in their JSON and analyse only it", async () => {
    const p = JSON.parse((await cli("psd", "samples/tern7-flight.csv", "--from", "5", "--to", "15", "--json")).stdout);
    expect(p.input.window).toEqual({ fromS: 5, toS: 15, frames: 40960 });
    expect(p.channels[0].stats.count).toBe(40960);
    const c = await cli("check", "samples/tern7-flight.csv", "-p", "samples/profiles/tern7-gimbal.yaml", "--from", "5", "--json");
    const j = JSON.parse(c.stdout);
    expect(j.input.window).toEqual({ fromS: 5, toS: 20, frames: 61440 });
  });
});
