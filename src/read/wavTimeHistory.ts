import { closeSync, fstatSync, openSync, readSync } from "node:fs";
import { open, stat } from "node:fs/promises";
import { endianness } from "node:os";
import { createHash } from "node:crypto";
import { InputError } from "../errors.js";
import type { BlockSink, ReadSummary, TimeHistorySource } from "./timeHistory.js";

/**
 * Streaming WAV reader. The RIFF chunk list is walked with positional reads (odd-sized chunks are
 * followed by a pad byte, RIFF spec, Microsoft/IBM 1991), then the file is read once in 64 KB pieces:
 * every byte goes into the SHA-256, and the bytes of the data chunk are decoded frame by frame with a
 * DataView (the data chunk need not be 4-byte aligned).
 *
 * Encodings: PCM 8 (unsigned), 16, 24, 32 bit; IEEE float 32 and 64 bit; both also inside
 * WAVE_FORMAT_EXTENSIBLE (the SubFormat GUID's first two bytes give the tag). Integers are scaled by
 * 1/2^(bits-1) for both signs, so full scale is +-1 and the scale is linear; 64-bit floats stay 64-bit.
 * These are exactly the points where wav-decoder 1.3.0 falls short (see DEVELOPERS.md): it is kept as
 * the reference the tests compare with where it is exact.
 */
const ENCODING_NAMES: Record<number, string> = { 2: "Microsoft ADPCM", 6: "A-law", 7: "mu-law", 0x11: "IMA ADPCM", 0x55: "MPEG layer 3" };

interface WavFormat {
  tag: number;
  channels: number;
  sampleRate: number;
  blockAlign: number;
  bits: number;
}

export async function openWavTimeHistory(file: string): Promise<TimeHistorySource> {
  const { size } = await stat(file);
  const fh = await open(file, "r");
  let fmt: WavFormat | undefined;
  let dataStart = -1;
  let dataBytes = 0;
  try {
    const hdr = Buffer.alloc(12);
    const { bytesRead } = await fh.read(hdr, 0, 12, 0);
    if (bytesRead < 12) throw new InputError("WAV_TRUNCATED_HEADER", { file, expected: "a 12-byte RIFF/WAVE header", received: `${bytesRead} bytes` });
    const riff = hdr.toString("latin1", 0, 4);
    if ((riff !== "RIFF" && riff !== "RIFX") || hdr.toString("latin1", 8, 12) !== "WAVE") {
      throw new InputError("WAV_NOT_RIFF", { file, expected: "a RIFF/WAVE file", received: JSON.stringify(hdr.toString("latin1", 0, 4)) });
    }
    if (riff === "RIFX") throw new InputError("WAV_UNSUPPORTED_ENCODING", { file, expected: "little-endian RIFF", received: "big-endian RIFX" });
    let pos = 12;
    const ch = Buffer.alloc(8);
    while (pos + 8 <= size) {
      await fh.read(ch, 0, 8, pos);
      const id = ch.toString("latin1", 0, 4);
      const len = ch.readUInt32LE(4);
      const body = pos + 8;
      if (id === "fmt ") {
        if (len < 16 || body + len > size) throw new InputError("WAV_BAD_FMT", { file, chunk: "fmt ", expected: "a format chunk of at least 16 bytes", received: `${Math.min(len, size - body)} bytes` });
        const f = Buffer.alloc(Math.min(len, 40));
        await fh.read(f, 0, f.length, body);
        let tag = f.readUInt16LE(0);
        if (tag === 0xfffe) {
          if (f.length < 26) throw new InputError("WAV_BAD_FMT", { file, chunk: "fmt ", expected: "an extensible format chunk of 40 bytes", received: `${len} bytes` });
          tag = f.readUInt16LE(24);
        }
        fmt = { tag, channels: f.readUInt16LE(2), sampleRate: f.readUInt32LE(4), blockAlign: f.readUInt16LE(12), bits: f.readUInt16LE(14) };
      } else if (id === "data") {
        if (fmt === undefined) throw new InputError("WAV_DATA_BEFORE_FMT", { file, chunk: "data", expected: "the 'fmt ' chunk before the data chunk", received: "data first" });
        dataStart = body;
        dataBytes = len;
        if (body + len > size) {
          throw new InputError("WAV_DATA_TRUNCATED", {
            file, chunk: "data", expected: `${len} bytes of samples as the chunk header says`, received: `${size - body} bytes (the file is cut short)`,
            hint: "the recording was probably not closed properly",
          });
        }
        break;
      }
      pos = body + len + (len & 1);
    }
  } finally {
    await fh.close();
  }
  if (fmt === undefined) throw new InputError("WAV_NO_FMT", { file, chunk: "fmt ", expected: "a format chunk", received: size < 20 ? "a truncated header" : "none" });
  if (dataStart < 0) throw new InputError("WAV_NO_DATA", { file, chunk: "data", expected: "a data chunk", received: "none (the header may be truncated)" });
  const { tag, channels, sampleRate, blockAlign, bits } = fmt;
  const pcm = tag === 1 && (bits === 8 || bits === 16 || bits === 24 || bits === 32);
  const float = tag === 3 && (bits === 32 || bits === 64);
  if (!pcm && !float) {
    const what = ENCODING_NAMES[tag] ?? (tag === 1 || tag === 3 ? `${bits}-bit ${tag === 1 ? "PCM" : "float"}` : `format tag 0x${tag.toString(16)}`);
    throw new InputError("WAV_UNSUPPORTED_ENCODING", { file, chunk: "fmt ", expected: "PCM 8/16/24/32-bit or IEEE float 32/64-bit", received: what, hint: "convert the file to PCM or float WAV" });
  }
  if (channels === 0) throw new InputError("WAV_NO_CHANNELS", { file, chunk: "fmt ", expected: "at least one channel", received: "0 channels" });
  if (blockAlign !== (channels * bits) / 8) {
    throw new InputError("WAV_BAD_FMT", { file, chunk: "fmt ", expected: `block align ${(channels * bits) / 8} (channels x bytes per sample)`, received: `${blockAlign}` });
  }
  if (!(sampleRate > 0)) throw new InputError("WAV_BAD_FMT", { file, chunk: "fmt ", expected: "a sample rate above 0", received: `${sampleRate}` });
  const frames = Math.floor(dataBytes / blockAlign);
  if (dataBytes % blockAlign !== 0) {
    throw new InputError("WAV_DATA_TRUNCATED", { file, chunk: "data", expected: `a whole number of ${blockAlign}-byte frames`, received: `${dataBytes} bytes` });
  }
  return {
    info: {
      file, format: "wav", sampleRateHz: sampleRate, frames, bytes: size,
      channels: Array.from({ length: channels }, (_, i) => ({ name: `ch${i + 1}` })),
      layout: `WAV, ${float ? "IEEE float" : "PCM"} ${bits}-bit, ${channels} channel${channels > 1 ? "s" : ""}`,
    },
    read: (select, sink, onProgress) => readWavData(file, fmt!, dataStart, frames, select, sink, onProgress),
  };
}

/** Frames per read: about 1 MB. */
const PIECE_BYTES = 1 << 20;
const LITTLE_ENDIAN = endianness() === "LE";

async function readWavData(
  file: string, f: WavFormat, dataStart: number, frames: number, select: number[], sink: BlockSink, onProgress?: (b: number) => void,
): Promise<ReadSummary> {
  const hash = createHash("sha256");
  const nch = f.channels;
  const frameBytes = f.blockAlign;
  const dataEnd = dataStart + frames * frameBytes;
  const perPiece = Math.max(1, Math.floor(PIECE_BYTES / frameBytes));
  // The piece buffer owns its ArrayBuffer from offset 0, so typed-array views on whole frames are aligned.
  const buf = Buffer.alloc(perPiece * frameBytes);
  const outs = select.map(() => new Float64Array(perPiece));
  const intScale = 1 / 2 ** (f.bits - 1);
  // Plain blocking reads of whole pieces: the await of an asynchronous read per piece cost more than the copy.
  const fd = openSync(file, "r");
  let pos = 0;
  const hashRange = (from: number, to: number) => {
    while (from < to) {
      const n = Math.min(buf.length, to - from);
      const bytesRead = readSync(fd, buf, 0, n, from);
      if (bytesRead === 0) break;
      hash.update(buf.subarray(0, bytesRead));
      from += bytesRead;
    }
    return from;
  };
  try {
    pos = hashRange(0, dataStart);
    let done = 0;
    while (done < frames) {
      const n = Math.min(perPiece, frames - done);
      const want = n * frameBytes;
      const bytesRead = readSync(fd, buf, 0, want, pos);
      if (bytesRead !== want) {
        throw new InputError("WAV_DATA_TRUNCATED", { file, chunk: "data", expected: `${frames} frames`, received: `${done + Math.floor(bytesRead / frameBytes)} (the file changed while it was read?)` });
      }
      hash.update(buf.subarray(0, want));
      pos += want;
      decodeFrames(buf, n, f, nch, select, outs, intScale);
      sink(outs, n);
      done += n;
      onProgress?.(pos);
    }
    pos = hashRange(dataEnd, fstatSync(fd).size);
  } finally {
    closeSync(fd);
  }
  return { frames, sampleRateHz: f.sampleRate, sha256: hash.digest("hex"), bytes: pos };
}

/** Deinterleave n frames of `buf` into the selected channels' arrays, scaled to full scale +-1. */
function decodeFrames(buf: Buffer, n: number, f: WavFormat, nch: number, select: number[], outs: Float64Array[], intScale: number): void {
  const ab = buf.buffer;
  const off = buf.byteOffset;
  for (let s = 0; s < select.length; s++) {
    const ch = select[s]!;
    const o = outs[s]!;
    if (LITTLE_ENDIAN && f.tag === 3 && f.bits === 32) {
      const v = new Float32Array(ab, off, n * nch);
      for (let i = 0; i < n; i++) o[i] = v[i * nch + ch]!;
    } else if (LITTLE_ENDIAN && f.tag === 3 && f.bits === 64) {
      const v = new Float64Array(ab, off, n * nch);
      for (let i = 0; i < n; i++) o[i] = v[i * nch + ch]!;
    } else if (LITTLE_ENDIAN && f.bits === 16) {
      const v = new Int16Array(ab, off, n * nch);
      for (let i = 0; i < n; i++) o[i] = v[i * nch + ch]! * intScale;
    } else if (LITTLE_ENDIAN && f.bits === 32) {
      const v = new Int32Array(ab, off, n * nch);
      for (let i = 0; i < n; i++) o[i] = v[i * nch + ch]! * intScale;
    } else if (f.bits === 24) {
      for (let i = 0, p = ch * 3; i < n; i++, p += nch * 3) o[i] = (buf[p]! | (buf[p + 1]! << 8) | ((buf[p + 2]! << 24) >> 8)) * intScale;
    } else if (f.bits === 8) {
      for (let i = 0, p = ch; i < n; i++, p += nch) o[i] = (buf[p]! - 128) / 128;
    } else {
      // Big-endian hosts: DataView, little-endian reads.
      const dv = new DataView(ab, off, n * f.blockAlign);
      const b = f.bits / 8;
      for (let i = 0; i < n; i++) {
        const q = (i * nch + ch) * b;
        o[i] = f.tag === 3 ? (b === 4 ? dv.getFloat32(q, true) : dv.getFloat64(q, true)) : b === 2 ? dv.getInt16(q, true) * intScale : dv.getInt32(q, true) * intScale;
      }
    }
  }
}
