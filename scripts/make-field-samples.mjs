// Writes the field-to-lab samples: three invented road recordings of the (fictional) Corran K7 parcel van,
// an accelerometer on the electronics rack in its load bay (vertical), on motorway, town cobbles and a
// quarry track. Each is seeded Gaussian noise shaped in the frequency domain (one FFT of the whole record)
// by an invented road spectrum through an invented rack mount (22 Hz, Q 6) and load-floor mode (64 Hz,
// Q 10), so `psdgate derive` has realistic, known inputs. 32 s at 2048 Hz, 16-bit PCM with psdgate's
// 'pgcl' calibration chunk (16 g full scale). Deterministic (same bytes every run). Needs a build.
import { writeFileSync } from "node:fs";
import { GaussianNoise } from "../dist/index.js";
import { RealFft } from "../dist/estimate/spectral/realFft.js";

const fs = 2048;
const n = 1 << 16;
const fullScaleG = 16;

/** |base-excitation transmissibility|^2 of a mode at fn with quality factor q. */
function t2(f, fn, q) {
  const r = f / fn;
  const c = (r / q) ** 2;
  return (1 + c) / ((1 - r * r) ** 2 + c);
}
/** Cosine edges: 1 from lo to hi, half an octave of taper each side. */
function band(f, lo, hi) {
  if (f <= 0) return 0;
  const o = Math.log2(f);
  if (o < Math.log2(lo) - 0.5 || o > Math.log2(hi) + 0.5) return 0;
  if (o < Math.log2(lo)) return 0.5 - 0.5 * Math.cos((Math.PI * (o - Math.log2(lo) + 0.5)) / 0.5);
  if (o > Math.log2(hi)) return 0.5 + 0.5 * Math.cos((Math.PI * (o - Math.log2(hi))) / 0.5);
  return 1;
}
// Road input levels (g^2/Hz at 10 Hz), roll-off exponents and a texture hump, per road (all invented).
const roads = [
  { file: "samples/corran-k7-motorway.wav", seed: 7101, g10: 0.004, slope: -0.9, hump: [90, 0.4] },
  { file: "samples/corran-k7-cobbles.wav", seed: 7102, g10: 0.01, slope: -0.6, hump: [35, 1.5] },
  { file: "samples/corran-k7-quarry.wav", seed: 7103, g10: 0.03, slope: -0.8, hump: [18, 1.0] },
];
for (const road of roads) {
  const white = new Float64Array(n);
  new GaussianNoise(road.seed).fill(white);
  const fft = new RealFft(n);
  const X = Float64Array.from(fft.forward(white).subarray(0, n + 2));
  for (let k = 0; k <= n / 2; k++) {
    const f = (k * fs) / n;
    const [hf, ha] = road.hump;
    const input =
      f > 0 ? road.g10 * (f / 10) ** road.slope * (1 + ha * Math.exp(-0.5 * (Math.log2(f / hf) / 0.35) ** 2)) : 0;
    const g = input * band(f, 3, 500) * t2(f, 22, 6) * (0.7 + 0.3 * t2(f, 64, 10));
    // White noise of unit variance has a one-sided PSD of 2 / fs: scale each bin to G(f).
    const s = Math.sqrt((g * fs) / 2);
    X[2 * k] *= s;
    X[2 * k + 1] *= s;
  }
  X[n + 1] = 0;
  const x = new Float64Array(n);
  fft.inverseReal(X, x);
  const pcm = Buffer.alloc(2 * n);
  for (let i = 0; i < n; i++)
    pcm.writeInt16LE(Math.max(-32768, Math.min(32767, Math.round((x[i] / fullScaleG) * 32768))), 2 * i);
  const cal = Buffer.from(JSON.stringify({ unit: "g", scale: fullScaleG }), "utf8");
  const calBody = cal.length % 2 ? Buffer.concat([cal, Buffer.from(" ")]) : cal;
  const fmt = Buffer.alloc(16);
  fmt.writeUInt16LE(1, 0); // PCM
  fmt.writeUInt16LE(1, 2);
  fmt.writeUInt32LE(fs, 4);
  fmt.writeUInt32LE(fs * 2, 8);
  fmt.writeUInt16LE(2, 12);
  fmt.writeUInt16LE(16, 14);
  const chunk = (id, body) => {
    const h = Buffer.alloc(8);
    h.write(id, 0, "latin1");
    h.writeUInt32LE(body.length, 4);
    return Buffer.concat([h, body]);
  };
  const body = Buffer.concat([
    Buffer.from("WAVE", "latin1"),
    chunk("fmt ", fmt),
    chunk("pgcl", calBody),
    chunk("data", pcm),
  ]);
  const riff = Buffer.alloc(8);
  riff.write("RIFF", 0, "latin1");
  riff.writeUInt32LE(body.length, 4);
  writeFileSync(road.file, Buffer.concat([riff, body]));
  let ss = 0;
  for (let i = 0; i < n; i++) ss += x[i] * x[i];
  console.log(
    `wrote ${road.file}: ${n} samples at ${fs} Hz, ${(Math.sqrt(ss / n)).toFixed(3)} g RMS, ${8 + body.length} bytes`,
  );
}
