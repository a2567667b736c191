// Writes the shock sample: an invented recording of the (fictional) Brackley FT-2 electric forklift, an
// accelerometer on the instrument case bolted to its mast carriage, vertical (z, on 1 g) and fore-aft (x),
// while it crosses a warehouse: floor joints, a dock plate and a pallet set down hard. The background is
// seeded Gaussian noise shaped in the frequency domain by an invented drive spectrum through a mast mode
// (14 Hz, Q 8); the events are added on top as known pulses (listed below and in samples/README.md), each
// ringing the carriage's own 38 Hz mode (Q 12). 30 s at 2000 Hz, CSV with a time column, 4 decimals.
// Deterministic (same bytes every run). Needs a build.
import { writeFileSync } from "node:fs";
import { GaussianNoise } from "../dist/index.js";
import { RealFft } from "../dist/estimate/spectral/realFft.js";

const fs = 2000;
const n = 1 << 16; // shaped as a power of two, then cut to 30 s
const keep = 30 * fs;

function t2(f, fn, q) {
  const r = f / fn;
  const c = (r / q) ** 2;
  return (1 + c) / ((1 - r * r) ** 2 + c);
}
function background(seed, rmsG) {
  const white = new Float64Array(n);
  new GaussianNoise(seed).fill(white);
  const fft = new RealFft(n);
  const X = Float64Array.from(fft.forward(white).subarray(0, n + 2));
  for (let k = 0; k <= n / 2; k++) {
    const f = (k * fs) / n;
    const g = f >= 2 && f <= 400 ? (f / 10) ** -0.5 * t2(f, 14, 8) : 0;
    const s = Math.sqrt(g);
    X[2 * k] *= s;
    X[2 * k + 1] *= s;
  }
  X[n + 1] = 0;
  const x = new Float64Array(n);
  fft.inverseReal(X, x);
  let ss = 0;
  for (let i = 0; i < keep; i++) ss += x[i] * x[i];
  const k = rmsG / Math.sqrt(ss / keep);
  return x.subarray(0, keep).map((v) => v * k);
}
/** Adds a pulse shape p(t) (t in s from its start, 0 outside [0, T)) at t0, then its ring in the carriage mode. */
function addPulse(x, t0, T, p, ring) {
  const i0 = Math.round(t0 * fs);
  const wn = 2 * Math.PI * 38;
  const zeta = 1 / 24;
  for (let i = i0; i < x.length; i++) {
    const t = (i - i0) / fs;
    if (t < T) x[i] += p(t);
    else {
      const u = t - T;
      if (u > 0.5) break;
      x[i] += ring * Math.exp(-zeta * wn * u) * Math.sin(wn * Math.sqrt(1 - zeta * zeta) * u);
    }
  }
}
const z = background(2601, 0.08);
const xAxis = background(2602, 0.05);
// The known events (vertical): time of start, duration, peak, shape.
const events = [
  { t: 4.2, T: 0.01, peak: 1.6, shape: "half-sine", what: "floor joint, front wheels" },
  { t: 5.35, T: 0.01, peak: 1.3, shape: "half-sine", what: "floor joint, rear wheels" },
  { t: 11.8, T: 0.016, peak: 2.4, shape: "sawtooth", what: "dock plate edge" },
  { t: 19.5, T: 0.006, peak: -3.1, shape: "half-sine", what: "pallet set down hard (downward)" },
  { t: 24.05, T: 0.01, peak: 1.5, shape: "half-sine", what: "floor joint, front wheels" },
];
for (const e of events) {
  const p = e.shape === "sawtooth" ? (t) => (e.peak * t) / e.T : (t) => e.peak * Math.sin((Math.PI * t) / e.T);
  addPulse(z, e.t, e.T, p, 0.15 * e.peak);
  // Fore-aft sees a third of it, the same sign.
  addPulse(xAxis, e.t, e.T, (t) => p(t) / 3, 0.05 * e.peak);
}
const lines = ["time [s],z [g],x [g]"];
for (let i = 0; i < keep; i++) lines.push(`${(i / fs).toFixed(4)},${(1 + z[i]).toFixed(4)},${xAxis[i].toFixed(4)}`);
writeFileSync("samples/brackley-ft2-warehouse.csv", lines.join("\n") + "\n");
console.log(`wrote samples/brackley-ft2-warehouse.csv: ${keep} rows at ${fs} Hz, ${events.length} known events`);
