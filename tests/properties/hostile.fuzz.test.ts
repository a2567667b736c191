import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyzeRecording } from "../../src/pass/analyzeRecording.js";
import { parseProfile } from "../../src/compare/testProfile.js";
import { InputError } from "../../src/errors.js";
import { MAX_CHANNELS } from "../../src/read/analysisLimits.js";
import { seeded, tempDir } from "../helpers.js";

// Issue #12: seeded random WAV chunk layouts and channel counts, and random profile nesting. Every
// run ends in a result or a typed InputError: never a crash, a hang, a NaN result or a huge allocation.
const dir = tempDir();

function chunk(id: string, body: Buffer): Buffer {
  const h = Buffer.alloc(8);
  h.write(id, 0, "latin1");
  h.writeUInt32LE(body.length, 4);
  return Buffer.concat([h, body, body.length & 1 ? Buffer.alloc(1) : Buffer.alloc(0)]);
}

function randomWav(u: () => number): Buffer {
  const pick = <T>(xs: T[]) => xs[Math.floor(u() * xs.length)]!;
  // Channel counts from none to the format's maximum, many of them beyond MAX_CHANNELS.
  const channels = pick([0, 1, 2, 3, 7, MAX_CHANNELS, MAX_CHANNELS + 1, 4096, 32767, 65535, Math.floor(u() * 65536)]);
  const tag = pick([1, 3, 0xfffe, 2, 0]);
  const bits = pick([8, 16, 24, 32, 64, 12, 0]);
  const fmt = Buffer.alloc(pick([16, 18, 40, 14]));
  if (fmt.length >= 16) {
    fmt.writeUInt16LE(tag, 0);
    fmt.writeUInt16LE(channels, 2);
    fmt.writeUInt32LE(pick([0, 1, 8000, 51200, 0xffffffff]), 4);
    fmt.writeUInt16LE(((channels * bits) / 8) & 0xffff, 12);
    fmt.writeUInt16LE(bits, 14);
  }
  if (fmt.length >= 26) fmt.writeUInt16LE(pick([1, 3]), 24);
  const frameBytes = Math.max(1, (channels * bits) / 8);
  const data = Buffer.alloc(Math.min(4096, Math.floor(u() * 4) * frameBytes + Math.floor(u() * 3)));
  for (let i = 0; i < data.length; i++) data[i] = Math.floor(u() * 256);
  const parts: Buffer[] = [];
  const layout = pick(["fmt-data", "data-fmt", "junk-fmt-junk-data", "fmt-only", "data-only", "fmt-fmt-data"]);
  for (const id of layout.split("-")) {
    if (id === "fmt") parts.push(chunk("fmt ", fmt));
    else if (id === "data") parts.push(chunk("data", data));
    else
      parts.push(chunk(pick(["LIST", "JUNK", "bext", "\u0000\u0000\u0000\u0000"]), Buffer.alloc(Math.floor(u() * 9))));
  }
  const body = Buffer.concat(parts);
  const riff = Buffer.alloc(12);
  riff.write("RIFF", 0, "latin1");
  riff.writeUInt32LE(4 + body.length, 4);
  riff.write("WAVE", 8, "latin1");
  return Buffer.concat([riff, body]);
}

describe("fuzzing hostile layouts (seeded)", () => {
  it("WAV: 300 random chunk layouts, encodings and channel counts end in a result or an InputError", async () => {
    const u = seeded(1212);
    const seen: Record<string, number> = {};
    for (let k = 0; k < 300; k++) {
      const f = join(dir, `h${k}.wav`);
      writeFileSync(f, randomWav(u));
      try {
        const a = await analyzeRecording(f, { segmentLength: 4 });
        expect(a.channels.length).toBeLessThanOrEqual(MAX_CHANNELS);
        for (const c of a.channels) if (c.psd.averages > 0) expect(c.psd.psd.every(Number.isFinite)).toBe(true);
        seen.ok = (seen.ok ?? 0) + 1;
      } catch (e) {
        expect(e, String(e)).toBeInstanceOf(InputError);
        const code = (e as InputError).code;
        seen[code] = (seen[code] ?? 0) + 1;
      }
    }
    expect(seen.TOO_MANY_CHANNELS).toBeGreaterThan(0);
  });

  it("profiles: 200 random nestings from 1 to 5000 deep, JSON and YAML, flow and block, end in a profile or an InputError", () => {
    const u = seeded(77);
    const base = {
      title: "nest",
      units: "g2/Hz",
      points: [
        { hz: 20, level: 0.01 },
        { hz: 2000, level: 0.01 },
      ],
      tolerance: { bands: [{ fromHz: 20, toHz: 2000, upperDb: 3, lowerDb: 3 }], rmsDb: 1.5 },
    };
    const codes = new Set<string>();
    for (let k = 0; k < 200; k++) {
      const depth = 1 + Math.floor(u() ** 3 * 5000);
      const open = u() < 0.5 ? "[" : '{"a":';
      const close = open === "[" ? "]" : "}";
      const nested = `${open.repeat(depth)}1${close.repeat(depth)}`;
      const kind = Math.floor(u() * 3);
      const text =
        kind === 0
          ? JSON.stringify({ ...base, description: "x" }).replace('"x"', nested)
          : kind === 1
            ? `title: nest\nunits: g2/Hz\nextra: ${nested}\n`
            : `title: nest\n${Array.from({ length: Math.min(depth, 300) }, (_, i) => `${" ".repeat(i)}k${i}:`).join("\n")} 1\n`;
      try {
        parseProfile(text, kind === 0 ? "n.json" : "n.yaml");
      } catch (e) {
        expect(e, String(e)).toBeInstanceOf(InputError);
        codes.add((e as InputError).code);
      }
    }
    expect(codes.has("PROFILE_TOO_LARGE")).toBe(true);
  });
});
