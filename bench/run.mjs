// `npm run bench`: psdgate against the numpy/scipy route and the raw byte-scan limit, on the same
// generated files, in one run. Prints a table and writes bench/out/results.json.
//   node bench/run.mjs [--sizes 1e6,1e7,5e7] [--runs 3] [--big-runs 1] [--batch 8] [--batch-rows 3e6] [--keep]
// Times are wall-clock medians; peak RSS comes from GNU time (%M). The machine is shared and noisy:
// compare the ratios, not the absolute times.
import { execFileSync, spawnSync } from "node:child_process";
import { existsSync, mkdirSync, rmSync, statSync, writeFileSync } from "node:fs";

const arg = (name, dflt) => {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 ? process.argv[i + 1] : dflt;
};
const sizes = arg("sizes", "1e6,1e7,5e7").split(",").map(Number);
const runs = Number(arg("runs", "3"));
const bigRuns = Number(arg("big-runs", "1"));
const batchFiles = Number(arg("batch", "8"));
// Rows per batch file: 3e6 is about 2 minutes at 25.6 kHz, a short shaker run; smaller files let the
// fixed start-up of the process and the pool weigh more (1e6 rows: about 1.6x instead of 1.75x).
const batchRows = Number(arg("batch-rows", "3e6"));
const keep = process.argv.includes("--keep");
const dir = "bench/out/data";
mkdirSync(dir, { recursive: true });
const TIME = existsSync("/usr/bin/time") ? "/usr/bin/time" : undefined;
const hasScipy = spawnSync("python3", ["-c", "import scipy.signal, numpy"]).status === 0;

function timed(cmd, args) {
  const full = TIME ? [TIME, ["-f", "__BENCH__ %e %M", cmd, ...args]] : [cmd, args];
  const t = performance.now();
  const r = spawnSync(full[0], full[1], { encoding: "utf8", maxBuffer: 1 << 30 });
  const wall = (performance.now() - t) / 1000;
  if (r.status !== 0 && r.status !== 1 && r.status !== 3) throw new Error(`${cmd} ${args.join(" ")} failed: ${r.stderr}`);
  const m = /__BENCH__ ([\d.]+) (\d+)/.exec(r.stderr ?? "");
  return { seconds: wall, rssMb: m ? Number(m[2]) / 1024 : NaN };
}
function median(xs) {
  const s = [...xs].sort((a, b) => a - b);
  return s[(s.length - 1) >> 1];
}
function measure(label, cmd, args, n) {
  const rs = [];
  for (let i = 0; i < n; i++) rs.push(timed(cmd, args));
  return { label, seconds: median(rs.map((r) => r.seconds)), rssMb: Math.max(...rs.map((r) => r.rssMb)), runs: n };
}

const PY_CSV = (f) => `import numpy as np, scipy.signal as ss
d = np.loadtxt("${f}", delimiter=",", skiprows=1)
for c in (1, 2, 3): ss.welch(d[:, c], fs=25600, window="hann", nperseg=4096, noverlap=2048)`;
const PY_WAV = (f) => `import numpy as np, scipy.io.wavfile as wf, scipy.signal as ss
fs, x = wf.read("${f}")
for c in (0, 1, 2): ss.welch(x[:, c].astype(np.float64), fs=fs, window="hann", nperseg=4096, noverlap=2048)`;
const PSD = ["bin/psdgate.js", "psd", "--segment", "4096", "--overlap", "0.5", "--window", "hann", "--json", "-q"];

const rows = [];
for (const n of sizes) {
  const reps = n >= 5e7 ? bigRuns : runs;
  const csv = `${dir}/bench-${n}.csv`;
  const wav = `${dir}/bench-${n}.wav`;
  if (!existsSync(csv)) execFileSync("node", ["bench/generate.mjs", "csv", String(n), csv, "1"]);
  if (!existsSync(wav)) execFileSync("node", ["bench/generate.mjs", "wav", String(n), wav, "1"]);
  const csvBytes = statSync(csv).size;
  const wavBytes = statSync(wav).size;
  const samples = 3 * n;
  const add = (format, bytes, m) => rows.push({ samplesPerChannel: n, format, route: m.label, seconds: m.seconds, mbPerS: bytes / 1e6 / m.seconds, msamplesPerS: samples / 1e6 / m.seconds, peakRssMb: m.rssMb, runs: m.runs });
  add("csv", csvBytes, measure("psdgate psd", "node", [...PSD.slice(0, 2), csv, ...PSD.slice(2)], reps));
  add("csv", csvBytes, measure("raw byte scan", "node", ["bench/rawScan.mjs", csv], reps));
  if (hasScipy) add("csv", csvBytes, measure("numpy.loadtxt + scipy.welch", "python3", ["-c", PY_CSV(csv)], reps));
  add("wav", wavBytes, measure("psdgate psd", "node", [...PSD.slice(0, 2), wav, ...PSD.slice(2)], reps));
  if (hasScipy) add("wav", wavBytes, measure("scipy.io.wavfile + scipy.welch", "python3", ["-c", PY_WAV(wav)], reps));
  if (!keep && n >= 5e7) rmSync(csv, { force: true });
}

// Batch: separate CSV recordings, one at a time and on the pool.
const batch = [];
for (let i = 0; i < batchFiles; i++) {
  const f = `${dir}/batch-${batchRows}-${i}.csv`;
  if (!existsSync(f)) execFileSync("node", ["bench/generate.mjs", "csv", String(batchRows), f, String(100 + i)]);
  batch.push(f);
}
const jobs1 = measure(`psdgate psd, ${batchFiles} files, --jobs 1`, "node", ["bin/psdgate.js", "psd", ...batch, "--jobs", "1", "--json", "-q"], runs);
const jobs2 = measure(`psdgate psd, ${batchFiles} files, --jobs 2`, "node", ["bin/psdgate.js", "psd", ...batch, "--jobs", "2", "--json", "-q"], runs);

const find = (n, format, route) => rows.find((r) => r.samplesPerChannel === n && r.format === format && r.route === route);
const ratios = sizes.map((n) => {
  const ours = find(n, "csv", "psdgate psd");
  const np = find(n, "csv", "numpy.loadtxt + scipy.welch");
  const scan = find(n, "csv", "raw byte scan");
  const w = find(n, "wav", "psdgate psd");
  const sw = find(n, "wav", "scipy.io.wavfile + scipy.welch");
  return {
    samplesPerChannel: n,
    csvSpeedupVsNumpy: np ? np.seconds / ours.seconds : null,
    csvTimeVsRawScan: ours.seconds / scan.seconds,
    wavSpeedupVsScipy: sw ? sw.seconds / w.seconds : null,
  };
});

const fmt = (x, d = 2) => (x === null || x === undefined || Number.isNaN(x) ? "-" : x.toFixed(d));
const lines = [];
lines.push(`| samples/channel | format | route | s (median) | MB/s | Msamples/s | peak RSS MB | runs |`);
lines.push(`|---|---|---|---|---|---|---|---|`);
for (const r of rows) lines.push(`| ${r.samplesPerChannel.toExponential(0)} | ${r.format} | ${r.route} | ${fmt(r.seconds)} | ${fmt(r.mbPerS, 0)} | ${fmt(r.msamplesPerS, 1)} | ${fmt(r.peakRssMb, 0)} | ${r.runs} |`);
lines.push("");
lines.push(`| samples/channel | CSV: numpy / psdgate | CSV: psdgate / raw scan | WAV: scipy / psdgate |`);
lines.push(`|---|---|---|---|`);
for (const r of ratios) lines.push(`| ${r.samplesPerChannel.toExponential(0)} | ${fmt(r.csvSpeedupVsNumpy)}x | ${fmt(r.csvTimeVsRawScan)}x | ${fmt(r.wavSpeedupVsScipy)}x |`);
lines.push("");
lines.push(`Batch of ${batchFiles} x ${batchRows.toExponential(0)}-row CSV: --jobs 1 ${fmt(jobs1.seconds)} s, --jobs 2 ${fmt(jobs2.seconds)} s, speed-up ${fmt(jobs1.seconds / jobs2.seconds)}x (peak RSS ${fmt(jobs2.rssMb, 0)} MB)`);
const text = lines.join("\n");
console.log(text);
writeFileSync("bench/out/results.json", JSON.stringify({ date: new Date().toISOString(), node: process.version, hasScipy, rows, ratios, batch: { files: batchFiles, rows: batchRows, jobs1, jobs2, speedup: jobs1.seconds / jobs2.seconds } }, null, 2));
writeFileSync("bench/out/results.md", text + "\n");
console.log("\nwrote bench/out/results.json and bench/out/results.md");
