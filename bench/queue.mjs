// `node bench/queue.mjs`: the PostgreSQL queue against the local batch on the same files, with a
// throwaway server of its own (as the tests start one). Prints a table and writes bench/out/queue.json.
//   --small N      small recordings (20 k frames x 3 channels at 25.6 kHz, about 1 MB) for the per-job overhead (default 200)
//   --big N        large recordings (--big-rows frames, 3 M by default: about 115 MB each) for the speed-up (default 6)
//   --runs N       repetitions, medians reported (default 3)
import { execFileSync, spawn, spawnSync } from "node:child_process";
import { existsSync, mkdirSync, writeFileSync } from "node:fs";
import { cpus } from "node:os";
import { join, resolve } from "node:path";
import { startBenchServer } from "./pgServer.mjs";

const arg = (name, dflt) => {
  const i = process.argv.indexOf(`--${name}`);
  return i > 0 ? Number(process.argv[i + 1]) : dflt;
};
const SMALL = arg("small", 200),
  BIG = arg("big", 6),
  BIG_ROWS = arg("big-rows", 3e6),
  RUNS = arg("runs", 3);
const BIN = resolve("bin/psdgate.js");
const dir = resolve("bench/out/queue");
mkdirSync(dir, { recursive: true });
const median = (a) => [...a].sort((x, y) => x - y)[Math.floor(a.length / 2)];

function files(kind, n, rows, seed0) {
  const out = [];
  for (let i = 0; i < n; i++) {
    const f = join(dir, `${kind}-${rows}-${i}.csv`);
    if (!existsSync(f)) execFileSync("node", ["bench/generate.mjs", "csv", String(rows), f, String(seed0 + i)]);
    out.push(`${kind}-${rows}-${i}.csv`);
  }
  return out;
}

// A throwaway PostgreSQL (bench/pgServer.mjs), durable settings.
const pg = await startBenchServer();
const server = pg.url;
let dbCount = 0;
const freshDb = () => {
  const name = `bench_${dbCount++}`;
  execFileSync("psql", [`${server}/postgres`, "-q", "-c", `CREATE DATABASE ${name}`]);
  return `${server}/${name}`;
};

const time = (fn) => {
  const t = process.hrtime.bigint();
  fn();
  return Number(process.hrtime.bigint() - t) / 1e9;
};
const local = (list, jobs) =>
  time(() => {
    const r = spawnSync("node", [BIN, "psd", ...list, "--json", "-q", "--jobs", String(jobs)], {
      cwd: dir,
      stdio: ["ignore", "ignore", "pipe"],
    });
    if (r.status !== 0) throw new Error(`local batch: ${r.stderr}`);
  });
/** Adds the files to a fresh database (not timed), then times `workers` workers of `jobs` each until drained. */
async function queued(list, workers, jobs) {
  const db = freshDb();
  const a = spawnSync("node", [BIN, "queue", "add", ...list, "--db", db], { cwd: dir, encoding: "utf8" });
  if (a.status !== 0) throw new Error(`queue add: ${a.stderr}`);
  const t0 = process.hrtime.bigint();
  await Promise.all(
    Array.from(
      { length: workers },
      () =>
        new Promise((res, rej) => {
          const p = spawn(
            "node",
            [BIN, "queue", "work", "--db", db, "--root", dir, "--drain", "-q", "--jobs", String(jobs)],
            { stdio: ["ignore", "ignore", "pipe"] },
          );
          let err = "";
          p.stderr.on("data", (d) => (err += d));
          p.on("exit", (c) => (c === 0 ? res() : rej(new Error(`worker: ${err}`))));
        }),
    ),
  );
  const wall = Number(process.hrtime.bigint() - t0) / 1e9;
  const span = JSON.parse(
    execFileSync(
      "psql",
      [
        db,
        "-At",
        "-c",
        "SELECT json_build_object('n', count(*), 's', extract(epoch FROM max(finished_on) - min(finished_on))) FROM psdgate.result",
      ],
      { encoding: "utf8" },
    ),
  );
  if (span.n !== list.length) throw new Error(`expected ${list.length} results, found ${span.n}`);
  return { wall, steadyJobsPerS: (span.n - 1) / span.s };
}

const rows = [];
const small = files("small", SMALL, 20000, 500);
const big = BIG > 0 ? files("big", BIG, BIG_ROWS, 700) : [];
const scenarios = [
  ...(SMALL > 0
    ? [
        { set: "small", list: small, label: "local batch --jobs 1", run: () => ({ wall: local(small, 1) }) },
        { set: "small", list: small, label: "queue, 1 worker --jobs 1", run: () => queued(small, 1, 1) },
        { set: "small", list: small, label: "local batch --jobs 2", run: () => ({ wall: local(small, 2) }) },
        { set: "small", list: small, label: "queue, 1 worker --jobs 2", run: () => queued(small, 1, 2) },
      ]
    : []),
  ...(BIG > 0
    ? [
        { set: "big", list: big, label: "local batch --jobs 1", run: () => ({ wall: local(big, 1) }) },
        { set: "big", list: big, label: "queue, 1 worker --jobs 1", run: () => queued(big, 1, 1) },
        { set: "big", list: big, label: "queue, 2 workers --jobs 1", run: () => queued(big, 2, 1) },
        { set: "big", list: big, label: "local batch --jobs 2", run: () => ({ wall: local(big, 2) }) },
      ]
    : []),
];
const results = new Map(scenarios.map((s) => [s, []]));
try {
  for (let r = 0; r < RUNS; r++) for (const s of scenarios) results.get(s).push(await s.run());
} finally {
  pg.stop();
}
for (const s of scenarios) {
  const rs = results.get(s);
  const wall = median(rs.map((x) => x.wall));
  const steady = rs[0].steadyJobsPerS === undefined ? null : median(rs.map((x) => x.steadyJobsPerS));
  rows.push({
    set: s.set,
    files: s.list.length,
    route: s.label,
    wallS: wall,
    jobsPerS: s.list.length / wall,
    steadyJobsPerS: steady,
  });
}
const find = (set, route) => rows.find((x) => x.set === set && x.route === route);
const overhead = (jobs) =>
  ((find("small", `queue, 1 worker --jobs ${jobs}`).wallS - find("small", `local batch --jobs ${jobs}`).wallS) /
    SMALL) *
  1000;
const summary = {
  machine: `${cpus().length} cores, Node ${process.version}`,
  date: new Date().toISOString(),
  runs: RUNS,
  smallRows: 20000,
  bigRows: BIG_ROWS,
  load: (await import("node:os")).loadavg(),
  overheadMsPerJob: SMALL > 0 ? { jobs1: overhead(1), jobs2: overhead(2) } : null,
  speedup2WorkersOver1:
    BIG > 0 ? find("big", "queue, 1 worker --jobs 1").wallS / find("big", "queue, 2 workers --jobs 1").wallS : null,
  rows,
};
writeFileSync(join("bench/out", "queue.json"), JSON.stringify(summary, null, 2));
console.log(`| set | files | route | wall s (median of ${RUNS}) | jobs/s | steady jobs/s (from result times) |`);
console.log("|---|---|---|---|---|---|");
for (const x of rows)
  console.log(
    `| ${x.set} | ${x.files} | ${x.route} | ${x.wallS.toFixed(2)} | ${x.jobsPerS.toFixed(1)} | ${x.steadyJobsPerS === null ? "" : x.steadyJobsPerS.toFixed(1)} |`,
  );
if (summary.overheadMsPerJob)
  console.log(
    `\nper-job overhead of the queue on small files: ${summary.overheadMsPerJob.jobs1.toFixed(1)} ms (--jobs 1), ${summary.overheadMsPerJob.jobs2.toFixed(1)} ms (--jobs 2)`,
  );
console.log(`load average at the end (1, 5, 15 min): ${summary.load.map((x) => x.toFixed(1)).join(", ")}`);
if (summary.speedup2WorkersOver1 !== null)
  console.log(`2 workers over 1 on ${BIG} files of ${BIG_ROWS} rows: ${summary.speedup2WorkersOver1.toFixed(2)}x`);
