// Writes samples/quarry-bend-bracket.csv: an invented fixture survey at the (fictional) Quarry Bend lab.
// A sensor-mount bracket on the shaker table, accelerometers on the base (the control point), the
// bracket tip and the cable clamp. The base is seeded band-limited random (20-1000 Hz); the tip and
// clamp follow from it through invented modal transfer functions, plus a little independent sensor
// noise, so `psdgate transfer` has known answers: tip modes at 185 Hz (Q 12) and 620 Hz (Q 18),
// clamp mode at 410 Hz (Q 8). Deterministic (same bytes every run). Needs a build (npm ci does it).
import { writeFileSync } from "node:fs";
import { GaussianNoise } from "../dist/index.js";
import { RealFft } from "../dist/estimate/spectral/realFft.js";

const fs = 2560;
const n = 1 << 16; // 25.6 s
const noise = new GaussianNoise(1501);
const white = new Float64Array(n);
noise.fill(white);
const fft = new RealFft(n);
const X = Float64Array.from(fft.forward(white).subarray(0, n + 2));

/** Base-excitation transmissibility T = (1 + i 2 zeta r) / (1 - r^2 + i 2 zeta r) as [re, im]. */
function T(f, fn, q) {
  const r = f / fn;
  const di = r / q;
  const dr = 1 - r * r;
  const den = dr * dr + di * di;
  return [(dr + di * di) / den, (di * dr - di) / den];
}
/** Band shape of the base: 1 from 20 to 1000 Hz with half-octave cosine edges. */
function band(f) {
  if (f <= 0) return 0;
  const o = Math.log2(f);
  const lo = Math.log2(20);
  const hi = Math.log2(1000);
  if (o < lo - 0.5 || o > hi + 0.5) return 0;
  if (o < lo) return 0.5 - 0.5 * Math.cos((Math.PI * (o - lo + 0.5)) / 0.5);
  if (o > hi) return 0.5 + 0.5 * Math.cos((Math.PI * (o - hi)) / 0.5);
  return 1;
}
const gain = 2.5; // sets the base near 2.4 g RMS
const spectra = { base: new Float64Array(n + 2), tip: new Float64Array(n + 2), clamp: new Float64Array(n + 2) };
for (let k = 0; k <= n / 2; k++) {
  const f = (k * fs) / n;
  const s = band(f) * gain;
  const br = X[2 * k] * s;
  const bi = X[2 * k + 1] * s;
  const [a1r, a1i] = T(f, 185, 12);
  const [a2r, a2i] = T(f, 620, 18);
  const hr = a1r + 0.35 * (a2r - 1);
  const hi = a1i + 0.35 * a2i;
  const [cr, ci] = T(f, 410, 8);
  spectra.base[2 * k] = br;
  spectra.base[2 * k + 1] = bi;
  spectra.tip[2 * k] = br * hr - bi * hi;
  spectra.tip[2 * k + 1] = br * hi + bi * hr;
  spectra.clamp[2 * k] = br * cr - bi * ci;
  spectra.clamp[2 * k + 1] = br * ci + bi * cr;
}
// Nyquist bin must be real for a real signal.
for (const s of Object.values(spectra)) s[n + 1] = 0;
const channels = {};
for (const [name, s] of Object.entries(spectra)) {
  const x = new Float64Array(n);
  fft.inverseReal(s, x);
  // Independent sensor noise, 0.05 g RMS on each accelerometer.
  const e = new Float64Array(n);
  new GaussianNoise(1502, name.length).fill(e);
  for (let i = 0; i < n; i++) x[i] += 0.05 * e[i];
  channels[name] = x;
}
let out = "time [s],base [g],tip [g],clamp [g]\n";
for (let i = 0; i < n; i++) {
  out += `${(i / fs).toFixed(6)},${channels.base[i].toPrecision(6)},${channels.tip[i].toPrecision(6)},${channels.clamp[i].toPrecision(6)}\n`;
}
writeFileSync("samples/quarry-bend-bracket.csv", out);
console.log(`wrote samples/quarry-bend-bracket.csv: ${n} rows at ${fs} Hz, ${out.length} bytes`);
