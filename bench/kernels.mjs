// `npm run bench:kernels`: the two hot kernels alone, on one thread, on built code (npm run build).
//   - the CSV body parser: ns a number on generated rows like the benchmark CSV (time + 3 channels), each spelling
//     (--spellings fixed,tab,... for some);
//   - the Welch kernel SegmentPower.add against the same job done around fft.js (window pass,
//     realTransform, power pass), at 4096 points.
// Prints medians of 7 rounds. The figures in DEVELOPERS.md and bench/README.md come from here.
import FFT from "fft.js";
import { CsvBodyParser, columnPool, pieceBuffers } from "../dist/read/csvBody.js";
import { daysFromCivil } from "../dist/read/dateTimeStamp.js";
import { SegmentPower } from "../dist/estimate/spectral/segmentPower.js";
import { cg, iso, sci } from "./spellings.mjs";

const median = (xs) => [...xs].sort((a, b) => a - b)[(xs.length - 1) >> 1];

// Rows as bench/generate.mjs writes them: time and three channels, in each CSV spelling.
let seed = 7;
const rand = () => (seed = (seed * 1103515245 + 12345) >>> 0) / 2 ** 32;
const spellings = {
  fixed: (t, a, b, c) => `${t.toFixed(6)},${a.toFixed(6)},${b.toFixed(6)},${c.toFixed(6)}`,
  "sci (%.6e)": (t, a, b, c) => `${sci(t, 9)},${sci(a, 6)},${sci(b, 6)},${sci(c, 6)}`,
  "decimal comma": (t, a, b, c) =>
    `${t.toFixed(6)};${a.toFixed(6)};${b.toFixed(6)};${c.toFixed(6)}`.replace(/\./g, ","),
  counts: (t, a, b, c) => `${t.toFixed(6)},${Math.round(a * 3000)},${Math.round(b * 3000)},${Math.round(c * 3000)}`,
  "%g": (t, a, b, c) => `${cg(t, 10)},${cg(a)},${cg(b)},${cg(c)}`,
  tab: (t, a, b, c) => `${t.toFixed(6)}\t${a.toFixed(6)}\t${b.toFixed(6)}\t${c.toFixed(6)}`,
  "ISO stamps": (t, a, b, c) => `${iso(t)},${a.toFixed(6)},${b.toFixed(6)},${c.toFixed(6)}`,
};
const only =
  process.argv.indexOf("--spellings") >= 0
    ? process.argv[process.argv.indexOf("--spellings") + 1].split(",")
    : undefined;
for (const [name, row] of Object.entries(spellings)) {
  if (only && !only.includes(name)) continue;
  const lines = [];
  for (let i = 0; i < 500_000; i++)
    lines.push(row(i / 25600, (rand() - 0.5) * 4, (rand() - 0.5) * 4, (rand() - 0.5) * 4));
  const body = Buffer.from(lines.join("\n") + "\n");
  const comma = name === "decimal comma";
  const spec = {
    file: "bench",
    columns: 4,
    columnNames: ["time", "ax", "ay", "az"],
    delimiter: comma ? ";" : name === "tab" ? "\t" : ",",
    decimal: comma ? "," : ".",
    timeIndex: 0,
    selectColumns: [1, 2, 3],
    timeDateTime: name === "ISO stamps" ? { baseDays: daysFromCivil(2026, 3, 9) } : undefined,
  };
  const parser = new CsvBodyParser(spec);
  const pool = columnPool();
  const parseRound = () => {
    const t = performance.now();
    let s = 0;
    let rows = 0;
    while (s < body.length) {
      const e = body.lastIndexOf(10, Math.min(body.length, s + (1 << 20)) - 1) + 1;
      const piece = parser.parse(body, s, e, 1, pool.alloc);
      rows += piece.rows;
      pool.give(pieceBuffers(piece));
      s = e;
    }
    return ((performance.now() - t) * 1e6) / (rows * 4);
  };
  parseRound();
  console.log(
    `CSV plain rows, ${name}: ${median(Array.from({ length: 7 }, parseRound)).toFixed(1)} ns a number (${(body.length / 1e6).toFixed(0)} MB, 4 columns)`,
  );
}

const N = 4096;
const x = Float64Array.from({ length: N }, () => rand() - 0.5);
const w = Float64Array.from({ length: N }, (_, i) => 0.5 - 0.5 * Math.cos((2 * Math.PI * i) / N));
const acc = new Float64Array(N / 2 + 1);
const fft = new FFT(N);
const out = new Float64Array(2 * N);
const y = new Float64Array(N);
const aroundFftJs = () => {
  let ms = 0;
  for (let i = 0; i < N; i++) {
    const v = (x[i] - 0.01) * w[i];
    y[i] = v;
    ms += v * v;
  }
  fft.realTransform(out, y);
  for (let k = 0; k <= N / 2; k++) acc[k] += out[2 * k] * out[2 * k] + out[2 * k + 1] * out[2 * k + 1];
  return ms;
};
const kernel = new SegmentPower(N);
const ours = () => kernel.add(x, w, 0.01, 0, acc);
const perCall = (fn) => {
  for (let i = 0; i < 2000; i++) fn();
  const t = performance.now();
  for (let i = 0; i < 10000; i++) fn();
  return ((performance.now() - t) * 1000) / 10000;
};
const a = [];
const b = [];
for (let r = 0; r < 7; r++) {
  a.push(perCall(aroundFftJs));
  b.push(perCall(ours));
}
console.log(
  `Welch segment, N = ${N}: fft.js with window and power passes ${median(a).toFixed(1)} us, SegmentPower.add ${median(b).toFixed(1)} us`,
);
