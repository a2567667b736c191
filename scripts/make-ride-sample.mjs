// `node scripts/make-ride-sample.mjs` (also run by `npm run samples`): writes samples/marlow-uv3-ride.wav, an
// invented ride recording of the (fictional) Marlow UV-3 utility vehicle on an estate circuit: seat x, y, z
// and the cab floor z beneath the seat, 240 s at 1000 Hz, 16-bit PCM, full scale 40 m/s^2 (read it with
// --units m/s2 --scale 40). Deterministic: psdgate's seeded noise (needs a build), fixed seeds, same bytes.
//
// The model (made up, plausible): the floor's vertical motion is noise through a body-bounce resonance
// (1.4 Hz) and a wheel-hop resonance (11 Hz) plus the engine's second order; the seat's vertical motion
// is the floor's through a suspension seat (3.2 Hz, 25 % damping); fore-aft and lateral motion are
// pitch/roll resonances near 1 Hz. Phases: idle, town with stops, highway, a rough track with a pothole,
// idle again (a recording that starts and ends in the yard).
import { writeFileSync } from "node:fs";
import { GaussianNoise } from "../dist/synth/gaussianNoise.js";

const fs = 1000;
const seconds = 240;
const n = fs * seconds;
const fullScale = 40;
const g = 9.80665;

/** Bilinear biquad of an analog section b(s)/a(s) (coefficients s^2, s, 1), pre-warped at fp. */
function biquad(b, a, fp) {
  const wp = 2 * Math.PI * fp;
  const c = wp / Math.tan(wp / (2 * fs));
  const a0 = a[0] * c * c + a[1] * c + a[2];
  const k = {
    b0: (b[0] * c * c + b[1] * c + b[2]) / a0,
    b1: (2 * b[2] - 2 * b[0] * c * c) / a0,
    b2: (b[0] * c * c - b[1] * c + b[2]) / a0,
    a1: (2 * a[2] - 2 * a[0] * c * c) / a0,
    a2: (a[0] * c * c - a[1] * c + a[2]) / a0,
  };
  let s1 = 0,
    s2 = 0;
  return (x) => {
    const y = k.b0 * x + s1;
    s1 = k.b1 * x - k.a1 * y + s2;
    s2 = k.b2 * x - k.a2 * y;
    return y;
  };
}
/** Resonance with unit gain at DC: w^2 / (s^2 + w s / Q + w^2). */
const resonance = (f, q) => {
  const w = 2 * Math.PI * f;
  return biquad([0, 0, w * w], [1, w / q, w * w], f);
};
/** Band-pass w s / Q / (s^2 + w s / Q + w^2) with unit gain at f. */
const bandPass = (f, q) => {
  const w = 2 * Math.PI * f;
  return biquad([0, w / q, 0], [1, w / q, w * w], f);
};
/** Base-excitation transmissibility of a seat: (2 zeta w s + w^2) / (s^2 + 2 zeta w s + w^2). */
const seatMount = (f, zeta) => {
  const w = 2 * Math.PI * f;
  return biquad([0, 2 * zeta * w, w * w], [1, 2 * zeta * w, w * w], f);
};

// Road roughness per phase (m/s^2 of the input noise), engine order (Hz) and its amplitude.
const phases = [
  { until: 20, road: 0.0, engineHz: 26, engine: 0.08 }, // idle in the yard
  { until: 100, road: 0.9, engineHz: 45, engine: 0.12 }, // town lanes, two stops
  { until: 200, road: 1.5, engineHz: 58, engine: 0.1 }, // estate highway
  { until: 225, road: 2.6, engineHz: 40, engine: 0.15 }, // rough farm track
  { until: 240, road: 0.0, engineHz: 26, engine: 0.08 }, // back in the yard, idling
];
const stops = [
  [48, 56],
  [78, 84],
];
function phaseAt(t) {
  return phases.find((p) => t < p.until) ?? phases[phases.length - 1];
}
/** Smoothly varying road level: phase levels blended over 3 s, zero during stops. */
function roadLevel(t) {
  let level = 0;
  let weight = 0;
  for (let d = -1.5; d <= 1.5; d += 0.5) {
    const tt = Math.min(seconds - 1e-9, Math.max(0, t + d));
    const stopped = stops.some(([a, b]) => tt >= a && tt < b);
    level += stopped ? 0 : phaseAt(tt).road;
    weight++;
  }
  return level / weight;
}

const noiseZ = new GaussianNoise(1403, 0);
const noiseX = new GaussianNoise(1403, 1);
const noiseY = new GaussianNoise(1403, 2);
const sensor = new GaussianNoise(1403, 3); // each accelerometer's own noise floor, 0.004 m/s^2 r.m.s.
const bounce = resonance(1.4, 1.8);
const hop = bandPass(11, 3);
const pitch = resonance(1.1, 2.2);
const roll = resonance(0.9, 2.5);
const seat = seatMount(3.2, 0.25);
const seatFore = seatMount(2.5, 0.3);
const buf = new Float64Array(1);
const gauss = (src) => (src.fill(buf), buf[0]);

const out = new Int16Array(4 * n);
let enginePhase = 0;
let clipped = 0;
const quantise = (v) => {
  const c = Math.round((v / fullScale) * 32768);
  if (c > 32767 || c < -32768) clipped++;
  return Math.max(-32768, Math.min(32767, c));
};
for (let i = 0; i < n; i++) {
  const t = i / fs;
  const p = phaseAt(t);
  const level = roadLevel(t);
  enginePhase += (2 * Math.PI * p.engineHz) / fs;
  const engine = p.engine * Math.sin(enginePhase);
  // A pothole on the rough track at 221.5 s: a half-sine jolt of 60 ms into the road input.
  const jolt = t >= 221.5 && t < 221.56 ? 60 * Math.sin((Math.PI * (t - 221.5)) / 0.06) : 0;
  const road = level * gauss(noiseZ) * 18 + jolt;
  const floorZ = bounce(road) * 0.35 + hop(road) * 0.12 + engine;
  const seatZ = seat(floorZ);
  const seatX = seatFore(pitch(level * gauss(noiseX) * 6.6 + 0.3 * jolt) * 0.22 + 0.3 * engine);
  const seatY = roll(level * gauss(noiseY) * 6.0) * 0.2 + 0.2 * engine;
  const floor = 0.004;
  out[4 * i] = quantise(seatX + floor * gauss(sensor));
  out[4 * i + 1] = quantise(seatY + floor * gauss(sensor));
  out[4 * i + 2] = quantise(seatZ + g + floor * gauss(sensor));
  out[4 * i + 3] = quantise(floorZ + g + floor * gauss(sensor));
}
if (clipped > 0) throw new Error(`${clipped} samples beyond full scale`);

const data = Buffer.from(out.buffer);
const head = Buffer.alloc(44);
head.write("RIFF", 0);
head.writeUInt32LE(36 + data.length, 4);
head.write("WAVE", 8);
head.write("fmt ", 12);
head.writeUInt32LE(16, 16);
head.writeUInt16LE(1, 20); // PCM
head.writeUInt16LE(4, 22);
head.writeUInt32LE(fs, 24);
head.writeUInt32LE(fs * 4 * 2, 28);
head.writeUInt16LE(8, 32);
head.writeUInt16LE(16, 34);
head.write("data", 36);
head.writeUInt32LE(data.length, 40);
writeFileSync("samples/marlow-uv3-ride.wav", Buffer.concat([head, data]));
console.log(
  `wrote samples/marlow-uv3-ride.wav: ${n} frames x 4 channels at ${fs} Hz (seat x, y, z; floor z), 16-bit, full scale ${fullScale} m/s^2`,
);
