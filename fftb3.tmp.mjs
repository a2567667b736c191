import { PowerFft } from "/tmp/fft/rfft2.mjs";
const N = 4096; const p = new PowerFft(N);
const m = N/2, re = p.re, im = p.im;
re.forEach((_, i) => { re[i] = Math.random(); im[i] = Math.random(); });
function stage(L, t) {
  const step = 4 * L;
  for (let g = 0; g < m; g += step) {
    for (let j = 0; j < L; j++) {
      const w1r = t[4*j], w1i = t[4*j+1], w2r = t[4*j+2], w2i = t[4*j+3];
      const a = g + j, b = a + L, c = b + L, d = c + L;
      const ar = re[a], ai = im[a];
      let xr = re[b], xi = im[b];
      const pr = xr * w1r - xi * w1i, pi = xr * w1i + xi * w1r;
      const a1r = ar + pr, a1i = ai + pi, b1r = ar - pr, b1i = ai - pi;
      const cr = re[c], ci = im[c];
      xr = re[d]; xi = im[d];
      const qr = xr * w1r - xi * w1i, qi = xr * w1i + xi * w1r;
      const c1r = cr + qr, c1i = ci + qi, d1r = cr - qr, d1i = ci - qi;
      const ur = c1r * w2r - c1i * w2i, ui = c1r * w2i + c1i * w2r;
      const vr0 = d1r * w2r - d1i * w2i, vi0 = d1r * w2i + d1i * w2r;
      re[a] = a1r + ur; im[a] = a1i + ui; re[c] = a1r - ur; im[c] = a1i - ui;
      re[b] = b1r + vi0; im[b] = b1i - vr0; re[d] = b1r - vi0; im[d] = b1i + vr0;
    }
  }
}
function stageJ(L, t) {
  const step = 4 * L;
  for (let j = 0; j < L; j++) {
    const w1r = t[4*j], w1i = t[4*j+1], w2r = t[4*j+2], w2i = t[4*j+3];
    for (let a = j; a < m; a += step) {
      const b = a + L, c = b + L, d = c + L;
      const ar = re[a], ai = im[a];
      let xr = re[b], xi = im[b];
      const pr = xr * w1r - xi * w1i, pi = xr * w1i + xi * w1r;
      const a1r = ar + pr, a1i = ai + pi, b1r = ar - pr, b1i = ai - pi;
      const cr = re[c], ci = im[c];
      xr = re[d]; xi = im[d];
      const qr = xr * w1r - xi * w1i, qi = xr * w1i + xi * w1r;
      const c1r = cr + qr, c1i = ci + qi, d1r = cr - qr, d1i = ci - qi;
      const ur = c1r * w2r - c1i * w2i, ui = c1r * w2i + c1i * w2r;
      const vr0 = d1r * w2r - d1i * w2i, vi0 = d1r * w2i + d1i * w2r;
      re[a] = a1r + ur; im[a] = a1i + ui; re[c] = a1r - ur; im[c] = a1i - ui;
      re[b] = b1r + vi0; im[b] = b1i - vr0; re[d] = b1r - vi0; im[d] = b1i + vr0;
    }
  }
}
for (const f of [stage, stageJ, stage, stageJ]) for (const { L, t } of p.stages) {
  const t0 = performance.now(); for (let i = 0; i < 20000; i++) f(L, t); console.log(f.name, "L", L, ((performance.now() - t0) / 20000 * 1000).toFixed(2), "us");
}
