// `node bench/queueOverhead.mjs [N]`: the queue's own cost per job with the analysis taken out. N jobs are
// queued on a throwaway server, then one worker runs them with a pool that answers at once with a real
// `psd --json` line of a small recording (about 440 KB), so the time is fetch + result row + completion.
import { execFileSync } from "node:child_process";
import { existsSync, mkdirSync } from "node:fs";
import { loadavg } from "node:os";
import { startBenchServer } from "./pgServer.mjs";
import { dbTarget } from "../dist/queue/connection.js";
import { addJob } from "../dist/queue/enqueue.js";
import { openQueue } from "../dist/queue/queueStore.js";
import { runWorker } from "../dist/queue/queueWorker.js";

const N = Number(process.argv.find((a) => /^\d+$/.test(a)) ?? 300);
const sample = "bench/out/queue/small-20000-0.csv";
mkdirSync("bench/out/queue", { recursive: true });
if (!existsSync(sample)) execFileSync("node", ["bench/generate.mjs", "csv", "20000", sample, "500"]);
const full = execFileSync("node", ["bin/psdgate.js", "psd", sample, "--json"], {
  encoding: "utf8",
  maxBuffer: 1 << 26,
}).trim();
// --small-line: a 1 KB line instead, to tell the cost of the stored JSON from the cost of the queue itself.
const lineJson = process.argv.includes("--small-line")
  ? JSON.stringify({ input: JSON.parse(full).input, pad: "x".repeat(600) })
  : full;

const pg = await startBenchServer();
try {
  const store = await openQueue(dbTarget(`${pg.url}/postgres`, {}), { poolSize: 4, asyncCommit: true });
  for (let i = 0; i < N; i++)
    await addJob(store, { kind: "psd", file: `f${i}.csv`, sha256: String(i).padStart(64, "0"), options: {} }, 900);
  const figures = { sampleRateHz: 25600, durationS: 0.78, channels: [] };
  const pool = { run: async () => ({ ok: true, lineJson, verdict: null, figures }), close: async () => {} };
  const t0 = performance.now();
  const cpu0 = process.cpuUsage();
  const sum = await runWorker(store, pool, {
    jobs: 1,
    drain: true,
    pollSeconds: 0.5,
    workerName: "bench",
    signal: new AbortController().signal,
    log: () => {},
  });
  const ms = performance.now() - t0;
  const cpu = process.cpuUsage(cpu0);
  const { rows } = await store.pool.query(
    "SELECT extract(epoch FROM max(finished_on) - min(finished_on)) AS s FROM psdgate.result",
  );
  await store.close();
  const steady = (rows[0].s * 1000) / (N - 1);
  console.log(
    JSON.stringify({
      jobs: sum.done,
      lineBytes: lineJson.length,
      wallMsPerJob: ms / N,
      steadyMsPerJob: steady,
      workerCpuMsPerJob: (cpu.user + cpu.system) / 1000 / N,
      load: loadavg(),
    }),
  );
} finally {
  pg.stop();
}
