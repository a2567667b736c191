import { PowerFft } from "/tmp/fft/rfft3.mjs";
const N = 4096; const p = new PowerFft(N);
const src = PowerFft.prototype.power.toString();
// build partial versions by cutting the source
const body = src.slice(src.indexOf("{") + 1, src.lastIndexOf("}"));
const cutAt = (marker) => body.slice(0, body.indexOf(marker)) + "return 0;";
const mk = (b) => new Function("x", "w", "offset", "acc", b);
const parts = { load: cutAt("const stages"), stages: cutAt("const L = this.lastL"), last: cutAt("const sc = this.sc"), all: body };
const x = new Float64Array(N).map(() => Math.random() - 0.5), w = new Float64Array(N).fill(1), acc = new Float64Array(N / 2 + 1);
for (let r = 0; r < 2; r++) for (const [k, b] of Object.entries(parts)) { const f = mk(b).bind(p); for (let i = 0; i < 2000; i++) f(x, w, 0, acc); const t = performance.now(); for (let i = 0; i < 20000; i++) f(x, w, 0, acc); console.log(k, ((performance.now() - t) / 20000 * 1000).toFixed(2), "us cumulative"); }
