import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import type { RecordingAnalysis } from "../pass/analyzeRecording.js";
import type { TestProfile } from "../compare/testProfile.js";
import { errorFromWire, errorToWire, InputError, type WireError } from "../errors.js";
import { retireThread } from "../threadEnd.js";
import type { CheckOptions, CheckResult } from "../analyses/checkRecording.js";
import type { AnalysisJob } from "../analyses/runAnalysis.js";

/** One recording of a batch, as a worker gets it: the job as data (its profile loaded) and its place. */
export interface BatchJob {
  id: number;
  job: AnalysisJob;
}

export type BatchReply = { id: number; result: RecordingAnalysis | CheckResult } | { id: number; error: WireError };

/** `internal` marks an error that is psdgate's own fault (exit 70), not the input's. */
export type Outcome<T> =
  | { file: string; ok: true; result: T }
  | { file: string; ok: false; error: InputError; internal?: boolean };

const WORKER = new URL("./batchWorker.js", import.meta.url);

/**
 * Runs one analysis per recording on a pool of worker threads (node:worker_threads: one message
 * per job, nothing more is needed), and hands the outcomes back in input order as each becomes
 * available. With one job, or where the built worker is missing (tests run the sources), it runs
 * in this thread. Either way each recording is a job (runAnalysis.ts) run by the one dispatcher.
 */
export async function runBatch<T extends RecordingAnalysis | CheckResult>(
  files: string[],
  options: Omit<CheckOptions, "onProgress">,
  profile: TestProfile | undefined,
  jobs: number,
  onOutcome: (o: Outcome<T>, index: number) => void,
  onProgress?: (bytesDone: number) => void,
  limits: WorkerLimits = WORKER_LIMITS,
): Promise<void> {
  const useWorkers = jobs > 1 && files.length > 1 && existsSync(fileURLToPath(WORKER));
  // A batch is parallel across files only: one thread per recording, so --jobs says how many cores it uses.
  if (files.length > 1) options = { ...options, csv: { ...options.csv, parseWorkers: 0 } };
  const run = batchRun<T>(files, options, profile, onOutcome, onProgress);
  if (!useWorkers) return runInThread(run);
  return runOnWorkers(run, jobs, limits);
}

/** What both ways of running a batch share: the recordings as jobs, and how outcomes and progress reach the caller. */
interface BatchRun<T> {
  files: string[];
  jobOf: (file: string) => AnalysisJob;
  /** An error from either path becomes the recording's outcome the same way. */
  failed: (file: string, e: Error) => Outcome<T>;
  /** Hands outcomes on in input order, each as soon as those before it are in. */
  deliver: (i: number, o: Outcome<T>) => void;
  /** Bytes read of recording i so far: the batch's total goes to onProgress. */
  report: (i: number, b: number) => void;
}

/** A batch's jobs, its in-order delivery of outcomes and its summed progress. */
function batchRun<T extends RecordingAnalysis | CheckResult>(
  files: string[],
  options: Omit<CheckOptions, "onProgress">,
  profile: TestProfile | undefined,
  onOutcome: (o: Outcome<T>, index: number) => void,
  onProgress?: (bytesDone: number) => void,
): BatchRun<T> {
  const jobOf = (file: string): AnalysisJob => ({
    kind: profile === undefined ? "psd" : "check",
    file,
    options,
    profile,
  });
  const failed = (file: string, e: Error): Outcome<T> =>
    e instanceof InputError
      ? { file, ok: false, error: e }
      : { file, ok: false, internal: true, error: internalError(file, e.message) };
  const outcomes: (Outcome<T> | undefined)[] = new Array(files.length);
  let nextOut = 0;
  const deliver = (i: number, o: Outcome<T>) => {
    outcomes[i] = o;
    while (nextOut < files.length && outcomes[nextOut] !== undefined) {
      onOutcome(outcomes[nextOut]!, nextOut);
      outcomes[nextOut] = undefined;
      nextOut++;
    }
  };
  const doneBytes = new Float64Array(files.length);
  const report = (i: number, b: number) => {
    if (!onProgress) return;
    doneBytes[i] = b;
    let s = 0;
    for (const v of doneBytes) s += v;
    onProgress(s);
  };
  return { files, jobOf, failed, deliver, report };
}

/** Runs the batch's jobs one after another in this thread. */
async function runInThread<T>(run: BatchRun<T>): Promise<void> {
  const { files } = run;
  // The analysis modules load on the first job, not with this module: with workers this thread needs
  // none of them, and the pool starts sooner (start-up is part of every batch).
  const { runAnalysis } = await import("../analyses/runAnalysis.js");
  for (let i = 0; i < files.length; i++) {
    try {
      const result = (await runAnalysis(run.jobOf(files[i]!), (b: number) => run.report(i, b))) as T;
      run.deliver(i, { file: files[i]!, ok: true, result });
    } catch (e) {
      // The error takes the same form as one from a worker (a thrown non-Error becomes an Error).
      run.deliver(i, run.failed(files[i]!, errorFromWire(errorToWire(e))));
    }
  }
}

/** The worker pool's state: the recordings not yet taken, those given back, the live workers. */
interface Pool<T> {
  run: BatchRun<T>;
  limits: WorkerLimits;
  /** Recordings a dead worker had waiting, taken before the rest. */
  requeued: number[];
  next: number;
  delivered: number;
  workers: Set<Worker>;
  closing: boolean;
  /** Called once every recording has its outcome. */
  allDone: () => void;
}

/**
 * Runs the batch on `jobs` worker threads. Each worker is capped (resourceLimits): a recording that needs
 * more memory ends its worker, and that file alone gets a WORKER_LIMIT error; a fresh worker takes the
 * rest of the queue.
 */
async function runOnWorkers<T>(run: BatchRun<T>, jobs: number, limits: WorkerLimits): Promise<void> {
  const pool: Pool<T> = {
    run,
    limits,
    requeued: [],
    next: 0,
    delivered: 0,
    workers: new Set<Worker>(),
    closing: false,
    allDone: () => undefined,
  };
  try {
    await new Promise<void>((resolveAll) => {
      pool.allDone = resolveAll;
      const n = Math.min(jobs, run.files.length);
      for (let k = 0; k < n; k++) startWorker(pool);
    });
  } finally {
    // Each worker ends once idle (threadEnd.ts), not by terminate(), which can race V8 and abort the process.
    pool.closing = true;
    await Promise.all([...pool.workers].map((w) => retireThread(w)));
  }
}

/** The next recording to send: one given back first, then the next not yet taken. */
function takeJob<T>(p: Pool<T>): number | undefined {
  return p.requeued.length > 0 ? p.requeued.shift() : p.next < p.run.files.length ? p.next++ : undefined;
}

/** Whether any recording is still to be sent. */
function hasWork<T>(p: Pool<T>): boolean {
  return p.requeued.length > 0 || p.next < p.run.files.length;
}

/** Hands a recording's outcome on; the last one ends the pool's wait. */
function settle<T>(p: Pool<T>, id: number, o: Outcome<T>): void {
  p.run.deliver(id, o);
  if (++p.delivered === p.run.files.length) p.allDone();
}

/**
 * Starts one worker that takes recordings until none are left; if it dies, its recording fails and a fresh one goes on.
 */
function startWorker<T>(pool: Pool<T>): void {
  const { run, limits } = pool;
  const files = run.files;
  const w = new Worker(WORKER, { resourceLimits: limits });
  pool.workers.add(w);
  const inHand: number[] = [];
  let dead = false;
  const send = () => {
    const id = takeJob(pool);
    if (id === undefined) return;
    inHand.push(id);
    w.postMessage({ id, job: run.jobOf(files[id]!) } satisfies BatchJob);
  };
  w.on("message", (m: BatchReply | { id: number; progress: number }) => {
    if ("progress" in m) return run.report(m.id, m.progress);
    inHand.splice(inHand.indexOf(m.id), 1);
    const file = files[m.id]!;
    settle(
      pool,
      m.id,
      "result" in m ? { file, ok: true, result: m.result as T } : run.failed(file, errorFromWire(m.error)),
    );
    send();
  });
  const died = (why: string) => {
    if (dead) return;
    dead = true;
    pool.workers.delete(w);
    // The worker runs its jobs one after another: the first in hand is the one it died on.
    const [culprit, ...waiting] = inHand;
    pool.requeued.unshift(...waiting);
    if (culprit !== undefined) {
      settle(pool, culprit, {
        file: files[culprit]!,
        ok: false,
        error: new InputError("WORKER_LIMIT", {
          file: files[culprit]!,
          expected: `a recording that one batch worker can analyse within ${limits.maxOldGenerationSizeMb ?? WORKER_LIMITS.maxOldGenerationSizeMb} MB of heap`,
          received: why,
          hint: "analyse it on its own, or select fewer --channel",
        }),
      });
    }
    if (hasWork(pool) && !pool.closing) startWorker(pool);
  };
  w.on("error", (e: Error & { code?: string }) =>
    died(
      e.code === "ERR_WORKER_OUT_OF_MEMORY"
        ? "a worker that ran out of memory"
        : `a worker that failed (${e.message.split("\n")[0]})`,
    ),
  );
  w.on("exit", (code) => died(`a worker that stopped (exit code ${code})`));
  // Two jobs in hand, so a worker never waits for this thread between recordings.
  send();
  send();
}

/**
 * Heap limits of one batch worker (node:worker_threads resourceLimits). Sample buffers live outside the heap and are
 * bounded by the analysis limits (read/analysisLimits.ts, checked in pass/resolveAnalysis.ts).
 */
export const WORKER_LIMITS = { maxOldGenerationSizeMb: 1024, maxYoungGenerationSizeMb: 64, stackSizeMb: 8 } as const;
export type WorkerLimits = { maxOldGenerationSizeMb?: number; maxYoungGenerationSizeMb?: number; stackSizeMb?: number };

/** An error that is psdgate's fault, kept to its one recording in a batch. */
export function internalError(file: string, message: string): InputError {
  return new InputError("INTERNAL", {
    file,
    expected: "an analysis without an internal error (a bug in psdgate; please report it)",
    received: message,
  });
}
