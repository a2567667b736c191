import FFT from "fft.js";
import { PowerFft } from "/tmp/fft/rfft4.mjs";
for (const N of [4, 8, 16, 32, 64, 128, 256, 512, 1024, 2048, 4096, 8192, 16384]) {
const f = new FFT(N); const o64 = new Float64Array(2*N);
const x = new Float64Array(N).map(() => Math.random() - 0.5);
const w = new Float64Array(N).map((_, i) => 0.5 - 0.5 * Math.cos(2 * Math.PI * i / N));
const off = 0.1;
const xw = x.map((v, i) => (v - off) * w[i]);
const a1 = new Float64Array(N/2+1), a2 = new Float64Array(N/2+1);
f.realTransform(o64, xw); for (let k = 0; k <= N/2; k++) a1[k] = o64[2*k]**2 + o64[2*k+1]**2;
const p = new PowerFft(N); p.power(x, w, off, a2);
let err = 0, mx = 0; for (let k = 0; k <= N/2; k++) { err = Math.max(err, Math.abs(a1[k]-a2[k])); mx = Math.max(mx, a1[k]); }
console.log(N, "max rel err", err/mx);
if (N === 4096) {
const acc = new Float64Array(N/2+1);
for (const [name, fn] of [["fft.js real + window + power", () => { for (let i=0;i<N;i++) xw[i]=(x[i]-off)*w[i]; f.realTransform(o64, xw); for (let k = 0; k <= N/2; k++) acc[k] += o64[2*k]**2 + o64[2*k+1]**2; }], ["own", () => p.power(x, w, off, acc)]]) {
  for (let r = 0; r < 3; r++) { const t = performance.now(); for (let i = 0; i < 20000; i++) fn(); console.log(name, ((performance.now() - t) / 20000 * 1000).toFixed(2), "us"); }
}}
}
