import { readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { decode } from "wav-decoder";
import { describe, expect, it } from "vitest";
import { InputError } from "../../src/errors.js";
import { openWavTimeHistory } from "../../src/read/wavTimeHistory.js";
import { tempDir } from "../helpers.js";
import { wavBytes, type WavSpec } from "../wavBytes.js";

const dir = tempDir();
let counter = 0;
function file(spec: WavSpec | Buffer): string {
  const p = join(dir, `w${counter++}.wav`);
  writeFileSync(p, Buffer.isBuffer(spec) ? spec : wavBytes(spec));
  return p;
}

async function readAll(p: string): Promise<{ channels: number[][]; rate: number }> {
  const src = await openWavTimeHistory(p);
  const out: number[][] = src.info.channels.map(() => []);
  const s = await src.read(src.info.channels.map((_, i) => i), (ch, n) => ch.forEach((c, i) => out[i]!.push(...c.subarray(0, n))));
  return { channels: out, rate: s.sampleRateHz };
}

async function wavDecoder(p: string, symmetric: boolean): Promise<number[][]> {
  const b = readFileSync(p);
  const d = await decode(b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength), { symmetric });
  return d.channelData.map((c) => Array.from(c));
}

describe("openWavTimeHistory, where wav-decoder 1.3.0 is exact", () => {
  it("16-bit PCM stereo equals wav-decoder {symmetric: true} sample for sample", async () => {
    const samples = [0, 1, -1, 32767, -32768, 12345, -2222, 7];
    const p = file({ bits: 16, channels: 2, samples });
    const ours = await readAll(p);
    const ref = await wavDecoder(p, true);
    expect(ours.channels[0]).toEqual(ref[0]);
    expect(ours.channels[1]).toEqual(ref[1]);
    expect(ours.channels[1]![1]).toBe(32767 / 32768);
  });
  it("32-bit float equals wav-decoder (float32 precision both)", async () => {
    const samples = [0.1, -0.25, 1.5, Math.PI, -1e-6, 0];
    const p = file({ tag: 3, bits: 32, channels: 3, samples });
    const ours = await readAll(p);
    expect(ours.channels).toEqual(await wavDecoder(p, true));
  });
  it("8-bit unsigned and 32-bit PCM decode to the linear full scale", async () => {
    expect((await readAll(file({ bits: 8, channels: 1, samples: [0, 128, 255] }))).channels[0]).toEqual([-1, 0, 127 / 128]);
    expect((await readAll(file({ bits: 32, channels: 1, samples: [-2147483648, 1073741824] }))).channels[0]).toEqual([-1, 0.5]);
  });
});

describe("openWavTimeHistory covers the gaps of wav-decoder 1.3.0", () => {
  it("reads WAVE_FORMAT_EXTENSIBLE (PCM 16 and float 32), which wav-decoder rejects", async () => {
    const p = file({ bits: 16, channels: 1, samples: [16384, -16384], extensible: true });
    expect((await readAll(p)).channels[0]).toEqual([0.5, -0.5]);
    await expect(wavDecoder(p, true)).rejects.toThrow(/Unsupported format/);
    const f = file({ tag: 3, bits: 32, channels: 1, samples: [0.25], extensible: true });
    expect((await readAll(f)).channels[0]).toEqual([0.25]);
  });
  it("keeps 64-bit float at double precision (wav-decoder returns float32)", async () => {
    const p = file({ tag: 3, bits: 64, channels: 1, samples: [0.1, Math.PI] });
    expect((await readAll(p)).channels[0]).toEqual([0.1, Math.PI]);
    expect((await wavDecoder(p, true))[0]![0]).not.toBe(0.1);
  });
  it("decodes the most negative 24-bit value as -1 (wav-decoder gives +1.0000001)", async () => {
    const p = file({ bits: 24, channels: 1, samples: [-8388608, 8388607, -1, 1] });
    expect((await readAll(p)).channels[0]).toEqual([-1, 8388607 / 8388608, -1 / 8388608, 1 / 8388608]);
    expect((await wavDecoder(p, true))[0]![0]).toBeGreaterThan(0);
  });
  it("skips the pad byte after an odd-sized chunk (wav-decoder reads at the wrong offset)", async () => {
    const p = file({ bits: 16, channels: 1, samples: [100, 200], extraChunks: [["LIST", Buffer.from("abc")]] });
    expect((await readAll(p)).channels[0]).toEqual([100 / 32768, 200 / 32768]);
    await expect(wavDecoder(p, true)).rejects.toThrow();
  });
  it("a data chunk cut short is an error naming the chunk (wav-decoder decodes it silently)", async () => {
    const full = wavBytes({ bits: 16, channels: 1, samples: new Array(64).fill(5) });
    const p = file(full.subarray(0, full.length - 50));
    const e = await openWavTimeHistory(p).catch((x: unknown) => x);
    expect(e).toBeInstanceOf(InputError);
    expect((e as InputError).code).toBe("WAV_DATA_TRUNCATED");
    expect((e as InputError).message).toContain("chunk 'data'");
  });
  it("a data chunk that does not start 4-byte aligned is read correctly", async () => {
    const p = file({ tag: 3, bits: 32, channels: 1, samples: [0.5, -0.5, 0.75], extraChunks: [["fact", Buffer.from([1, 0, 0, 0, 0, 0])]] });
    expect((await readAll(p)).channels[0]).toEqual([0.5, -0.5, 0.75]);
  });
  it("reads a file far larger than one 64 KB read, frames split across reads", async () => {
    const n = 3 * 40000;
    const samples = Array.from({ length: n }, (_, i) => ((i * 7919) % 65536) - 32768);
    const p = file({ bits: 24, channels: 3, samples: samples.map((v) => v * 256) });
    const ours = await readAll(p);
    expect(ours.channels[2]!.length).toBe(40000);
    expect(ours.channels[1]![39999]).toBe((samples[3 * 39999 + 1]! * 256) / 8388608);
  });
});

describe("openWavTimeHistory errors name the chunk", () => {
  const cases: [string, () => string, string][] = [
    ["empty file", () => file(Buffer.alloc(0)), "WAV_TRUNCATED_HEADER"],
    ["header cut inside the fmt chunk", () => file(wavBytes({ bits: 16, channels: 1, samples: [1] }).subarray(0, 30)), "WAV_BAD_FMT"],
    ["header without any chunk", () => file(wavBytes({ bits: 16, channels: 1, samples: [1] }).subarray(0, 12)), "WAV_NO_FMT"],
    ["random bytes named .wav", () => file(Buffer.from("this is not a wave file at all")), "WAV_NOT_RIFF"],
    ["big-endian RIFX", () => file(Buffer.from("RIFX0000WAVE")), "WAV_UNSUPPORTED_ENCODING"],
    ["A-law", () => file({ tag: 6, bits: 8, channels: 1, samples: [1, 2] }), "WAV_UNSUPPORTED_ENCODING"],
    ["12-bit PCM", () => { const b = wavBytes({ bits: 16, channels: 1, samples: [1] }); b.writeUInt16LE(12, 34); return file(b); }, "WAV_UNSUPPORTED_ENCODING"],
    ["zero channels", () => file({ bits: 16, channels: 0, samples: [], blockAlign: 0 }), "WAV_NO_CHANNELS"],
    ["block align wrong", () => file({ bits: 16, channels: 2, samples: [1, 2], blockAlign: 3 }), "WAV_BAD_FMT"],
    ["data before fmt", () => file(Buffer.concat([Buffer.from("RIFF\x1c\x00\x00\x00WAVEdata\x02\x00\x00\x00\x01\x00", "latin1"), Buffer.from("fmt ", "latin1")])), "WAV_DATA_BEFORE_FMT"],
    ["data chunk larger than the file", () => { const b = wavBytes({ bits: 16, channels: 1, samples: [1, 2] }); b.writeUInt32LE(1 << 30, 40); return file(b); }, "WAV_DATA_TRUNCATED"],
  ];
  for (const [name, make, code] of cases) {
    it(`${name}: ${code}`, async () => {
      const p = make();
      const e = await openWavTimeHistory(p).catch((x: unknown) => x);
      expect(e).toBeInstanceOf(InputError);
      expect((e as InputError).code).toBe(code);
      expect((e as InputError).message).toContain(p);
    });
  }
});
