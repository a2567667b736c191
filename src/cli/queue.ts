import { availableParallelism, hostname } from "node:os";
import { resolve } from "node:path";
import type { Command } from "commander";
import { InputError } from "../errors.js";
import { fixed, sig, signedDb, table } from "../report/format.js";
import { accelLabel, type AccelUnit } from "../units.js";
import { VERSION } from "../version.js";
import type { DbTarget } from "../queue/connection.js";
import type { Job } from "../queue/job.js";
import type { QueueStore } from "../queue/queueStore.js";
import { expandFiles } from "./fileList.js";
import type { CliIo } from "./io.js";
import {
  addBandOptions,
  addReadingOptions,
  addSpectrumOptions,
  analysisOptions,
  numberOption,
  type ParsedCommon,
} from "./options.js";

// pg and pg-boss load only when a queue command runs: the other commands never pay for them.
const connection = () => import("../queue/connection.js");
const store = () => import("../queue/queueStore.js");

interface DbFlags {
  db?: string;
  json?: boolean;
}

const dbOption = (cmd: Command) =>
  cmd.option(
    "--db <url>",
    "PostgreSQL URL postgres://user@host:port/database (default: the PG* environment variables; keep the password in PGPASSWORD or ~/.pgpass)",
  );

/** What the queue's subcommands share: the environment (PG*), stdin, and the output streams. */
interface QueueCli {
  io: CliIo;
  env: NodeJS.ProcessEnv;
  readStdin: () => Promise<string>;
}

/** Opens the queue for a one-shot command; a server that does not answer is the user's to fix. */
async function open(c: QueueCli, o: DbFlags, poolSize = 2): Promise<QueueStore> {
  const { dbTarget, redact } = await connection();
  const target = dbTarget(o.db, c.env);
  if (target.warning) c.io.stderr(`${target.warning}\n`);
  const { openQueue, DbUnreachable } = await store();
  try {
    return await openQueue(target, { poolSize });
  } catch (e) {
    if (e instanceof DbUnreachable)
      throw new InputError("DB_UNREACHABLE", {
        option: "--db",
        expected: "a PostgreSQL server that accepts the connection",
        received: e.message,
      });
    if (e instanceof InputError) throw e;
    throw new Error(redact((e as Error).message, target));
  }
}

/** Runs `fn` with the queue open and closes it; error text passes through the redaction. */
async function withQueue<T>(c: QueueCli, o: DbFlags, fn: (s: QueueStore) => Promise<T>, poolSize?: number): Promise<T> {
  const s = await open(c, o, poolSize);
  try {
    return await fn(s);
  } catch (e) {
    if (e instanceof InputError) throw e;
    const { redact } = await connection();
    throw new Error(redact((e as Error).message, s.target));
  } finally {
    await s.close();
  }
}

/**
 * `psdgate queue add|work|status|results`: recordings as jobs in a PostgreSQL queue (pg-boss), worked
 * by any number of `queue work` processes on any number of machines, results kept in the database.
 */
export function registerQueue(program: Command, io: CliIo): void {
  const c: QueueCli = { io, env: io.env ?? {}, readStdin: io.readStdin ?? (async () => "") };
  const queue = program
    .command("queue")
    .description(
      "recordings as jobs in a PostgreSQL queue, worked by any number of machines; results kept in the database",
    );
  registerAdd(queue, c);
  registerWork(queue, c);
  registerStatus(queue, c);
  registerResults(queue, c);
}

type AddFlags = ParsedCommon & DbFlags & { profile?: string; filesFrom?: string; root?: string; expireAfter: number };

function registerAdd(queue: Command, c: QueueCli): void {
  addBandOptions(
    addSpectrumOptions(
      addReadingOptions(
        dbOption(
          queue
            .command("add")
            .argument("[files...]", "recordings: CSV or WAV, globs, or - for a list on stdin")
            .description(
              "queue one job per recording (a check with --profile, else a psd); the same recording with the same settings is queued once",
            ),
        ),
      ),
    ),
  )
    .option("-p, --profile <file>", "the required profile: jobs judge against it (JSON, YAML or CSV)")
    .option("--files-from <list>", "read recording paths, one per line, from this file (- for stdin)")
    .option(
      "--root <dir>",
      "the folder job paths are relative to; every worker is started with the same folder as its --root (default: the current folder)",
    )
    .option(
      "--expire-after <s>",
      "seconds after which a job held by a worker that stopped answering goes back to the queue",
      numberOption(
        "--expire-after",
        (x) => Number.isInteger(x) && x >= 1 && x <= 86400,
        "whole seconds from 1 to 86400",
      ),
      900,
    )
    .option("--json", "one JSON line per recording: file, added (true/false), job id and, when not added, its state")
    .action((args: string[], o: AddFlags) => addJobs(c, args, o));
}

async function addJobs(c: QueueCli, args: string[], o: AddFlags): Promise<void> {
  const io = c.io;
  const { jobPathOf } = await import("../queue/jobPath.js");
  const { fileIdentity, addJob } = await import("../queue/enqueue.js");
  const root = resolve(o.root ?? ".");
  const files = await expandFiles(args, o.filesFrom, c.readStdin);
  let profile: Job["profile"];
  if (o.profile !== undefined) {
    const { loadProfile } = await import("../analyses/checkRecording.js");
    const p = await loadProfile(o.profile);
    profile = { path: await jobPathOf(root, o.profile, "--profile"), sha256: p.sha256 };
  }
  const options = analysisOptions(o);
  // Every path and hash first: a bad file stops the command before anything is queued.
  const jobs: Job[] = [];
  for (const f of files) {
    const file = await jobPathOf(root, f, "--root");
    const id = await fileIdentity(f, f);
    jobs.push({ kind: profile ? "check" : "psd", file, sha256: id.sha256, bytes: id.bytes, options, profile });
  }
  await withQueue(c, o, async (s) => {
    let added = 0;
    for (const job of jobs) {
      const r = await addJob(s, job, o.expireAfter);
      if (r.added) added++;
      if (o.json) io.stdout(JSON.stringify(r) + "\n");
      else if (!r.added)
        io.stderr(
          `psdgate: ${r.file}: already queued with the same recording (SHA-256) and settings, job ${r.jobId} (${r.state}): nothing added (a failed job is queued again by adding it again)\n`,
        );
      else if (r.requeued)
        io.stderr(
          `psdgate: ${r.file}: queued again as job ${r.jobId} (job ${r.requeued.jobId} had failed; its failed result is replaced)\n`,
        );
    }
    io.stderr(`psdgate: ${added} job(s) added, ${jobs.length - added} already there, on ${s.target.label}\n`);
  });
}

type WorkFlags = DbFlags & {
  jobs?: number;
  root?: string;
  drain?: boolean;
  poll: number;
  quiet?: boolean;
  reportDir?: string;
};

function registerWork(queue: Command, c: QueueCli): void {
  dbOption(
    queue
      .command("work")
      .description(
        "work jobs from the queue, N analyses at once. An input error fails its job at once; an internal error is retried twice (after 5-10 s, then 10-20 s). SIGTERM finishes the jobs in hand, then exits",
      ),
  )
    .option(
      "-j, --jobs <n>",
      "analyses at once (default: the number of cores)",
      numberOption("--jobs", (x) => Number.isInteger(x) && x >= 1 && x <= 256, "a whole number from 1 to 256"),
    )
    .option(
      "--root <dir>",
      "jobs may read only under this folder; their paths are relative to it (default: the current folder)",
    )
    .option("--drain", "exit once no job is queued or active")
    .option(
      "--poll <s>",
      "seconds between looks at an empty queue",
      numberOption("--poll", (x) => x >= 0.5 && x <= 60, "seconds from 0.5 to 60"),
      0.5,
    )
    .option(
      "--report-dir <dir>",
      "write each check's HTML report here, at the recording's path with .html (made if missing)",
    )
    .option("-q, --quiet", "no line per finished job on stderr")
    .action((o: WorkFlags) => work(c, o));
}

/** `--report-dir` made if missing, as an absolute path. */
async function workReportDir(o: WorkFlags): Promise<string | undefined> {
  if (o.reportDir === undefined) return undefined;
  const { makeFolders } = await import("../report/writeAtomic.js");
  const reportDir = resolve(o.reportDir);
  await makeFolders(reportDir).catch((e: NodeJS.ErrnoException) => {
    throw new InputError("OUTPUT_UNWRITABLE", {
      option: "--report-dir",
      expected: "a folder that exists or can be made",
      received: `${o.reportDir} (${e.code})`,
    });
  });
  return reportDir;
}

/** SIGTERM and SIGINT: the first finishes the jobs in hand and takes no more, a second stops at once. */
function stopOnSignals(say: (s: string) => void): { stop: AbortController; release: () => void } {
  const stop = new AbortController();
  const onSignal = (sig: string) => () => {
    if (stop.signal.aborted) {
      // A second signal: stop now. Jobs in hand stay active and are handed on after their expiry.
      say(`psdgate: ${sig} again: stopping now; the jobs in hand go back to the queue after their expiry`);
      process.exit(sig === "SIGINT" ? 130 : 143);
    }
    say(`psdgate: ${sig}: finishing the jobs in hand, taking no more (send it again to stop at once)`);
    stop.abort();
  };
  const term = onSignal("SIGTERM");
  const int = onSignal("SIGINT");
  process.on("SIGTERM", term);
  process.on("SIGINT", int);
  return { stop, release: () => (process.off("SIGTERM", term), process.off("SIGINT", int)) };
}

/**
 * The queue opened for a worker: a worker may start before the server does, or outlive a restart of it, so it waits
 * with back-off.
 */
async function openForWork(
  target: DbTarget,
  jobs: number,
  signal: AbortSignal,
  say: (s: string) => void,
): Promise<QueueStore | undefined> {
  const { redact } = await connection();
  const { openQueue, DbUnreachable } = await store();
  let s: QueueStore | undefined;
  for (let failures = 1; !s && !signal.aborted; failures++) {
    try {
      s = await openQueue(target, {
        poolSize: jobs + 2,
        supervise: true,
        asyncCommit: true,
        onError: (m) => say(`psdgate: database: ${m}`),
      });
    } catch (e) {
      if (e instanceof InputError) throw e;
      if (!(e instanceof DbUnreachable)) throw new Error(redact((e as Error).message, target));
      const wait = Math.min(30, 2 ** (failures - 1));
      say(`psdgate: cannot reach ${e.message}; trying again in ${wait} s`);
      await new Promise<void>((r) => {
        const t = setTimeout(r, wait * 1000);
        signal.addEventListener("abort", () => (clearTimeout(t), r()), { once: true });
      });
    }
  }
  return s;
}

async function work(c: QueueCli, o: WorkFlags): Promise<void> {
  const { dbTarget, redact } = await connection();
  await store();
  const { createJobPool } = await import("../queue/jobPool.js");
  const { runWorker } = await import("../queue/queueWorker.js");
  const { realpath } = await import("node:fs/promises");
  const target: DbTarget = dbTarget(o.db, c.env);
  if (target.warning) c.io.stderr(`${target.warning}\n`);
  const root = await realpath(resolve(o.root ?? ".")).catch(() => {
    throw new InputError("FILE_UNREADABLE", {
      option: "--root",
      expected: "a folder that exists",
      received: o.root ?? ".",
    });
  });
  const jobs = o.jobs ?? availableParallelism();
  const reportDir = await workReportDir(o);
  const say = (s: string) => c.io.stderr(redact(s, target) + "\n");
  const { stop, release } = stopOnSignals(say);
  let s: QueueStore | undefined;
  try {
    s = await openForWork(target, jobs, stop.signal, say);
    if (!s) return;
    const name = `${hostname()}:${process.pid}`;
    say(
      `psdgate ${VERSION}: worker ${name} on ${target.label}, ${jobs} analyses at once, root ${root}${reportDir ? `, reports in ${reportDir}` : ""}${o.drain ? ", until the queue is empty" : ""}`,
    );
    const pool = createJobPool(jobs, root, reportDir);
    try {
      const sum = await runWorker(s, pool, {
        jobs,
        drain: o.drain === true,
        pollSeconds: o.poll,
        workerName: name,
        signal: stop.signal,
        log: say,
        onFinished: o.quiet ? undefined : (file, what, sec) => say(`${file}  ${what}  ${sec.toFixed(2)} s`),
      });
      say(
        `psdgate: worker ${name} stopped: ${sum.done} done, ${sum.failed} failed, ${sum.retried} handed back for a retry${sum.discarded ? `, ${sum.discarded} finished elsewhere first` : ""}`,
      );
    } finally {
      await pool.close();
    }
  } finally {
    release();
    await s?.close();
  }
}

function registerStatus(queue: Command, c: QueueCli): void {
  const io = c.io;
  dbOption(
    queue
      .command("status")
      .description("how many jobs are queued, active, done and failed, and the verdicts of the done"),
  )
    .option("--json", "print one JSON object")
    .action(async (o: DbFlags) => {
      const { queueStatus } = await import("../queue/queueReport.js");
      await withQueue(c, o, async (s) => {
        const st = await queueStatus(s);
        if (o.json) io.stdout(JSON.stringify(st) + "\n");
        else {
          io.stdout(`psdgate ${VERSION}: queue on ${s.target.label}\n`);
          io.stdout(
            table([
              ["queued", "active", "done", "failed", "pass", "fail", "inconclusive"],
              [
                st.queued,
                st.active,
                st.done,
                st.failed,
                st.verdicts.pass,
                st.verdicts.fail,
                st.verdicts.inconclusive,
              ].map(String),
            ]) + "\n",
          );
        }
      });
    });
}

function registerResults(queue: Command, c: QueueCli): void {
  dbOption(
    queue
      .command("results")
      .description("the results kept in the database: JSON Lines as a batch prints them, or a summary table"),
  )
    .option("--json", "one JSON line per recording, as `check --json` / `psd --json` print for several files")
    .option("--since <time>", "only jobs finished after this time (ISO 8601, e.g. 2026-12-01T18:00Z)")
    .action((o: DbFlags & { since?: string }) => results(c, o));
}

async function results(c: QueueCli, o: DbFlags & { since?: string }): Promise<void> {
  const io = c.io;
  let since: Date | undefined;
  if (o.since !== undefined) {
    since = new Date(o.since);
    if (Number.isNaN(since.getTime()))
      throw new InputError("OPTION_INVALID", {
        option: "--since",
        expected: "a time such as 2026-12-01T18:00Z",
        received: JSON.stringify(o.since),
      });
  }
  const { queueResults } = await import("../queue/queueReport.js");
  await withQueue(c, o, async (s) => {
    const rows: string[][] = [["file", "channel", "RMS", "vs required", "DOF", "Parseval", "verdict"]];
    let n = 0;
    for await (const r of queueResults(s, since)) {
      n++;
      if (o.json) {
        io.stdout(JSON.stringify(r.line) + "\n");
        continue;
      }
      if (r.outcome === "failed" || !r.figures) {
        rows.push([r.path, "", "", "", "", "", `error ${r.errorCode ?? ""}`]);
        continue;
      }
      for (const x of r.figures.channels) {
        rows.push([
          r.path,
          x.name,
          `${sig(x.rms, 4)} ${accelLabel(x.units as AccelUnit)}`,
          x.rmsDeviationDb === null ? "" : signedDb(x.rmsDeviationDb),
          fixed(x.dof, 1),
          x.parsevalRatio === null ? "" : fixed(x.parsevalRatio, 4),
          x.verdict ?? "done",
        ]);
      }
    }
    if (!o.json) io.stdout(`psdgate ${VERSION}: ${n} result(s) on ${s.target.label}\n${table(rows)}\n`);
  });
}
