// `npm run bench`: psdgate against the numpy/scipy route and the raw byte-scan limit, on the same
// generated files, in one run. Prints a table and writes bench/out/results.json.
//   node bench/run.mjs [--sizes 1e6,1e7,5e7] [--runs 5] [--big-runs 3] [--batch 8] [--batch-rows 3e6] [--keep]
//                      [--spellings fixed,sci,g,comma,tab,iso,counts] [--spelling-rows 3e6,1e7]
// (--batch 0 leaves the batch out; --sizes none, --spellings none leave those parts out.)
// The spellings part times each CSV spelling against numpy.loadtxt + scipy.signal.welch and against
// pandas.read_csv (C engine) + scipy.signal.welch; pandas is Debian's python3-pandas for /usr/bin/python3.
// Times are wall-clock medians; peak RSS comes from GNU time (%M). The machine is shared and noisy:
// compare the ratios, not the absolute times.
import { execFileSync, spawnSync } from "node:child_process";
import {
  closeSync,
  existsSync,
  mkdirSync,
  openSync,
  readFileSync,
  readSync,
  rmSync,
  statSync,
  writeFileSync,
} from "node:fs";
import { availableParallelism } from "node:os";

const arg = (name, dflt) => {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 ? process.argv[i + 1] : dflt;
};
const list = (text) => (text === "none" || text === "" ? [] : text.split(","));
const sizes = list(arg("sizes", "1e6,1e7,5e7")).map(Number);
const spellings = list(arg("spellings", "fixed,sci,g,comma,tab,iso,counts"));
const spellingRows = list(arg("spelling-rows", "3e6,1e7")).map(Number);
const runs = Number(arg("runs", "5"));
const bigRuns = Number(arg("big-runs", "3"));
const batchFiles = Number(arg("batch", "8"));
// Rows per batch file: 3e6 is about 2 minutes at 25.6 kHz, a short shaker run; smaller files let the
// fixed start-up of the process and the pool weigh more (1e6 rows: about 1.6x instead of 1.75x).
const batchRows = Number(arg("batch-rows", "3e6"));
const keep = process.argv.includes("--keep");
const dir = "bench/out/data";
mkdirSync(dir, { recursive: true });
const TIME = existsSync("/usr/bin/time") ? "/usr/bin/time" : undefined;
const hasScipy = spawnSync("python3", ["-c", "import scipy.signal, numpy"]).status === 0;
const SYS_PY = "/usr/bin/python3";
const hasPandas = spawnSync(SYS_PY, ["-c", "import pandas, scipy.signal"]).status === 0;
const pyVersions = (py, mods) =>
  spawnSync(
    py,
    [
      "-c",
      `import ${mods.join(", ")}; print(" ".join(m.__name__ + " " + m.__version__ for m in (${mods.join(", ")},)))`,
    ],
    { encoding: "utf8" },
  ).stdout.trim();

function timed(cmd, args) {
  const full = TIME ? [TIME, ["-f", "__BENCH__ %e %M", cmd, ...args]] : [cmd, args];
  const t = performance.now();
  const r = spawnSync(full[0], full[1], { encoding: "utf8", maxBuffer: 1 << 30 });
  const wall = (performance.now() - t) / 1000;
  if (r.status !== 0 && r.status !== 1 && r.status !== 3)
    throw new Error(`${cmd} ${args.join(" ")} failed: ${r.stderr}`);
  const m = /__BENCH__ ([\d.]+) (\d+)/.exec(r.stderr ?? "");
  return { seconds: wall, rssMb: m ? Number(m[2]) / 1024 : NaN };
}
function median(xs) {
  const s = [...xs].sort((a, b) => a - b);
  return s[(s.length - 1) >> 1];
}
/**
 * Reads the files once, untimed, so that every route reads them from the page cache. The development VM
 * evicts pages nobody touched for a while (a 110 MB file used ten minutes before was 4 % resident), and
 * without this the first route of a round could pay a disk read the others do not.
 */
function warmCache(files) {
  const buf = Buffer.allocUnsafe(1 << 22);
  for (const f of files) {
    const fd = openSync(f, "r");
    try {
      while (readSync(fd, buf, 0, buf.length, null) > 0);
    } finally {
      closeSync(fd);
    }
  }
}

/**
 * Runs the routes in turn, round after round (a, b, c, a, b, c, ...), so that the machine's slow
 * moments fall on every route alike, each run after its input files are read into the page cache;
 * returns each route's median and peak RSS.
 */
function measureTogether(routes, n, files = []) {
  const rs = routes.map(() => []);
  const load = [loadNow()];
  for (let i = 0; i < n; i++)
    routes.forEach((r, k) => {
      warmCache(files);
      rs[k].push(timed(r.cmd, r.args));
    });
  load.push(loadNow());
  return routes.map((r, k) => ({
    label: r.label,
    seconds: median(rs[k].map((x) => x.seconds)),
    rssMb: Math.max(...rs[k].map((x) => x.rssMb)),
    runs: n,
    load,
  }));
}

const PY_CSV = (f) => `import numpy as np, scipy.signal as ss
d = np.loadtxt("${f}", delimiter=",", skiprows=1)
for c in (1, 2, 3): ss.welch(d[:, c], fs=25600, window="hann", nperseg=4096, noverlap=2048)`;
const PY_WAV = (f) => `import numpy as np, scipy.io.wavfile as wf, scipy.signal as ss
fs, x = wf.read("${f}")
for c in (0, 1, 2): ss.welch(x[:, c].astype(np.float64), fs=fs, window="hann", nperseg=4096, noverlap=2048)`;
const PSD = ["bin/psdgate.js", "psd", "--segment", "4096", "--overlap", "0.5", "--window", "hann", "--json", "-q"];

/**
 * numpy and pandas routes for a spelling: delimiter and decimal mark; numpy.loadtxt has no decimal option, so decimal
 * commas go through a converter. With ISO stamps both read the three channels only (usecols): neither turns the
 * stamps into seconds, which psdgate does (and checks), so that row is in their favour.
 */
const SEP = { comma: ";", tab: "\\t" };
const PY_NUMPY = (f, sp) => `import numpy as np, scipy.signal as ss
d = np.loadtxt("${f}", delimiter="${SEP[sp] ?? ","}", skiprows=1${sp === "comma" ? ', converters=lambda s: float(s.replace(",", "."))' : ""}${sp === "iso" ? ", usecols=(1, 2, 3)" : ""})
for c in (${sp === "iso" ? "0, 1, 2" : "1, 2, 3"}): ss.welch(d[:, c], fs=25600, window="hann", nperseg=4096, noverlap=2048)`;
const PY_PANDAS = (f, sp) => `import pandas as pd, scipy.signal as ss
d = pd.read_csv("${f}", sep="${SEP[sp] ?? ","}", decimal="${sp === "comma" ? "," : "."}", engine="c"${sp === "iso" ? ", usecols=[1, 2, 3]" : ""}).to_numpy(dtype="float64")
for c in (${sp === "iso" ? "0, 1, 2" : "1, 2, 3"}): ss.welch(d[:, c], fs=25600, window="hann", nperseg=4096, noverlap=2048)`;
/** The machine's load while a measurement ran: the 1-minute load average before and after it. */
const loadNow = () => Number(readFileSync("/proc/loadavg", "utf8").split(" ")[0]);

const loadAtStart = loadNow();
const rows = [];
const spellingRowsOut = [];
for (const n of spellingRows) {
  for (const sp of spellings) {
    const csv = `${dir}/sp-${sp}-${n.toExponential(0).replace("+", "")}.csv`;
    if (!existsSync(csv)) execFileSync("node", ["bench/generate.mjs", "csv", String(n), csv, "1", sp]);
    const bytes = statSync(csv).size;
    const routes = [
      { label: "psdgate psd", cmd: "node", args: [...PSD.slice(0, 2), csv, ...PSD.slice(2)] },
      ...(hasScipy ? [{ label: "numpy.loadtxt + scipy.welch", cmd: "python3", args: ["-c", PY_NUMPY(csv, sp)] }] : []),
      ...(hasPandas
        ? [{ label: "pandas.read_csv (C) + scipy.welch", cmd: SYS_PY, args: ["-c", PY_PANDAS(csv, sp)] }]
        : []),
    ];
    const ms = measureTogether(routes, n >= 1e7 ? bigRuns : runs, [csv]);
    const ours = ms[0];
    const np = ms.find((m) => m.label.startsWith("numpy"));
    const pd = ms.find((m) => m.label.startsWith("pandas"));
    spellingRowsOut.push({
      rows: n,
      spelling: sp,
      bytes,
      routes: ms,
      vsNumpy: np ? np.seconds / ours.seconds : null,
      vsPandas: pd ? pd.seconds / ours.seconds : null,
    });
    console.error(`${sp} ${n}: ${ms.map((m) => `${m.label} ${m.seconds.toFixed(2)} s`).join(", ")}`);
    if (!keep && n >= 1e7) rmSync(csv, { force: true });
  }
}
for (const n of sizes) {
  const reps = n >= 5e7 ? bigRuns : runs;
  const csv = `${dir}/bench-${n}.csv`;
  const wav = `${dir}/bench-${n}.wav`;
  if (!existsSync(csv)) execFileSync("node", ["bench/generate.mjs", "csv", String(n), csv, "1"]);
  if (!existsSync(wav)) execFileSync("node", ["bench/generate.mjs", "wav", String(n), wav, "1"]);
  const csvBytes = statSync(csv).size;
  const wavBytes = statSync(wav).size;
  const samples = 3 * n;
  const add = (format, bytes, m) =>
    rows.push({
      samplesPerChannel: n,
      format,
      route: m.label,
      seconds: m.seconds,
      mbPerS: bytes / 1e6 / m.seconds,
      msamplesPerS: samples / 1e6 / m.seconds,
      peakRssMb: m.rssMb,
      runs: m.runs,
    });
  const csvRoutes = [
    { label: "psdgate psd", cmd: "node", args: [...PSD.slice(0, 2), csv, ...PSD.slice(2)] },
    { label: "raw byte scan", cmd: "node", args: ["bench/rawScan.mjs", csv] },
    ...(hasScipy ? [{ label: "numpy.loadtxt + scipy.welch", cmd: "python3", args: ["-c", PY_CSV(csv)] }] : []),
  ];
  for (const m of measureTogether(csvRoutes, reps, [csv])) add("csv", csvBytes, m);
  const wavRoutes = [
    { label: "psdgate psd", cmd: "node", args: [...PSD.slice(0, 2), wav, ...PSD.slice(2)] },
    ...(hasScipy ? [{ label: "scipy.io.wavfile + scipy.welch", cmd: "python3", args: ["-c", PY_WAV(wav)] }] : []),
  ];
  for (const m of measureTogether(wavRoutes, reps, [wav])) add("wav", wavBytes, m);
  if (!keep && n >= 5e7) rmSync(csv, { force: true });
}

// Batch: separate CSV recordings, one at a time and on the pool.
const batch = [];
for (let i = 0; i < batchFiles; i++) {
  const f = `${dir}/batch-${batchRows}-${i}.csv`;
  if (!existsSync(f)) execFileSync("node", ["bench/generate.mjs", "csv", String(batchRows), f, String(100 + i)]);
  batch.push(f);
}
const [jobs1, jobs2] =
  batchFiles > 0
    ? measureTogether(
        [1, 2].map((j) => ({
          label: `psdgate psd, ${batchFiles} files, --jobs ${j}`,
          cmd: "node",
          args: ["bin/psdgate.js", "psd", ...batch, "--jobs", String(j), "--json", "-q"],
        })),
        runs,
        batch,
      )
    : [undefined, undefined];

const find = (n, format, route) =>
  rows.find((r) => r.samplesPerChannel === n && r.format === format && r.route === route);
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
if (rows.length > 0) {
  lines.push(`| samples/channel | format | route | s (median) | MB/s | Msamples/s | peak RSS MB | runs |`);
  lines.push(`|---|---|---|---|---|---|---|---|`);
  for (const r of rows)
    lines.push(
      `| ${r.samplesPerChannel.toExponential(0)} | ${r.format} | ${r.route} | ${fmt(r.seconds)} | ${fmt(r.mbPerS, 0)} | ${fmt(r.msamplesPerS, 1)} | ${fmt(r.peakRssMb, 0)} | ${r.runs} |`,
    );
  lines.push("");
  lines.push(`| samples/channel | CSV: numpy / psdgate | CSV: psdgate / raw scan | WAV: scipy / psdgate |`);
  lines.push(`|---|---|---|---|`);
  for (const r of ratios)
    lines.push(
      `| ${r.samplesPerChannel.toExponential(0)} | ${fmt(r.csvSpeedupVsNumpy)}x | ${fmt(r.csvTimeVsRawScan)}x | ${fmt(r.wavSpeedupVsScipy)}x |`,
    );
  lines.push("");
}
if (jobs1 && jobs2)
  lines.push(
    `Batch of ${batchFiles} x ${batchRows.toExponential(0)}-row CSV: --jobs 1 ${fmt(jobs1.seconds)} s, --jobs 2 ${fmt(jobs2.seconds)} s, speed-up ${fmt(jobs1.seconds / jobs2.seconds)}x (peak RSS ${fmt(jobs2.rssMb, 0)} MB)`,
  );
if (spellingRowsOut.length > 0) {
  lines.push("");
  lines.push(
    `Machine load: 1-minute load average ${loadAtStart.toFixed(1)} at the start, ${loadNow().toFixed(1)} at the end, on ${availableParallelism()} cores (other work on the machine slows psdgate's two threads more than the one-thread Python routes).`,
  );
  lines.push("");
  lines.push(
    `CSV spellings (time + 3 channels; ${process.version}; numpy route: ${pyVersions("python3", ["numpy", "scipy"])}; pandas route: ${pyVersions(SYS_PY, ["pandas", "numpy", "scipy"])}; ${availableParallelism()} cores)`,
  );
  lines.push("");
  lines.push(
    `| rows | spelling | MB | psdgate s | numpy.loadtxt+welch s | pandas.read_csv(C)+welch s | numpy / psdgate | pandas / psdgate | psdgate GB/s | psdgate peak RSS MB | runs | load (1 min) |`,
  );
  lines.push(`|---|---|---|---|---|---|---|---|---|---|---|---|`);
  for (const r of spellingRowsOut) {
    const [o, np, pd] = [
      r.routes[0],
      r.routes.find((m) => m.label.startsWith("numpy")),
      r.routes.find((m) => m.label.startsWith("pandas")),
    ];
    lines.push(
      `| ${r.rows.toExponential(0)} | ${r.spelling} | ${fmt(r.bytes / 1e6, 0)} | ${fmt(o.seconds)} | ${fmt(np?.seconds)} | ${fmt(pd?.seconds)} | ${fmt(r.vsNumpy)}x | ${fmt(r.vsPandas)}x | ${fmt(r.bytes / 1e9 / o.seconds, 3)} | ${fmt(o.rssMb, 0)} | ${o.runs} | ${o.load.map((x) => x.toFixed(1)).join("–")} |`,
    );
  }
}
const text = lines.join("\n");
console.log(text);
writeFileSync(
  "bench/out/results.json",
  JSON.stringify(
    {
      date: new Date().toISOString(),
      node: process.version,
      hasScipy,
      hasPandas,
      rows,
      ratios,
      spellings: spellingRowsOut,
      batch:
        jobs1 && jobs2
          ? { files: batchFiles, rows: batchRows, jobs1, jobs2, speedup: jobs1.seconds / jobs2.seconds }
          : null,
    },
    null,
    2,
  ),
);
writeFileSync("bench/out/results.md", text + "\n");
console.log("\nwrote bench/out/results.json and bench/out/results.md");
