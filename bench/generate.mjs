// Deterministic benchmark data: a CSV with a time column and 3 channels, and a 3-channel float32 WAV,
// both at 25.6 kHz, Gaussian noise from psdgate's seeded generator.
// node bench/generate.mjs csv|wav FRAMES OUT [SEED]
import { openSync, writeSync, closeSync } from "node:fs";
import { GaussianNoise } from "../dist/synth/gaussianNoise.js";

const [kind, framesText, out, seedText] = process.argv.slice(2);
const frames = Number(framesText);
const fs = 25600;
const noise = [0, 1, 2].map((c) => new GaussianNoise(Number(seedText ?? 1), c));
const B = 8192;
const x = [new Float64Array(B), new Float64Array(B), new Float64Array(B)];
const fd = openSync(out, "w");
if (kind === "csv") {
  writeSync(fd, "time,ax [g],ay [g],az [g]\n");
  for (let i = 0; i < frames; i += B) {
    const n = Math.min(B, frames - i);
    x.forEach((a, c) => noise[c].fill(a));
    let s = "";
    for (let k = 0; k < n; k++) s += `${((i + k) / fs).toFixed(6)},${x[0][k].toFixed(6)},${x[1][k].toFixed(6)},${x[2][k].toFixed(6)}\n`;
    writeSync(fd, s);
  }
} else {
  const h = Buffer.alloc(44);
  const bytes = frames * 12;
  h.write("RIFF", 0); h.writeUInt32LE(36 + bytes, 4); h.write("WAVEfmt ", 8); h.writeUInt32LE(16, 16); h.writeUInt16LE(3, 20);
  h.writeUInt16LE(3, 22); h.writeUInt32LE(fs, 24); h.writeUInt32LE(fs * 12, 28); h.writeUInt16LE(12, 32); h.writeUInt16LE(32, 34);
  h.write("data", 36); h.writeUInt32LE(bytes, 40);
  writeSync(fd, h);
  const buf = Buffer.alloc(B * 12);
  for (let i = 0; i < frames; i += B) {
    const n = Math.min(B, frames - i);
    x.forEach((a, c) => noise[c].fill(a));
    for (let k = 0; k < n; k++) for (let c = 0; c < 3; c++) buf.writeFloatLE(x[c][k], (k * 3 + c) * 4);
    writeSync(fd, buf, 0, n * 12);
  }
}
closeSync(fd);
