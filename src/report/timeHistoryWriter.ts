import { InputError } from "../errors.js";
import { csvField } from "./csvField.js";
import { TemporaryOutput } from "./writeAtomic.js";
import type { AccelUnit } from "../units.js";

/**
 * Streams a time history to a WAV (IEEE float 32-bit) or CSV file through a temporary file in the
 * target folder, published on close (report/writeAtomic.ts): a crash, an error or a signal never
 * leaves a half-written output or a temporary file.
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
}

export async function createTimeHistoryWriter(target: string, o: WriterOptions): Promise<TimeHistoryWriter> {
  const wav = /\.wav$/i.test(target);
  if (!wav && !/\.(csv|txt)$/i.test(target)) {
    throw new InputError("OUTPUT_FORMAT", { option: o.option, expected: "a file name ending in .wav or .csv", received: target });
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
  if (wav) await append(Buffer.alloc(44));
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
        const h = Buffer.alloc(44);
        const dataBytes = frames * nch * 4;
        h.write("RIFF", 0, "latin1");
        h.writeUInt32LE(36 + dataBytes, 4);
        h.write("WAVEfmt ", 8, "latin1");
        h.writeUInt32LE(16, 16);
        h.writeUInt16LE(3, 20); // IEEE float
        h.writeUInt16LE(nch, 22);
        h.writeUInt32LE(Math.round(o.sampleRateHz), 24);
        h.writeUInt32LE(Math.round(o.sampleRateHz) * nch * 4, 28);
        h.writeUInt16LE(nch * 4, 32);
        h.writeUInt16LE(32, 34);
        h.write("data", 36, "latin1");
        h.writeUInt32LE(dataBytes, 40);
        await out.write(h, 0);
      }
      await out.publish();
    },
    async abort() {
      await out.discard();
    },
  };
}
