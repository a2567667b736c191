// Deterministic benchmark data: a CSV with a time column and 3 channels, and a 3-channel float32 WAV,
// both at 25.6 kHz, Gaussian noise from psdgate's seeded generator.
// node bench/generate.mjs csv|wav FRAMES OUT [SEED] [SPELLING]
// CSV spellings: fixed (6 decimals, the default), sci (channels %.6e as numpy.savetxt writes them, time
// %.9e), comma (semicolon delimiter and decimal commas, 6 decimals), counts (integer ADC counts), g (channels C's %g,
// time %.10g), tab (tab-delimited, 6 decimals), iso (ISO 8601 stamps to the microsecond, channels 6 decimals).
import { openSync, writeSync, closeSync } from "node:fs";
import { GaussianNoise } from "../dist/synth/gaussianNoise.js";
import { cg, iso, sci } from "./spellings.mjs";

const [kind, framesText, out, seedText, spelling = "fixed"] = process.argv.slice(2);
const frames = Number(framesText);
const fs = 25600;
const noise = [0, 1, 2].map((c) => new GaussianNoise(Number(seedText ?? 1), c));
const B = 8192;
const x = [new Float64Array(B), new Float64Array(B), new Float64Array(B)];
const fd = openSync(out, "w");
if (kind === "csv") {
  const row = {
    fixed: (t, a, b, c) => `${t.toFixed(6)},${a.toFixed(6)},${b.toFixed(6)},${c.toFixed(6)}\n`,
    sci: (t, a, b, c) => `${sci(t, 9)},${sci(a, 6)},${sci(b, 6)},${sci(c, 6)}\n`,
    comma: (t, a, b, c) => `${t.toFixed(6)};${a.toFixed(6)};${b.toFixed(6)};${c.toFixed(6)}\n`.replace(/\./g, ","),
    counts: (t, a, b, c) => `${t.toFixed(6)},${Math.round(a * 3000)},${Math.round(b * 3000)},${Math.round(c * 3000)}\n`,
    g: (t, a, b, c) => `${cg(t, 10)},${cg(a)},${cg(b)},${cg(c)}\n`,
    tab: (t, a, b, c) => `${t.toFixed(6)}\t${a.toFixed(6)}\t${b.toFixed(6)}\t${c.toFixed(6)}\n`,
    iso: (t, a, b, c) => `${iso(t)},${a.toFixed(6)},${b.toFixed(6)},${c.toFixed(6)}\n`,
  }[spelling];
  if (!row) throw new Error(`unknown spelling ${spelling}`);
  writeSync(
    fd,
    { comma: "time;ax [g];ay [g];az [g]\n", tab: "time\tax [g]\tay [g]\taz [g]\n" }[spelling] ??
      "time,ax [g],ay [g],az [g]\n",
  );
  for (let i = 0; i < frames; i += B) {
    const n = Math.min(B, frames - i);
    x.forEach((a, c) => noise[c].fill(a));
    let s = "";
    for (let k = 0; k < n; k++) s += row((i + k) / fs, x[0][k], x[1][k], x[2][k]);
    writeSync(fd, s);
  }
} else {
  const h = Buffer.alloc(44);
  const bytes = frames * 12;
  h.write("RIFF", 0);
  h.writeUInt32LE(36 + bytes, 4);
  h.write("WAVEfmt ", 8);
  h.writeUInt32LE(16, 16);
  h.writeUInt16LE(3, 20);
  h.writeUInt16LE(3, 22);
  h.writeUInt32LE(fs, 24);
  h.writeUInt32LE(fs * 12, 28);
  h.writeUInt16LE(12, 32);
  h.writeUInt16LE(32, 34);
  h.write("data", 36);
  h.writeUInt32LE(bytes, 40);
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
