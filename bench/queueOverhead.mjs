// `node bench/queueOverhead.mjs [N]`: the queue's own cost per job with the analysis taken out. N jobs are
// queued on a throwaway server, then one worker runs them with a pool that answers at once with a real
// `psd --json` line of a small recording (about 440 KB), so the time is fetch + result row + completion.
import { execFileSync } from "node:child_process";
import { chownSync, existsSync, mkdtempSync, rmSync } from "node:fs";
import { createServer } from "node:net";
import { loadavg, tmpdir, userInfo } from "node:os";
import { join } from "node:path";
import { dbTarget } from "../dist/queue/connection.js";
import { addJob } from "../dist/queue/enqueue.js";
import { openQueue } from "../dist/queue/queueStore.js";
import { runWorker } from "../dist/queue/queueWorker.js";

const N = Number(process.argv.find((a) => /^\d+$/.test(a)) ?? 300);
const sample = "bench/out/queue/small-20000-0.csv";
if (!existsSync(sample)) execFileSync("node", ["bench/generate.mjs", "csv", "20000", sample, "500"]);
const full = execFileSync("node", ["bin/psdgate.js", "psd", sample, "--json"], { encoding: "utf8", maxBuffer: 1 << 26 }).trim();
// --small-line: a 1 KB line instead, to tell the cost of the stored JSON from the cost of the queue itself.
const lineJson = process.argv.includes("--small-line") ? JSON.stringify({ input: JSON.parse(full).input, pad: "x".repeat(600) }) : full;

const bin = ["/usr/lib/postgresql/15/bin", "/usr/local/bin", "/usr/bin"].find((d) => existsSync(join(d, "initdb")));
const dir = mkdtempSync(join(tmpdir(), "psdgate-bench-pg-"));
const asRoot = userInfo().uid === 0;
const pgRun = (cmd, args) => (asRoot ? execFileSync("runuser", ["-u", "postgres", "--", join(bin, cmd), ...args], { stdio: "pipe" }) : execFileSync(join(bin, cmd), args, { stdio: "pipe" }));
if (asRoot) chownSync(dir, Number(execFileSync("id", ["-u", "postgres"], { encoding: "utf8" })), Number(execFileSync("id", ["-g", "postgres"], { encoding: "utf8" })));
const port = await new Promise((r) => { const s = createServer(); s.listen(0, "127.0.0.1", () => { const p = s.address().port; s.close(() => r(p)); }); });
pgRun("initdb", ["-D", join(dir, "db"), "-A", "trust", "-U", "postgres"]);
pgRun("pg_ctl", ["-D", join(dir, "db"), "-w", "-o", `-p ${port} -k ${dir} -c listen_addresses=127.0.0.1`, "-l", join(dir, "log"), "start"]);
try {
  const store = await openQueue(dbTarget(`postgres://postgres@127.0.0.1:${port}/postgres`, {}), { poolSize: 4, asyncCommit: true });
  for (let i = 0; i < N; i++) await addJob(store, { kind: "psd", file: `f${i}.csv`, sha256: String(i).padStart(64, "0"), options: {} }, 900);
  const figures = { sampleRateHz: 25600, durationS: 0.78, channels: [] };
  const pool = { run: async () => ({ ok: true, lineJson, verdict: null, figures }), close: async () => {} };
  const t0 = performance.now();
  const cpu0 = process.cpuUsage();
  const sum = await runWorker(store, pool, { jobs: 1, drain: true, pollSeconds: 0.5, workerName: "bench", signal: new AbortController().signal, log: () => {} });
  const ms = performance.now() - t0;
  const cpu = process.cpuUsage(cpu0);
  const { rows } = await store.pool.query("SELECT extract(epoch FROM max(finished_on) - min(finished_on)) AS s FROM psdgate.result");
  await store.close();
  const steady = (rows[0].s * 1000) / (N - 1);
  console.log(JSON.stringify({ jobs: sum.done, lineBytes: lineJson.length, wallMsPerJob: ms / N, steadyMsPerJob: steady, workerCpuMsPerJob: (cpu.user + cpu.system) / 1000 / N, load: loadavg() }));
} finally {
  pgRun("pg_ctl", ["-D", join(dir, "db"), "-w", "-m", "fast", "stop"]);
  rmSync(dir, { recursive: true, force: true });
}
