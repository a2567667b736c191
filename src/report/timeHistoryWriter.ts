import { InputError } from "../errors.js";
import { csvField } from "./csvField.js";
import { TemporaryOutput } from "./writeAtomic.js";
import type { AccelUnit } from "../units.js";

/**
 * Streams a time history to a WAV (IEEE float 32-bit) or CSV file through a temporary file in the
 * target folder, published on close (report/writeAtomic.ts): a crash, an error or a signal never
 * leaves a half-written output or a temporary file.
 *
 * WAV layout: RIFF/WAVE, a 28-byte 'JUNK' chunk, 'fmt ', psdgate's 'pgcl' calibration chunk (UTF-8
 * JSON `{"unit":"m/s2","scale":1}`, read back by read/wavTimeHistory.ts so the unit travels with the
 * file; other readers skip it), then 'data'. An output whose RIFF size would not fit 32 bits becomes
 * RF64 on close (EBU Tech 3306, 2009): 'RIFF' turns into 'RF64', the JUNK chunk into the 'ds64' chunk
 * with the 64-bit sizes, and the 32-bit size fields say 0xFFFFFFFF. This is the placeholder method that
 * EBU Tech 3306 recommends, so the samples never move.
 */
export interface TimeHistoryWriter {
  write(channels: Float64Array[], frames: number): Promise<void>;
  close(): Promise<void>;
  abort(): Promise<void>;
}

export interface WriterOptions {
  sampleRateHz: number;
  channelNames: string[];
  units: AccelUnit;
  force?: boolean | undefined;
  option: string;
  /** Files the output must never replace. */
  inputs: string[];
  /** @internal RIFF sizes above this become RF64 (default 0xFFFFFFFF; tests lower it). */
  rf64Above?: number | undefined;
}

export async function createTimeHistoryWriter(target: string, o: WriterOptions): Promise<TimeHistoryWriter> {
  const wav = /\.wav$/i.test(target);
  if (!wav && !/\.(csv|txt)$/i.test(target)) {
    throw new InputError("OUTPUT_FORMAT", {
      option: o.option,
      expected: "a file name ending in .wav or .csv",
      received: target,
    });
  }
  const out = await TemporaryOutput.create(target, { inputs: o.inputs, force: o.force, option: o.option });
  const nch = o.channelNames.length;
  let frames = 0;
  // Every write names its position: positional writes do not move the file offset.
  let pos = 0;
  const append = async (b: Buffer) => {
    await out.write(b, pos);
    pos += b.length;
  };
  const calibration = Buffer.from(JSON.stringify({ unit: o.units, scale: 1 }), "utf8");
  const calPadded = calibration.length + (calibration.length & 1);
  // RIFF header 12, JUNK 8 + 28, fmt 8 + 16, pgcl 8 + body, data header 8.
  const headerBytes = 12 + 36 + 24 + 8 + calPadded + 8;
  if (wav) await append(Buffer.alloc(headerBytes));
  else {
    const u = o.units === "g" ? "g" : "m/s^2";
    await append(Buffer.from(`time [s],${o.channelNames.map((n) => csvField(`${n} [${u}]`)).join(",")}\n`));
  }
  const decimals = Math.max(6, Math.ceil(Math.log10(o.sampleRateHz)) + 4);
  return {
    async write(channels, count) {
      if (wav) {
        const buf = Buffer.allocUnsafe(count * nch * 4);
        let p = 0;
        for (let i = 0; i < count; i++) for (let c = 0; c < nch; c++, p += 4) buf.writeFloatLE(channels[c]![i]!, p);
        await append(buf);
      } else {
        let s = "";
        for (let i = 0; i < count; i++) {
          s += ((frames + i) / o.sampleRateHz).toFixed(decimals);
          for (let c = 0; c < nch; c++) s += "," + channels[c]![i]!.toPrecision(9);
          s += "\n";
        }
        await append(Buffer.from(s));
      }
      frames += count;
    },
    async close() {
      if (wav) {
        const h = Buffer.alloc(headerBytes);
        const dataBytes = frames * nch * 4;
        const riffBytes = headerBytes - 8 + dataBytes;
        const rf64 = riffBytes > (o.rf64Above ?? 0xffffffff);
        h.write(rf64 ? "RF64" : "RIFF", 0, "latin1");
        h.writeUInt32LE(rf64 ? 0xffffffff : riffBytes, 4);
        h.write("WAVE", 8, "latin1");
        let p = 12;
        h.write(rf64 ? "ds64" : "JUNK", p, "latin1");
        h.writeUInt32LE(28, p + 4);
        if (rf64) {
          h.writeBigUInt64LE(BigInt(riffBytes), p + 8);
          h.writeBigUInt64LE(BigInt(dataBytes), p + 16);
          h.writeBigUInt64LE(BigInt(frames), p + 24);
          h.writeUInt32LE(0, p + 32); // no table entries
        }
        p += 36;
        h.write("fmt ", p, "latin1");
        h.writeUInt32LE(16, p + 4);
        h.writeUInt16LE(3, p + 8); // IEEE float
        h.writeUInt16LE(nch, p + 10);
        h.writeUInt32LE(Math.round(o.sampleRateHz), p + 12);
        h.writeUInt32LE(Math.round(o.sampleRateHz) * nch * 4, p + 16);
        h.writeUInt16LE(nch * 4, p + 20);
        h.writeUInt16LE(32, p + 22);
        p += 24;
        h.write("pgcl", p, "latin1");
        h.writeUInt32LE(calibration.length, p + 4);
        calibration.copy(h, p + 8);
        p += 8 + calPadded;
        h.write("data", p, "latin1");
        h.writeUInt32LE(rf64 ? 0xffffffff : dataBytes, p + 4);
        await out.write(h, 0);
      }
      await out.publish();
    },
    async abort() {
      await out.discard();
    },
  };
}
