import { closeSync, fstatSync, openSync, readSync } from "node:fs";
import { stat } from "node:fs/promises";
import { endianness } from "node:os";
import { createHash } from "node:crypto";
import { InputError } from "../errors.js";
import { parseUnitSpec, type UnitSpec } from "../units.js";
import type { BlockSink, ReadSummary, TimeHistorySource } from "./timeHistory.js";

/**
 * Streaming WAV reader. The RIFF chunk list is walked with positional reads (odd-sized chunks are
 * followed by a pad byte, RIFF spec, Microsoft/IBM 1991), then the file is read once in 1 MiB pieces (PIECE_BYTES):
 * every byte goes into the SHA-256, and the bytes of the data chunk are decoded frame by frame with a
 * DataView (the data chunk need not be 4-byte aligned).
 *
 * Encodings: PCM 8 (unsigned), 16, 24, 32 bit; IEEE float 32 and 64 bit; both also inside
 * WAVE_FORMAT_EXTENSIBLE (the SubFormat GUID's first two bytes give the tag, the other 14 must be the
 * KSDATAFORMAT_SUBTYPE tail; fewer valid bits than the container, as 24 in 32, are its most significant ones, so
 * the full scale is the container's and only the step between codes, the quantum, is the valid bits'). RF64 and
 * BW64 files (EBU Tech 3306) are read through their ds64 chunk.
 * The whole chunk list is walked in 64 KB windows: a second 'fmt ', 'data' or 'pgcl' chunk is an error, not
 * a silent choice. Integers are scaled by
 * 1/2^(bits-1) for both signs, so full scale is +-1 and the scale is linear; 64-bit floats stay 64-bit.
 * These are exactly the points where wav-decoder 1.3.0 falls short (see DEVELOPERS.md): it is kept as
 * the reference the tests compare with where it is exact.
 */
const ENCODING_NAMES: Record<number, string> = {
  2: "Microsoft ADPCM",
  6: "A-law",
  7: "mu-law",
  17: "IMA ADPCM",
  85: "MPEG layer 3",
};

interface WavFormat {
  tag: number;
  channels: number;
  sampleRate: number;
  blockAlign: number;
  bits: number;
  /**
   * WAVE_FORMAT_EXTENSIBLE's wValidBitsPerSample: the bits of each container that carry the sample, the most
   * significant ones (24 in a 32-bit container); `bits` elsewhere, and where the field says 0.
   */
  validBits: number;
}

/**
 * psdgate's own calibration chunk, 'pgcl', written by `synth` (report/timeHistoryWriter.ts): a UTF-8
 * JSON object `{"unit": "m/s2", "scale": 1}` saying that file value x scale is an acceleration in
 * `unit` (any unit parseUnitSpec knows), for every channel. Other readers skip unknown chunks (RIFF
 * spec, Microsoft/IBM 1991).
 */
export const CALIBRATION_CHUNK = "pgcl";

/**
 * The KSDATAFORMAT_SUBTYPE GUID after its first two bytes (the format tag): -0000-0010-8000-00AA00389B71 (Microsoft,
 * WAVEFORMATEXTENSIBLE).
 */
const SUBTYPE_TAIL = Buffer.from("000000001000800000aa00389b71", "hex");
/** Size of the windows the chunk walk reads: one read covers many small chunks. */
const WALK_BYTES = 1 << 16;
const U32_MAX = 0xffffffff;
/** The largest plain RIFF file: the RIFF chunk's 32-bit size and its 8-byte header. */
const RIFF_MAX_BYTES = U32_MAX + 8;

/** Positional reads through a window of WALK_BYTES, so a walk over many small chunks makes few reads. */
class WindowReader {
  private buf = Buffer.alloc(WALK_BYTES);
  private start = 0;
  private len = 0;
  constructor(
    private readonly fd: number,
    private readonly size: number,
  ) {}
  /** n bytes at pos (fewer at the end of the file); valid until the next call. */
  at(pos: number, n: number): Buffer {
    if (pos < this.start || pos + n > this.start + this.len) {
      if (n > this.buf.length) this.buf = Buffer.alloc(n);
      this.start = pos;
      this.len = readSync(this.fd, this.buf, 0, Math.min(this.buf.length, this.size - pos), pos);
    }
    const o = pos - this.start;
    return this.buf.subarray(o, Math.min(o + n, this.len));
  }
}

function printable(id: string): boolean {
  return /^[\x20-\x7e]{4}$/.test(id);
}

/** psdgate's calibration chunk as read: the unit (parsed, and as written) and the scale to it. */
interface WavCalibration {
  unit: UnitSpec;
  text: string;
  scale: number;
}

/** The chunk walk: where it reads, and what it has found so far. */
interface ChunkWalk {
  file: string;
  r: WindowReader;
  size: number;
  /** An RF64/BW64 file (EBU Tech 3306). */
  rf64: boolean;
  /** The data chunk's 64-bit size from the ds64 chunk. */
  ds64Data: number | undefined;
  fmt: WavFormat | undefined;
  /** Offset of the data chunk's samples (-1 before it is found), and their bytes. */
  dataStart: number;
  dataBytes: number;
  calibration: WavCalibration | undefined;
  /** Said after the layout (an unfinished recording read to the end). */
  note: string;
  /** The data's length is the file's end, not a size written when the recording was closed. */
  toEnd: boolean;
  /** The chunk whose size took the walk past the file's end, said when fmt or data is then missing. */
  overrun: string;
}

/** The 12-byte RIFF/WAVE header: refused unless little-endian RIFF, RF64 or BW64; returns whether RF64/BW64. */
function readRiffHeader(file: string, r: WindowReader): boolean {
  const hdr = r.at(0, 12);
  if (hdr.length < 12)
    throw new InputError("WAV_TRUNCATED_HEADER", {
      file,
      expected: "a 12-byte RIFF/WAVE header",
      received: `${hdr.length} bytes`,
    });
  const riff = hdr.toString("latin1", 0, 4);
  if (
    (riff !== "RIFF" && riff !== "RIFX" && riff !== "RF64" && riff !== "BW64") ||
    hdr.toString("latin1", 8, 12) !== "WAVE"
  ) {
    throw new InputError("WAV_NOT_RIFF", {
      file,
      expected: "a RIFF/WAVE file (or RF64/BW64)",
      received: JSON.stringify(hdr.toString("latin1", 0, 4)),
    });
  }
  if (riff === "RIFX")
    throw new InputError("WAV_UNSUPPORTED_ENCODING", {
      file,
      expected: "little-endian RIFF",
      received: "big-endian RIFX",
    });
  return riff !== "RIFF";
}

/**
 * The ds64 chunk at `pos` (RF64/BW64, EBU Tech 3306, 2009): first, and holding the 64-bit sizes of the RIFF
 * and data chunks, whose 32-bit size fields then say 0xFFFFFFFF. Returns the data chunk's size.
 */
function ds64Chunk(w: ChunkWalk, pos: number, len: number): number {
  const { file, rf64 } = w;
  if (!rf64 || pos !== 12 || len < 28) {
    throw new InputError("WAV_BAD_DS64", {
      file,
      chunk: "ds64",
      expected: "one ds64 chunk of at least 28 bytes, first in an RF64/BW64 file",
      received: !rf64 ? "a ds64 chunk in a RIFF file" : pos !== 12 ? "a ds64 chunk after others" : `${len} bytes`,
    });
  }
  const d = w.r.at(pos + 8, 28);
  if (d.length < 28)
    throw new InputError("WAV_TRUNCATED_HEADER", {
      file,
      chunk: "ds64",
      expected: "a 28-byte ds64 chunk",
      received: `${d.length} bytes`,
    });
  return Number(d.readBigUInt64LE(8));
}

/**
 * The format chunk whose body starts at `body`: one, whole, and of an extensible format only the KSDATAFORMAT family.
 */
function fmtChunk(w: ChunkWalk, body: number, len: number): WavFormat {
  const { file, size } = w;
  if (w.fmt !== undefined)
    throw new InputError("WAV_DUPLICATE_CHUNK", {
      file,
      chunk: "fmt ",
      expected: "one format chunk",
      received: "a second 'fmt ' chunk",
    });
  if (len < 16)
    throw new InputError("WAV_BAD_FMT", {
      file,
      chunk: "fmt ",
      expected: "a format chunk of at least 16 bytes",
      received: `${len} bytes`,
    });
  if (body + len > size)
    throw new InputError("WAV_BAD_FMT", {
      file,
      chunk: "fmt ",
      expected: `the ${len} bytes its chunk header gives`,
      received: `${Math.max(0, size - body)} bytes before the file ends`,
    });
  const f = Buffer.from(w.r.at(body, Math.min(len, 40)));
  let tag = f.readUInt16LE(0);
  const bits = f.readUInt16LE(14);
  let validBits = bits;
  if (tag === 0xfffe) {
    if (f.length < 40)
      throw new InputError("WAV_BAD_FMT", {
        file,
        chunk: "fmt ",
        expected: "an extensible format chunk of 40 bytes",
        received: `${len} bytes`,
      });
    tag = f.readUInt16LE(24);
    validBits = f.readUInt16LE(18) || bits;
    if (validBits > bits)
      throw new InputError("WAV_BAD_FMT", {
        file,
        chunk: "fmt ",
        expected: `at most ${bits} valid bits per sample (the container's bits)`,
        received: `${validBits} valid bits`,
      });
    if (!f.subarray(26, 40).equals(SUBTYPE_TAIL)) {
      throw new InputError("WAV_UNSUPPORTED_ENCODING", {
        file,
        chunk: "fmt ",
        expected: "an extensible sub-format GUID of the KSDATAFORMAT_SUBTYPE family (…-0000-0010-8000-00AA00389B71)",
        received: `GUID ${f.subarray(24, 40).toString("hex")}`,
      });
    }
  }
  return {
    tag,
    channels: f.readUInt16LE(2),
    sampleRate: f.readUInt32LE(4),
    blockAlign: f.readUInt16LE(12),
    bits,
    validBits,
  };
}

/**
 * The data chunk whose samples start at `body`: one, after the format chunk, and whole. Sets w.dataStart and
 * w.dataBytes, and returns its length (from ds64 in RF64, to the file's end for an unfinished recording).
 */
function dataChunk(w: ChunkWalk, body: number, len: number): number {
  const { file, r, size } = w;
  if (w.fmt === undefined)
    throw new InputError("WAV_DATA_BEFORE_FMT", {
      file,
      chunk: "data",
      expected: "the 'fmt ' chunk before the data chunk",
      received: "data first",
    });
  if (w.dataStart >= 0)
    throw new InputError("WAV_DUPLICATE_CHUNK", {
      file,
      chunk: "data",
      expected: "one data chunk",
      received: "a second 'data' chunk",
    });
  if (w.rf64 && len === U32_MAX) {
    if (w.ds64Data === undefined)
      throw new InputError("WAV_BAD_DS64", {
        file,
        chunk: "ds64",
        expected: "a ds64 chunk with the data size",
        received: "none",
      });
    len = w.ds64Data;
  } else if (!w.rf64 && len === U32_MAX && (body + len > size || size > RIFF_MAX_BYTES)) {
    // A streaming recorder writes 0xFFFFFFFF ("size unknown") into a plain RIFF header it cannot go back to: read
    // the samples to the end of the file (whole frames only, after the layout).
    len = size - body;
    w.toEnd = true;
    w.note =
      ", data size 0xFFFFFFFF in the header (a streamed recording, size not known when written): read to the end of the file";
  } else if (
    len === 0 &&
    body + 8 <= size &&
    (!printable(r.at(body, 4).toString("latin1")) || body + 8 + r.at(body, 8).readUInt32LE(4) > size)
  ) {
    // A recorder that never closed its file leaves the size 0 with the samples after it: read them to the end.
    len = size - body;
    w.toEnd = true;
    w.note = ", data size 0 in the header (an unfinished recording): read to the end of the file";
  } else if (!w.rf64 && size - body - len > U32_MAX) {
    // A plain RIFF file holds at most 4 GiB + 8 bytes (its sizes are 32-bit). A writer that went on past that wrote
    // the data size modulo 2^32: the true size is that plus the most whole 4 GiB the file holds after it.
    const wraps = Math.floor((size - body - len) / 2 ** 32);
    w.note =
      `, data size ${len} in the header, ${wraps} x 4 GiB short of the file (a plain RIFF file over 4 GiB, ` +
      `its 32-bit size wrapped): read as ${len + wraps * 2 ** 32} bytes`;
    len += wraps * 2 ** 32;
  }
  w.dataStart = body;
  w.dataBytes = len;
  if (body + len > size) {
    throw new InputError("WAV_DATA_TRUNCATED", {
      file,
      chunk: "data",
      expected: `${len} bytes of samples as the chunk header says`,
      received: `${size - body} bytes (the file is cut short)`,
      hint: "the recording was probably not closed properly",
    });
  }
  return len;
}

/** The whole chunk list after the RIFF header (odd-sized chunks followed by a pad byte). */
function walkChunks(file: string, r: WindowReader, size: number, rf64: boolean): ChunkWalk {
  const w: ChunkWalk = {
    file,
    r,
    size,
    rf64,
    ds64Data: undefined,
    fmt: undefined,
    dataStart: -1,
    dataBytes: 0,
    calibration: undefined,
    note: "",
    toEnd: false,
    overrun: "",
  };
  let pos = 12;
  while (pos + 8 <= size) {
    const ch = r.at(pos, 8);
    const id = ch.toString("latin1", 0, 4);
    let len = ch.readUInt32LE(4);
    const body = pos + 8;
    if (w.dataStart >= 0 && !printable(id)) {
      // Chunk ids are four printable characters: after the data, anything else (a logger's preallocated zeros, a
      // longer file written over) is not chunks. Walking it as 8-byte empty chunks took 10 s for 256 MB of zeros.
      w.note += `, ${size - pos} bytes after the last chunk are not chunks (hashed, not read)`;
      break;
    }
    if (id === "ds64") w.ds64Data = ds64Chunk(w, pos, len);
    else if (rf64 && pos === 12) {
      throw new InputError("WAV_BAD_DS64", {
        file,
        chunk: "ds64",
        expected: "a ds64 chunk first in an RF64/BW64 file (EBU Tech 3306)",
        received: JSON.stringify(id),
      });
    } else if (id === "fmt ") w.fmt = fmtChunk(w, body, len);
    else if (id === "data") len = dataChunk(w, body, len);
    else if (id === CALIBRATION_CHUNK) {
      if (w.calibration !== undefined)
        throw new InputError("WAV_DUPLICATE_CHUNK", {
          file,
          chunk: CALIBRATION_CHUNK,
          expected: "one calibration chunk",
          received: `a second '${CALIBRATION_CHUNK}' chunk`,
        });
      w.calibration = readCalibration(file, Buffer.from(r.at(body, Math.min(len, 4096))).toString("utf8"));
    }
    pos = body + len + (len & 1);
    if (pos > size) {
      const name = printable(id) ? `'${id}'` : JSON.stringify(id);
      w.overrun = ` (chunk ${name} at byte ${body - 8} says ${len} bytes, past the file's end)`;
    }
  }
  return w;
}

/**
 * The format and data the walk found, refused unless both are there, the encoding is one psdgate reads, and
 * channels, block align, rate and the data's length agree; with the encoding's kind and the frames.
 */
function checkFormat(w: ChunkWalk): { fmt: WavFormat; pcm: boolean; float: boolean; frames: number } {
  const { file, size, fmt } = w;
  let { dataBytes } = w;
  if (fmt === undefined)
    throw new InputError("WAV_NO_FMT", {
      file,
      chunk: "fmt ",
      expected: "a format chunk",
      received: size < 20 ? "a truncated header" : `none${w.overrun}`,
    });
  if (w.dataStart < 0)
    throw new InputError("WAV_NO_DATA", {
      file,
      chunk: "data",
      expected: "a data chunk",
      received: w.overrun ? `none${w.overrun}` : "none (the header may be truncated)",
    });
  const { tag, channels, sampleRate, blockAlign, bits } = fmt;
  const pcm = tag === 1 && (bits === 8 || bits === 16 || bits === 24 || bits === 32);
  const float = tag === 3 && (bits === 32 || bits === 64);
  if (!pcm && !float) {
    const what =
      ENCODING_NAMES[tag] ??
      (tag === 1 || tag === 3 ? `${bits}-bit ${tag === 1 ? "PCM" : "float"}` : `format tag 0x${tag.toString(16)}`);
    throw new InputError("WAV_UNSUPPORTED_ENCODING", {
      file,
      chunk: "fmt ",
      expected: "PCM 8/16/24/32-bit or IEEE float 32/64-bit",
      received: what,
      hint: "convert the file to PCM or float WAV",
    });
  }
  if (channels === 0)
    throw new InputError("WAV_NO_CHANNELS", {
      file,
      chunk: "fmt ",
      expected: "at least one channel",
      received: "0 channels",
    });
  if (blockAlign !== (channels * bits) / 8) {
    throw new InputError("WAV_BAD_FMT", {
      file,
      chunk: "fmt ",
      expected: `block align ${(channels * bits) / 8} (channels x bytes per sample)`,
      received: `${blockAlign}`,
    });
  }
  if (!(sampleRate > 0))
    throw new InputError("WAV_BAD_FMT", {
      file,
      chunk: "fmt ",
      expected: "a sample rate above 0",
      received: `${sampleRate}`,
    });
  const rest = dataBytes % blockAlign;
  if (rest !== 0 && w.toEnd) {
    // A recording that was never closed may stop inside a frame: its whole frames are read, and the rest is said.
    dataBytes -= rest;
    w.note += ` (${rest} byte${rest > 1 ? "s" : ""} after the last whole frame left out)`;
  }
  const frames = Math.floor(dataBytes / blockAlign);
  if (dataBytes % blockAlign !== 0) {
    throw new InputError("WAV_DATA_TRUNCATED", {
      file,
      chunk: "data",
      expected: `a whole number of ${blockAlign}-byte frames`,
      received: `${dataBytes} bytes`,
    });
  }
  return { fmt, pcm, float, frames };
}

/** A WAV (RIFF, RF64 or BW64) source: its chunks walked and checked now, its samples read by `read`. */
export async function openWavTimeHistory(file: string): Promise<TimeHistorySource> {
  const { size } = await stat(file);
  let w: ChunkWalk;
  const fd = openSync(file, "r");
  try {
    const r = new WindowReader(fd, size);
    w = walkChunks(file, r, size, readRiffHeader(file, r));
  } finally {
    closeSync(fd);
  }
  const { fmt, pcm, float, frames } = checkFormat(w);
  const { channels, sampleRate, bits, validBits } = fmt;
  const { rf64, dataStart, note } = w;
  // The codes' step: 2^-(valid bits - 1) of full scale (a 24-bit code left-justified in 32 bits steps by 2^-23).
  const valid = pcm ? validBits : bits;
  const cal = w.calibration;
  return {
    info: {
      file,
      format: "wav",
      sampleRateHz: sampleRate,
      frames,
      bytes: size,
      channels: Array.from({ length: channels }, (_, i) => ({
        name: `ch${i + 1}`,
        ...(pcm ? { integerFullScale: true, quantum: 2 ** -(valid - 1) } : {}),
        ...(cal
          ? {
              declaredUnit: cal.unit.base,
              declaredUnitSpec: cal.unit,
              declaredUnitText: cal.text,
              fileScale: cal.scale,
            }
          : {}),
      })),
      layout:
        `${rf64 ? "RF64 " : ""}WAV, ${float ? "IEEE float" : "PCM"} ${bits}-bit${valid < bits ? ` (${valid} valid bits)` : ""}, ` +
        `${channels} channel${channels > 1 ? "s" : ""}` +
        `${cal ? `, calibration chunk: x${cal.scale} ${cal.unit.name}` : ""}${note}`,
    },
    read: (select, sink, onProgress) => readWavData(file, fmt, dataStart, frames, select, sink, onProgress),
  };
}

function readCalibration(file: string, text: string): WavCalibration {
  let doc: unknown;
  try {
    doc = JSON.parse(text);
  } catch {
    doc = undefined;
  }
  const o = doc as { unit?: unknown; scale?: unknown } | undefined;
  const unit = typeof o?.unit === "string" ? parseUnitSpec(o.unit) : undefined;
  const scale = o?.scale === undefined ? 1 : o.scale;
  if (unit === undefined || typeof scale !== "number" || !Number.isFinite(scale) || scale === 0) {
    throw new InputError("WAV_BAD_CALIBRATION", {
      file,
      chunk: CALIBRATION_CHUNK,
      expected: 'a JSON object {"unit": an acceleration unit, "scale": a non-zero number}',
      received: JSON.stringify(text.slice(0, 60)),
    });
  }
  return { unit, text: o!.unit as string, scale };
}

/** Frames per read: about 1 MB. */
const PIECE_BYTES = 1 << 20;
const LITTLE_ENDIAN = endianness() === "LE";

async function readWavData(
  file: string,
  f: WavFormat,
  dataStart: number,
  frames: number,
  select: number[],
  sink: BlockSink,
  onProgress?: (b: number) => void,
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
        throw new InputError("WAV_DATA_TRUNCATED", {
          file,
          chunk: "data",
          expected: `${frames} frames`,
          received: `${done + Math.floor(bytesRead / frameBytes)} (the file changed while it was read?)`,
        });
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
function decodeFrames(
  buf: Buffer,
  n: number,
  f: WavFormat,
  nch: number,
  select: number[],
  outs: Float64Array[],
  intScale: number,
): void {
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
      for (let i = 0, p = ch * 3; i < n; i++, p += nch * 3)
        o[i] = (buf[p]! | (buf[p + 1]! << 8) | ((buf[p + 2]! << 24) >> 8)) * intScale;
    } else if (f.bits === 8) {
      for (let i = 0, p = ch; i < n; i++, p += nch) o[i] = (buf[p]! - 128) / 128;
    } else {
      // Big-endian hosts: DataView, little-endian reads.
      const dv = new DataView(ab, off, n * f.blockAlign);
      const b = f.bits / 8;
      for (let i = 0; i < n; i++) {
        const q = (i * nch + ch) * b;
        o[i] =
          f.tag === 3
            ? b === 4
              ? dv.getFloat32(q, true)
              : dv.getFloat64(q, true)
            : b === 2
              ? dv.getInt16(q, true) * intScale
              : dv.getInt32(q, true) * intScale;
      }
    }
  }
}
