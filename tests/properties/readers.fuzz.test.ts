import { readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyzeRecording } from "../../src/pass/analyzeRecording.js";
import { parseProfile } from "../../src/compare/testProfile.js";
import { InputError } from "../../src/errors.js";
import { seeded, tempDir } from "../helpers.js";
import { wavBytes } from "../wavBytes.js";

/** Byte flips, truncation and insertion of random bytes, from a seeded generator. */
function mutate(src: Buffer, u: () => number): Buffer {
  const b = Buffer.from(src);
  const kind = Math.floor(u() * 4);
  if (kind === 0) {
    const n = 1 + Math.floor(u() * 8);
    for (let i = 0; i < n; i++) b[Math.floor(u() * b.length)] = Math.floor(u() * 256);
    return b;
  }
  if (kind === 1) return b.subarray(0, Math.floor(u() * b.length));
  const at = Math.floor(u() * b.length);
  const ins = Buffer.from(
    Array.from({ length: 1 + Math.floor(u() * 16) }, () =>
      kind === 2 ? Math.floor(u() * 256) : ' ,;.-e0123456789\n\r"#'[Math.floor(u() * 20)]!.charCodeAt(0),
    ),
  );
  return Buffer.concat([b.subarray(0, at), ins, b.subarray(at)]);
}

const dir = tempDir();

async function outcome(file: string): Promise<"ok" | "input-error"> {
  try {
    const a = await analyzeRecording(file, { segmentLength: 16, csv: { sampleRateHz: undefined } });
    for (const c of a.channels) {
      if (c.psd.averages > 0) {
        expect(c.psd.psd.every(Number.isFinite), "no NaN in a PSD").toBe(true);
        expect(Number.isFinite(c.parseval.rmsTime)).toBe(true);
      }
    }
    return "ok";
  } catch (e) {
    if (e instanceof InputError) return "input-error";
    throw e;
  }
}

describe("fuzzing the readers (seeded mutations; every run ends in a result or a typed input error)", () => {
  it("CSV: 300 mutations of a valid logger export", async () => {
    let s = "# export\ntime,ax [g],ay [g]\n";
    for (let i = 0; i < 200; i++)
      s += `${(i / 100).toFixed(2)},${Math.sin(i).toFixed(5)},${Math.cos(i * 0.3).toFixed(5)}\n`;
    const src = Buffer.from(s);
    const u = seeded(1234);
    const seen = { ok: 0, "input-error": 0 };
    for (let k = 0; k < 300; k++) {
      const f = join(dir, `f${k}.csv`);
      writeFileSync(f, mutate(src, u));
      seen[await outcome(f)]++;
    }
    expect(seen.ok + seen["input-error"]).toBe(300);
    expect(seen["input-error"]).toBeGreaterThan(0);
  });
  it("WAV: 300 mutations of valid PCM 16, PCM 24 and float files", async () => {
    const u = seeded(99);
    const srcs = [
      wavBytes({
        bits: 16,
        channels: 2,
        samples: Array.from({ length: 256 }, (_, i) => Math.round(9000 * Math.sin(i))),
      }),
      wavBytes({
        bits: 24,
        channels: 1,
        samples: Array.from({ length: 128 }, (_, i) => Math.round(4e6 * Math.sin(i))),
        extraChunks: [["LIST", Buffer.from("abc")]],
      }),
      wavBytes({
        tag: 3,
        bits: 32,
        channels: 1,
        samples: Array.from({ length: 128 }, (_, i) => Math.sin(i)),
        extensible: true,
      }),
    ];
    for (let k = 0; k < 300; k++) {
      const f = join(dir, `f${k}.wav`);
      writeFileSync(f, mutate(srcs[k % 3]!, u));
      await outcome(f);
    }
  });
  it("profiles: 300 mutations of the sample JSON and YAML profiles", () => {
    const u = seeded(5);
    const srcs: [string, Buffer][] = [
      ["p.json", readFileSync("samples/profiles/kb210-controller.json")],
      ["p.yaml", readFileSync("samples/profiles/tern7-gimbal.yaml")],
    ];
    for (let k = 0; k < 300; k++) {
      const [name, src] = srcs[k % 2]!;
      const text = mutate(src, u).toString("utf8");
      try {
        const p = parseProfile(text, name);
        expect(Number.isFinite(p.rms) && p.rms > 0).toBe(true);
      } catch (e) {
        expect(e).toBeInstanceOf(InputError);
      }
    }
  });
});
