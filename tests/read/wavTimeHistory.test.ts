import { readFileSync, truncateSync, unlinkSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { decode } from "wav-decoder";
import { describe, expect, it } from "vitest";
import { InputError } from "../../src/errors.js";
import { openWavTimeHistory } from "../../src/read/wavTimeHistory.js";
import { cli, gaussian, maxRelDiff, python, tempDir } from "../helpers.js";
import { analyzeRecording } from "../../src/pass/analyzeRecording.js";
import { createTimeHistoryWriter } from "../../src/report/timeHistoryWriter.js";
import { asRf64, wavBytes, type WavSpec } from "../wavBytes.js";

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
  const s = await src.read(
    src.info.channels.map((_, i) => i),
    (ch, n) => ch.forEach((c, i) => out[i]!.push(...c.subarray(0, n))),
  );
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
    expect((await readAll(file({ bits: 8, channels: 1, samples: [0, 128, 255] }))).channels[0]).toEqual([
      -1,
      0,
      127 / 128,
    ]);
    expect((await readAll(file({ bits: 32, channels: 1, samples: [-2147483648, 1073741824] }))).channels[0]).toEqual([
      -1, 0.5,
    ]);
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
    const p = file({
      tag: 3,
      bits: 32,
      channels: 1,
      samples: [0.5, -0.5, 0.75],
      extraChunks: [["fact", Buffer.from([1, 0, 0, 0, 0, 0])]],
    });
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
    [
      "header cut inside the fmt chunk",
      () => file(wavBytes({ bits: 16, channels: 1, samples: [1] }).subarray(0, 30)),
      "WAV_BAD_FMT",
    ],
    [
      "header without any chunk",
      () => file(wavBytes({ bits: 16, channels: 1, samples: [1] }).subarray(0, 12)),
      "WAV_NO_FMT",
    ],
    ["random bytes named .wav", () => file(Buffer.from("this is not a wave file at all")), "WAV_NOT_RIFF"],
    ["big-endian RIFX", () => file(Buffer.from("RIFX0000WAVE")), "WAV_UNSUPPORTED_ENCODING"],
    ["A-law", () => file({ tag: 6, bits: 8, channels: 1, samples: [1, 2] }), "WAV_UNSUPPORTED_ENCODING"],
    [
      "12-bit PCM",
      () => {
        const b = wavBytes({ bits: 16, channels: 1, samples: [1] });
        b.writeUInt16LE(12, 34);
        return file(b);
      },
      "WAV_UNSUPPORTED_ENCODING",
    ],
    ["zero channels", () => file({ bits: 16, channels: 0, samples: [], blockAlign: 0 }), "WAV_NO_CHANNELS"],
    ["block align wrong", () => file({ bits: 16, channels: 2, samples: [1, 2], blockAlign: 3 }), "WAV_BAD_FMT"],
    [
      "data before fmt",
      () =>
        file(
          Buffer.concat([
            Buffer.from("RIFF\x1c\x00\x00\x00WAVEdata\x02\x00\x00\x00\x01\x00", "latin1"),
            Buffer.from("fmt ", "latin1"),
          ]),
        ),
      "WAV_DATA_BEFORE_FMT",
    ],
    [
      "data chunk larger than the file",
      () => {
        const b = wavBytes({ bits: 16, channels: 1, samples: [1, 2] });
        b.writeUInt32LE(1 << 30, 40);
        return file(b);
      },
      "WAV_DATA_TRUNCATED",
    ],
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

describe("openWavTimeHistory: RF64/BW64, chunk walking, psdgate's calibration chunk", () => {
  const samples = Array.from({ length: 400 }, (_, i) => Math.round(9000 * Math.sin(i * 0.3)));
  it("an RF64 and a BW64 file (ds64 chunk written here, EBU Tech 3306) read as the same samples as the RIFF file", async () => {
    const riff = wavBytes({ bits: 16, channels: 2, samples, extraChunks: [["LIST", Buffer.from("info")]] });
    const ref = await readAll(file(riff));
    for (const magic of ["RF64", "BW64"]) {
      const src = await openWavTimeHistory(file(asRf64(riff, magic)));
      expect(src.info.layout).toContain("RF64");
      expect((await readAll(file(asRf64(riff, magic)))).channels).toEqual(ref.channels);
    }
  });
  it("the writer turns a large output into RF64 on close (threshold lowered for the test), and the reader reads it back", async () => {
    const p = join(dir, "rf64-out.wav");
    const w = await createTimeHistoryWriter(p, {
      sampleRateHz: 1000,
      channelNames: ["a"],
      units: "m/s2",
      option: "--out",
      inputs: [],
      rf64Above: 100,
    });
    const x = Float64Array.from({ length: 256 }, (_, i) => i / 256 - 0.5);
    await w.write([x], x.length);
    await w.close();
    expect(readFileSync(p).toString("latin1", 0, 4)).toBe("RF64");
    const r = await readAll(p);
    expect(r.channels[0]).toEqual(Array.from(Float32Array.from(x)));
  });
  it("many empty chunks before the data are walked in large reads (100 000 chunks)", async () => {
    const extra: [string, Buffer][] = Array.from({ length: 100000 }, () => ["junk", Buffer.alloc(0)]);
    const r = await readAll(file({ bits: 16, channels: 1, samples, extraChunks: extra }));
    expect(r.channels[0]!.length).toBe(400);
  });
  it("a data size of 0 followed by the samples (an unfinished recording) is read to the end of the file, and said", async () => {
    const b = wavBytes({ bits: 16, channels: 1, samples });
    const ref = await readAll(file(b));
    b.writeUInt32LE(0, b.indexOf("data", 12, "latin1") + 4);
    b.writeUInt32LE(0, 4);
    const p = file(b);
    expect((await openWavTimeHistory(p)).info.layout).toContain("data size 0");
    expect((await readAll(p)).channels).toEqual(ref.channels);
  });
  it("a data size of 0xFFFFFFFF in a plain RIFF file (a streaming recorder's 'size unknown') is read to the end, and said", async () => {
    const b = wavBytes({ bits: 16, channels: 1, samples });
    const ref = await readAll(file(b));
    b.writeUInt32LE(0xffffffff, b.indexOf("data", 12, "latin1") + 4);
    b.writeUInt32LE(0xffffffff, 4);
    const p = file(b);
    expect((await openWavTimeHistory(p)).info.layout).toContain("data size 0xFFFFFFFF");
    expect((await readAll(p)).channels).toEqual(ref.channels);
  });
  it("the calibration chunk says the unit and scale: x2 in mm/s2 reads as 0.002 m/s^2 per file unit", async () => {
    const p = file({
      tag: 3,
      bits: 32,
      channels: 1,
      samples: [0.5, -0.25],
      extraChunks: [["pgcl", Buffer.from('{"unit":"mm/s2","scale":2}')]],
    });
    const a = await analyzeRecording(p, { segmentLength: 2 });
    expect(a.channels[0]!.units).toBe("m/s2");
    expect(a.channels[0]!.reading).toMatchObject({
      fileUnit: "mm/s2",
      unitFrom: "file calibration",
      fileScale: 2,
      factor: 0.002,
    });
    expect(a.channels[0]!.stats.max).toBeCloseTo(0.001, 15);
  });
  it("synth from an m/s^2 profile, then check against that profile: the unit travels in the WAV and the run passes", async () => {
    const prof = join(dir, "si-profile.json");
    writeFileSync(
      prof,
      JSON.stringify({
        title: "Invented rig in SI units",
        units: "(m/s2)2/Hz",
        points: [
          { hz: 20, level: 0.5 },
          { hz: 100, level: 5 },
          { hz: 800, level: 5 },
        ],
        tolerance: { bands: [{ fromHz: 20, toHz: 800, upperDb: 3, lowerDb: 3 }], rmsDb: 1.5 },
        resolutionHz: 5,
      }),
    );
    const out = join(dir, "si-run.wav");
    expect(
      (await cli("synth", "--profile", prof, "--duration", "30", "--rate", "2048", "--out", out, "--seed", "4")).code,
    ).toBe(0);
    const r = await cli("check", out, "--profile", prof, "--json");
    const j = JSON.parse(r.stdout);
    expect(j.verdict, r.stdout.slice(0, 400)).toBe("pass");
    expect(Math.abs(j.channels[0].rms.deviationDb)).toBeLessThan(0.5);
  });
  it("the same synth WAV read with and without its calibration chunk: the m/s^2 PSD equals the plain reading with --units m/s2 (1e-12)", async () => {
    const prof = join(dir, "si-profile2.json");
    writeFileSync(
      prof,
      JSON.stringify({
        title: "Invented",
        units: "(m/s2)2/Hz",
        points: [
          { hz: 20, level: 1 },
          { hz: 400, level: 1 },
        ],
        tolerance: { bands: [{ fromHz: 20, toHz: 400, upperDb: 3, lowerDb: 3 }] },
      }),
    );
    const out = join(dir, "si-run2.wav");
    expect((await cli("synth", "--profile", prof, "--duration", "4", "--rate", "1024", "--out", out)).code).toBe(0);
    const withChunk = await analyzeRecording(out, { segmentLength: 512 });
    const b = readFileSync(out);
    b.write("junk", b.indexOf("pgcl", 12, "latin1"), "latin1");
    const stripped = join(dir, "si-run2-plain.wav");
    writeFileSync(stripped, b);
    const plain = await analyzeRecording(stripped, { segmentLength: 512, inputUnits: "m/s2" });
    expect(withChunk.channels[0]!.units).toBe("m/s2");
    expect(maxRelDiff(withChunk.channels[0]!.psd.psd, plain.channels[0]!.psd.psd)).toBeLessThanOrEqual(1e-12);
  });
});

describe("openWavTimeHistory: WAVE_FORMAT_EXTENSIBLE's valid bits", () => {
  // 24-bit codes of a quiet record (sigma 1.5 steps), as a DAQ writes them into 32-bit containers: left-justified,
  // wValidBitsPerSample 24 (Microsoft, WAVEFORMATEXTENSIBLE: the valid bits are the most significant ones).
  const codes = Array.from(gaussian(65536, 11, 1.5), (v) => Math.round(v));
  const in32 = () =>
    file({ bits: 32, channels: 1, samples: codes.map((c) => c * 256), extensible: true, validBits: 24 });
  it("24 valid bits in 32-bit containers read as scipy.io.wavfile reads them, with the 24-bit step as the quantum", async () => {
    const p = in32();
    const src = await openWavTimeHistory(p);
    expect(src.info.channels[0]!.quantum).toBe(2 ** -23);
    expect(src.info.layout).toContain("24 valid bits");
    const ours = (await readAll(p)).channels[0]!;
    // scipy.io.wavfile.read (scipy 1.17.1): the int32 containers, over 2^31 for full scale
    const ref = JSON.parse(
      python(`
import json, scipy.io.wavfile as wf
fs, x = wf.read(${JSON.stringify(p)})
print(json.dumps((x[:64] / 2.0**31).tolist()))`),
    ) as number[];
    expect(ours.slice(0, 64)).toEqual(ref);
  });
  it("a quiet record in 24-in-32 containers has the doubts of the same codes in a plain 24-bit file (no false clipping)", async () => {
    const plain = await analyzeRecording(file({ bits: 24, channels: 1, samples: codes }), { segmentLength: 1024 });
    const ext = await analyzeRecording(in32(), { segmentLength: 1024 });
    const codesOf = (a: typeof plain) => a.channels[0]!.doubts.map((d) => d.code);
    expect(codesOf(plain)).not.toContain("CLIPPING");
    expect(codesOf(ext)).toEqual(codesOf(plain));
  });
  it("more valid bits than the container holds is WAV_BAD_FMT naming the field", async () => {
    const p = file({ bits: 16, channels: 1, samples: [1, 2], extensible: true, validBits: 24 });
    const e = await openWavTimeHistory(p).catch((x: unknown) => x);
    expect((e as InputError).code).toBe("WAV_BAD_FMT");
    expect((e as InputError).message).toContain("valid bits");
  });
});

describe("openWavTimeHistory: no silent choice, and an unfinished recording cut inside a frame", () => {
  const samples = Array.from({ length: 400 }, (_, i) => Math.round(9000 * Math.sin(i * 0.3)));
  it("a second calibration chunk is WAV_DUPLICATE_CHUNK (not the last one read, silently)", async () => {
    const p = file({
      bits: 16,
      channels: 2,
      samples,
      extraChunks: [
        ["pgcl", Buffer.from('{"unit":"g","scale":2}')],
        ["pgcl", Buffer.from('{"unit":"g","scale":5}')],
      ],
    });
    const e = await openWavTimeHistory(p).catch((x: unknown) => x);
    expect((e as InputError).code).toBe("WAV_DUPLICATE_CHUNK");
    expect((e as InputError).message).toContain("chunk 'pgcl'");
  });
  for (const [what, size] of [
    ["0", 0],
    ["0xFFFFFFFF", 0xffffffff],
  ] as const) {
    it(`data size ${what}, the file cut 3 bytes into a 4-byte frame: the whole frames are read, the rest said`, async () => {
      const b = wavBytes({ bits: 16, channels: 2, samples });
      const ref = await readAll(file(b));
      b.writeUInt32LE(size, b.indexOf("data", 12, "latin1") + 4);
      b.writeUInt32LE(size, 4);
      const p = file(Buffer.concat([b, Buffer.from([1, 2, 3])]));
      const src = await openWavTimeHistory(p);
      expect(src.info.frames).toBe(200);
      expect(src.info.layout).toContain("3 bytes after the last whole frame left out");
      expect((await readAll(p)).channels).toEqual(ref.channels);
    });
  }
  it("a data chunk whose size in the header is not whole frames is still WAV_DATA_TRUNCATED", async () => {
    const b = wavBytes({ bits: 16, channels: 2, samples });
    b.writeUInt32LE(799, b.indexOf("data", 12, "latin1") + 4);
    const e = await openWavTimeHistory(file(b)).catch((x: unknown) => x);
    expect((e as InputError).code).toBe("WAV_DATA_TRUNCATED");
  });
});

describe("openWavTimeHistory: a plain RIFF file over 4 GiB (sparse files, nothing read past the header)", () => {
  /** A 16-bit stereo RIFF header whose data chunk holds `dataBytes`, with `sizeField` in its 32-bit size. */
  function bigRiff(dataBytes: number, sizeField: number): string {
    const h = wavBytes({ bits: 16, channels: 2, samples: [] });
    h.writeUInt32LE(sizeField, h.indexOf("data", 12, "latin1") + 4);
    h.writeUInt32LE(sizeField, 4);
    const p = join(dir, `w${counter++}.wav`);
    writeFileSync(p, h);
    truncateSync(p, h.length + dataBytes);
    return p;
  }
  it("a data size wrapped modulo 2^32 (4 GiB + 1000 bytes written as 1000) reads every frame and says so", async () => {
    const n = 2 ** 32 + 1000;
    const p = bigRiff(n, n % 2 ** 32);
    const src = await openWavTimeHistory(p);
    unlinkSync(p);
    expect(src.info.frames).toBe(n / 4);
    expect(src.info.layout).toContain("wrapped");
  });
  it("a data size of 0xFFFFFFFF in a RIFF file longer than that is read to the end of the file", async () => {
    const n = 2 ** 32 + 1000;
    const p = bigRiff(n, 0xffffffff);
    const src = await openWavTimeHistory(p);
    unlinkSync(p);
    expect(src.info.frames).toBe(n / 4);
    expect(src.info.layout).toContain("data size 0xFFFFFFFF");
  });
});

describe("openWavTimeHistory: a chunk that runs past the file's end is named", () => {
  it("a JUNK chunk whose size passes the end hides the fmt chunk: WAV_NO_FMT names the JUNK chunk", async () => {
    const b = wavBytes({ bits: 16, channels: 1, samples: [1, 2], extraChunks: [] });
    const junk = Buffer.alloc(8);
    junk.write("JUNK", 0, "latin1");
    junk.writeUInt32LE(0x7fffffff, 4);
    const p = file(Buffer.concat([b.subarray(0, 12), junk, b.subarray(12)]));
    const e = await openWavTimeHistory(p).catch((x: unknown) => x);
    expect((e as InputError).code).toBe("WAV_NO_FMT");
    expect((e as InputError).message).toContain("chunk 'JUNK' at byte 12 says 2147483647 bytes");
  });
});

describe("every encoding through the one pass, held to scipy.io.wavfile + scipy.signal.welch (scipy 1.17.1)", () => {
  it("8, 16, 24, 32-bit PCM, float 32 and 64, and 24 valid bits in 32: window 0.3 to 3.7 s, statistics and PSD", async () => {
    const fs = 2048;
    const x = gaussian(2 * 8192, 5, 0.2).map((v) => Math.max(-0.99, Math.min(0.99, v)));
    const q = (bits: number) => Array.from(x, (v) => Math.round(v * 2 ** (bits - 1)));
    const files: [string, string][] = [
      ["u8", file({ bits: 8, channels: 2, samples: q(8).map((c) => c + 128), sampleRate: fs })],
      ["s16", file({ bits: 16, channels: 2, samples: q(16), sampleRate: fs })],
      ["s24", file({ bits: 24, channels: 2, samples: q(24), sampleRate: fs })],
      ["s32", file({ bits: 32, channels: 2, samples: q(32), sampleRate: fs })],
      ["f32", file({ tag: 3, bits: 32, channels: 2, samples: Array.from(x), sampleRate: fs })],
      ["f64", file({ tag: 3, bits: 64, channels: 2, samples: Array.from(x), sampleRate: fs })],
      [
        "s24in32",
        file({
          bits: 32,
          channels: 2,
          samples: q(24).map((c) => c * 256),
          sampleRate: fs,
          extensible: true,
          validBits: 24,
        }),
      ],
    ];
    // Frames i with 0.3 <= i / fs < 3.7 (README, --from/--to): 614.4 <= i < 7577.6, so 615 to 7577.
    const ref = JSON.parse(
      python(`
import json, numpy as np, scipy.io.wavfile as wf, scipy.signal as ss
out = {}
for name, p in ${JSON.stringify(files)}:
    fs, d = wf.read(p)
    y = (d.astype(float) - 128) / 128 if d.dtype == np.uint8 else d / {np.dtype("int16"): 2.0**15, np.dtype("int32"): 2.0**31}[d.dtype] if d.dtype.kind == "i" else d.astype(float)
    y = y[615:7578]
    out[name] = {"fs": int(fs), "n": len(y),
                 "psd": [ss.welch(y[:, c], fs=fs, window="hann", nperseg=512, noverlap=256, detrend="constant")[1].tolist() for c in (0, 1)],
                 "mean": y.mean(axis=0).tolist(), "std": y.std(axis=0).tolist(), "max": y.max(axis=0).tolist()}
print(json.dumps(out))`),
    ) as Record<string, { fs: number; n: number; psd: number[][]; mean: number[]; std: number[]; max: number[] }>;
    for (const [name, p] of files) {
      const r = ref[name]!;
      const a = await analyzeRecording(p, { segmentLength: 512, fromS: 0.3, toS: 3.7 });
      expect(a.input.sampleRateHz, name).toBe(r.fs);
      expect(a.window.frames, name).toBe(r.n);
      for (const c of [0, 1]) {
        const ch = a.channels[c]!;
        expect(maxRelDiff(ch.psd.psd, r.psd[c]!), name).toBeLessThan(1e-12);
        expect(Math.abs(ch.stats.mean - r.mean[c]!), name).toBeLessThan(1e-15);
        expect(Math.abs(ch.stats.std / r.std[c]! - 1), name).toBeLessThan(1e-12);
        expect(ch.stats.max, name).toBe(r.max[c]);
      }
    }
  });
});

describe("openWavTimeHistory: bytes after the data chunk that are not chunks", () => {
  it("a zero-filled tail (a logger's preallocated file) ends the walk at its first id instead of 8 bytes at a time", async () => {
    const b = wavBytes({ bits: 16, channels: 1, samples: [100, 200, 300] });
    // Behind the zeros, a chunk header the walk would reach only by stepping through every zero 'chunk'.
    const fake = Buffer.from("data\x04\x00\x00\x00\x01\x00\x02\x00", "latin1");
    const p = file(Buffer.concat([b, Buffer.alloc(1 << 18), fake]));
    const src = await openWavTimeHistory(p);
    expect(src.info.frames).toBe(3);
    expect(src.info.layout).toContain(`${(1 << 18) + fake.length} bytes after the last chunk are not chunks`);
    expect((await readAll(p)).channels[0]).toEqual([100 / 32768, 200 / 32768, 300 / 32768]);
  });
});
