import type PgBoss from "pg-boss";
import { VERSION } from "../version.js";
import { errorToWire, InputError, type WireError } from "../errors.js";
import { redact } from "./connection.js";
import { settingsDigest, type Job } from "./job.js";
import { JobCrash, type JobPool } from "./jobPool.js";
import { errorLine, type StoredOutcome } from "./runJob.js";
import { QUEUE_NAME, type QueueStore, type SqlRunner } from "./queueStore.js";

export interface WorkOptions {
  /** Analyses at once (one thread each). */
  jobs: number;
  /** Exit once no job is queued or active. */
  drain: boolean;
  /** Wait between looks at an empty queue, in seconds. */
  pollSeconds: number;
  /** Who finished a job, kept in its result row. */
  workerName: string;
  /** Stop taking jobs when this fires; jobs in hand are finished and their results written. */
  signal: AbortSignal;
  /** One line per event for stderr. */
  log: (line: string) => void;
  /** Per finished job, for the progress line (not called in quiet mode by the CLI). */
  onFinished?: ((file: string, what: string, seconds: number) => void) | undefined;
}

export interface WorkSummary {
  done: number;
  failed: number;
  retried: number;
  discarded: number;
}

type FetchedJob = PgBoss.JobWithMetadata<Job>;

const sleep = (ms: number, signal?: AbortSignal) =>
  new Promise<void>((resolve) => {
    if (signal?.aborted) return resolve();
    const t = setTimeout(done, ms);
    function done() {
      clearTimeout(t);
      signal?.removeEventListener("abort", done);
      resolve();
    }
    signal?.addEventListener("abort", done, { once: true });
  });

/** Back-off after a database error: 1, 2, 4, … 30 s. */
const backoffMs = (failures: number) => Math.min(30000, 1000 * 2 ** Math.max(0, failures - 1));

/**
 * Whether a database error may go away by waiting: no connection (ECONNREFUSED, ECONNRESET, …), the server
 * shutting down or out of resources, a conflict with another transaction (SQLSTATE classes 08, 40, 53, 57,
 * 58, PostgreSQL manual, appendix A). Anything else (a constraint, a type) is a bug here, not an outage.
 */
export function transientDbError(e: unknown): boolean {
  const code = (e as { code?: unknown })?.code;
  if (typeof code !== "string" || !/^[0-9A-Z]{5}$/.test(code)) return true;
  return /^(08|40|53|57|58)/.test(code);
}

/** A digest as a job carries it: text of reasonable length (the worker compares it with the file's own). */
const DIGEST = /^[\s\S]{1,200}$/;

/**
 * What makes a fetched row not a psdgate job, in words, or undefined. A row can be anything a database
 * user put into pgboss.job: it is checked before anything reads it, so one bad row fails alone.
 */
export function jobProblem(data: unknown): string | undefined {
  if (data === null || typeof data !== "object" || Array.isArray(data))
    return `its data is ${data === null ? "null" : Array.isArray(data) ? "a list" : `a ${typeof data}`}, not a job object`;
  const j = data as Record<string, unknown>;
  if (typeof j.file !== "string" || j.file === "") return "it has no recording path (file)";
  if (j.kind !== "psd" && j.kind !== "check")
    return `its kind is ${JSON.stringify(j.kind)?.slice(0, 40)}, not psd or check`;
  if (typeof j.sha256 !== "string" || !DIGEST.test(j.sha256)) return "it has no recording SHA-256";
  if (j.bytes !== undefined && !(typeof j.bytes === "number" && Number.isSafeInteger(j.bytes) && j.bytes >= 0))
    return "its size (bytes) is not a whole number";
  if (j.options !== undefined && (j.options === null || typeof j.options !== "object" || Array.isArray(j.options)))
    return "its options are not an object";
  if (j.profile !== undefined) {
    const p = j.profile as Record<string, unknown> | null;
    if (
      p === null ||
      typeof p !== "object" ||
      typeof p.path !== "string" ||
      typeof p.sha256 !== "string" ||
      !DIGEST.test(p.sha256)
    )
      return "its profile is not a path and a SHA-256";
  }
  if (j.kind === "check" && j.profile === undefined) return "a check job without a profile";
  return undefined;
}

/** The job's path for messages and the result row: its own, or a name made from its id when it has none. */
function jobFile(job: { id: string; data: unknown }): string {
  const f = (job.data as { file?: unknown } | null)?.file;
  return typeof f === "string" && f !== "" ? f : `(job ${job.id})`;
}

/** The job is no longer ours (not active any more, or its result is stored already): nothing was changed. */
class NotOurs extends Error {}

async function fetchOne(store: QueueStore): Promise<FetchedJob | undefined> {
  let error: unknown;
  // pg-boss's fetch swallows query errors and returns no jobs; this runner keeps the error so a lost
  // connection is seen (and retried with back-off) rather than read as an empty queue.
  const db: SqlRunner = {
    executeSql: (t, v) =>
      store.pool.query(t, v as unknown[]).catch((e: unknown) => {
        error = e;
        throw e;
      }),
  };
  const jobs = await store.boss.fetch<Job>(QUEUE_NAME, {
    batchSize: 1,
    includeMetadata: true,
    db,
  } as PgBoss.FetchOptions & { includeMetadata: true });
  if (error !== undefined) throw error;
  return jobs[0];
}

async function nothingLeft(store: QueueStore): Promise<boolean> {
  const { rows } = await store.pool.query<{ n: string }>(
    `SELECT count(*) AS n FROM pgboss.job WHERE name = $1 AND state IN ('created', 'retry', 'active')`,
    [QUEUE_NAME],
  );
  return Number(rows[0]!.n) === 0;
}

/**
 * Result row and the job's end in one statement, so all or nothing without a transaction of several
 * round trips. The job's update is the SQL of pg-boss 10's completeJobs (plans.js), and for a final
 * failure the state pg-boss's failJobs gives a job out of retries; both only while the job is still
 * active. The INSERT has no ON CONFLICT: a second result for a job is a unique violation, and then
 * the statement changes nothing.
 */
async function finish(
  store: QueueStore,
  workerName: string,
  job: FetchedJob,
  outcome: StoredOutcome,
  final: "complete" | "fail",
): Promise<void> {
  const j = job.data;
  // A malformed row's result is keyed by its own id: it cannot collide with a real job's (recording, settings).
  const key =
    jobProblem(j) === undefined
      ? [j.file, j.kind, j.sha256, j.profile?.sha256 ?? null, settingsDigest(j)]
      : [jobFile(job), "invalid", `invalid:${job.id}`, null, "invalid"];
  const output = outcome.ok
    ? { verdict: outcome.verdict }
    : { code: outcome.error.code, message: outcome.error.message };
  try {
    const { rows } = await store.pool.query<{ stored: string }>(
      `WITH ended AS (
         UPDATE pgboss.job SET completed_on = now(), state = $17::pgboss.job_state, output = $18::jsonb
          WHERE name = $19 AND id = $1 AND state = 'active'
         RETURNING id
       ), stored AS (
         INSERT INTO psdgate.result (job_id, path, kind, recording_sha256, profile_sha256, settings_digest, outcome, verdict, error_code, error_message, figures, result, worker, attempt, tool_version, report_path)
         SELECT id, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11, $12, $13, $14, $15, $16 FROM ended
         RETURNING job_id
       )
       SELECT count(*) AS stored FROM stored`,
      [
        job.id,
        ...key,
        outcome.ok ? "done" : "failed",
        outcome.ok ? outcome.verdict : null,
        outcome.ok ? null : outcome.error.code,
        outcome.ok ? null : outcome.error.message,
        outcome.ok ? JSON.stringify(outcome.figures) : null,
        outcome.lineJson,
        workerName,
        job.retryCount + 1,
        VERSION,
        outcome.ok ? (outcome.report ?? null) : null,
        final === "complete" ? "completed" : "failed",
        JSON.stringify(output),
        QUEUE_NAME,
      ],
    );
    if (Number(rows[0]!.stored) !== 1) throw new NotOurs("the job is no longer active here (expired and handed on)");
  } catch (e) {
    if ((e as { code?: string }).code === "23505")
      throw new NotOurs("a result for this job or this recording and settings is already stored");
    throw e;
  }
}

/** The failed outcome of a row that is not a psdgate job: JOB_INVALID, stored like any input error. */
function invalidJob(job: FetchedJob, problem: string, say: (s: string) => void): StoredOutcome {
  const file = jobFile(job);
  const error = errorToWire(
    new InputError("JOB_INVALID", {
      file,
      expected: "a psdgate job (an object with kind, file, sha256 and options)",
      received: problem,
    }),
  );
  say(`psdgate: ${file}: not a psdgate job (${problem}); kept as failed with JOB_INVALID`);
  return { ok: false, lineJson: JSON.stringify(errorLine(file, error)), error };
}

/**
 * What a worker's loops share: the store, the pool and the options, the summary they count into, the stop signal,
 * the way to stderr, the run of database failures (for the back-off) and when lost jobs were last expired.
 */
interface WorkerState {
  store: QueueStore;
  pool: JobPool;
  o: WorkOptions;
  summary: WorkSummary;
  signal: AbortSignal;
  say: (s: string) => void;
  dbFailures: number;
  lastExpire: number;
}

/** What running a job gave: its outcome, or the crash, with its seconds. */
type Ran =
  | { outcome: StoredOutcome; crash?: undefined; seconds: number }
  | { outcome?: undefined; crash: Error; seconds: number };

/** Runs `fn` until the database answers; without `keepTrying`, gives up (undefined) once told to stop. */
async function withDb<T>(
  w: WorkerState,
  what: string,
  fn: () => Promise<T>,
  keepTrying: boolean,
): Promise<T | undefined> {
  for (;;) {
    try {
      const out = await fn();
      if (w.dbFailures > 0) w.say(`psdgate: database reachable again (${w.store.target.label})`);
      w.dbFailures = 0;
      return out;
    } catch (e) {
      if (e instanceof NotOurs || !transientDbError(e)) throw e;
      w.dbFailures++;
      const wait = backoffMs(w.dbFailures);
      w.say(`psdgate: database error while ${what}: ${(e as Error).message}; trying again in ${wait / 1000} s`);
      if (!keepTrying && w.signal.aborted) return undefined;
      await sleep(wait, keepTrying ? undefined : w.signal);
      if (!keepTrying && w.signal.aborted) return undefined;
    }
  }
}

/** A job run on the pool: its outcome, or any error as a JobCrash, with the seconds it took. */
async function runOne(pool: JobPool, job: FetchedJob): Promise<Ran> {
  const t0 = performance.now();
  try {
    const outcome = await pool.run(job.data);
    return { outcome, seconds: (performance.now() - t0) / 1000 };
  } catch (e) {
    return {
      crash: e instanceof JobCrash ? e : new JobCrash((e as Error)?.message ?? String(e)),
      seconds: (performance.now() - t0) / 1000,
    };
  }
}

/** A crashed job: kept as a failed result (INTERNAL) on its last attempt, else handed back to pg-boss for a retry. */
async function recordCrash(w: WorkerState, job: FetchedJob, crash: Error): Promise<void> {
  const file = jobFile(job);
  const attempt = job.retryCount + 1;
  const attempts = job.retryLimit + 1;
  if (attempt >= attempts) {
    const error: WireError = {
      code: "INTERNAL",
      message: `internal error on attempt ${attempt} of ${attempts}: ${crash.message}`,
    };
    await withDb(
      w,
      "writing a result",
      () =>
        finish(
          w.store,
          w.o.workerName,
          job,
          { ok: false, lineJson: JSON.stringify(errorLine(file, error)), error },
          "fail",
        ),
      true,
    );
    w.summary.failed++;
    w.say(`psdgate: ${file}: ${error.message}; kept as failed`);
    return;
  }
  await withDb(w, "handing a job back", () => w.store.boss.fail(QUEUE_NAME, job.id, { message: crash.message }), true);
  w.summary.retried++;
  w.say(`psdgate: ${file}: internal error on attempt ${attempt} of ${attempts}: ${crash.message}; it will be retried`);
}

/** Writes what a job gave: result and completion together, or the job handed back for a retry. */
async function record(w: WorkerState, job: FetchedJob, ran: Ran): Promise<void> {
  const file = jobFile(job);
  const { outcome, crash } = ran;
  try {
    if (outcome) {
      await withDb(
        w,
        "writing a result",
        () => finish(w.store, w.o.workerName, job, outcome, outcome.ok ? "complete" : "fail"),
        true,
      );
      if (outcome.ok) w.summary.done++;
      else w.summary.failed++;
      w.o.onFinished?.(file, outcome.ok ? (outcome.verdict ?? "done") : `error ${outcome.error.code}`, ran.seconds);
      return;
    }
    await recordCrash(w, job, crash!);
  } catch (e) {
    if (!(e instanceof NotOurs)) throw e;
    w.summary.discarded++;
    w.say(`psdgate: ${file}: result not kept: ${e.message}`);
  }
}

/** A job fetched just as the worker was told to stop: handed straight back untouched. */
async function handBack(w: WorkerState, job: FetchedJob): Promise<void> {
  await withDb(
    w,
    "handing a job back",
    () =>
      w.store.pool.query(
        `UPDATE pgboss.job SET state = 'created', started_on = NULL WHERE name = $1 AND id = $2 AND state = 'active'`,
        [QUEUE_NAME, job.id],
      ),
    true,
  );
}

/**
 * One of the worker's loops: fetch a job when free, run it, record it while the next one runs; on an empty queue expire
 * lost jobs, stop when drained, wait.
 */
async function slot(w: WorkerState): Promise<void> {
  const { store, o, signal } = w;
  // A job's result is written while the next job runs: the database's time hides behind the analysis.
  let recording: Promise<void> = Promise.resolve();
  while (!signal.aborted) {
    const job = await withDb(w, "fetching a job", () => fetchOne(store), false);
    if (signal.aborted) {
      // Fetched just as we were told to stop: hand it straight back untouched.
      if (job) await handBack(w, job);
      break;
    }
    if (job) {
      const problem = jobProblem(job.data);
      const ran: Ran =
        problem === undefined ? await runOne(w.pool, job) : { outcome: invalidJob(job, problem, w.say), seconds: 0 };
      await recording;
      recording = record(w, job, ran);
      // Marked as handled now (a bug's error is still thrown where it is awaited, one job later).
      recording.catch(() => undefined);
      continue;
    }
    await recording;
    if (Date.now() - w.lastExpire > 2000) {
      w.lastExpire = Date.now();
      // Jobs held by a worker that died are failed by timeout (and so retried) by this call.
      await withDb(w, "expiring lost jobs", () => store.boss.expire(), false);
    }
    if (o.drain && (await withDb(w, "counting jobs", () => nothingLeft(store), false))) break;
    await sleep(o.pollSeconds * 1000, signal);
  }
  await recording;
}

/**
 * A worker: `jobs` loops, each fetching one job when it is free, running it on the pool, and writing
 * its result in the same statement (so the same transaction) that completes the job. Input errors fail the job at once;
 * an internal error goes back to pg-boss for a retry (delay and limit of the queue), and on the last attempt is kept as
 * a failed result. Database errors are retried with back-off, said on stderr.
 */
export async function runWorker(store: QueueStore, pool: JobPool, o: WorkOptions): Promise<WorkSummary> {
  const stopAll = new AbortController();
  const w: WorkerState = {
    store,
    pool,
    o,
    summary: { done: 0, failed: 0, retried: 0, discarded: 0 },
    signal: AbortSignal.any([o.signal, stopAll.signal]),
    say: (s: string) => o.log(redact(s, store.target)),
    dbFailures: 0,
    lastExpire: 0,
  };
  // A bug in one slot stops the others (they finish the job in hand) before it is thrown: no slot goes on
  // with a pool the caller closes once this returns.
  const settled = await Promise.allSettled(
    Array.from({ length: o.jobs }, () =>
      slot(w).catch((e: unknown) => {
        stopAll.abort();
        throw e;
      }),
    ),
  );
  const failed = settled.find((s) => s.status === "rejected");
  if (failed) throw (failed as PromiseRejectedResult).reason;
  return w.summary;
}
