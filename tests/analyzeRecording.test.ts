import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyzeRecording, clippingHintCount } from "../src/analyzeRecording.js";
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
