import { PowerFft } from "/tmp/fft/rfft2.mjs";
const N = 4096; const p = new PowerFft(N);
const x = new Float64Array(N).map(() => Math.random() - 0.5);
const w = new Float64Array(N).fill(1); const acc = new Float64Array(N/2+1);
// instrument by copying method parts
const src = PowerFft.prototype.power.toString();
for (let r = 0; r < 3; r++) { const t = performance.now(); for (let i = 0; i < 20000; i++) p.power(x, w, 0, acc); console.log("all", ((performance.now() - t) / 20000 * 1000).toFixed(2)); }
// load only
const m = N/2, re = p.re, im = p.im, rev = p.rev;
function load() { let s0=0,s1=0; for (let i = 0; i < m; i++) { const r = rev[i]; const u = x[2*i]*w[2*i], v = x[2*i+1]*w[2*i+1]; re[r] = u; im[r] = v; s0 += u*u; s1+=v*v; } return s0+s1; }
function post() { const sc = p.sc, ss = p.ss; for (let k = 1; k < m; k++) { const ar = re[k], ai = im[k], br = re[m - k], bi = -im[m - k]; const er = ar + br, ei = ai + bi; const dr = ar - br, di = ai - bi; const c = sc[k], sn = ss[k]; const fr = c * di + sn * dr, fi = sn * di - c * dr; const Xr = er + fr, Xi = ei + fi; acc[k] += 0.25 * (Xr * Xr + Xi * Xi); } }
for (const [n, f] of [["load", load], ["post", post]]) for (let r = 0; r < 2; r++) { const t = performance.now(); for (let i = 0; i < 20000; i++) f(); console.log(n, ((performance.now() - t) / 20000 * 1000).toFixed(2)); }
