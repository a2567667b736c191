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
  const jobOf = (file: string): AnalysisJob => ({
    kind: profile === undefined ? "psd" : "check",
    file,
    options,
    profile,
  });
  // An error from either path becomes the recording's outcome the same way.
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

  if (!useWorkers) {
    // The analysis modules load on the first job, not with this module: with workers this thread needs
    // none of them, and the pool starts sooner (start-up is part of every batch).
    const { runAnalysis } = await import("../analyses/runAnalysis.js");
    for (let i = 0; i < files.length; i++) {
      try {
        const result = (await runAnalysis(jobOf(files[i]!), (b: number) => report(i, b))) as T;
        deliver(i, { file: files[i]!, ok: true, result });
      } catch (e) {
        // The error takes the same form as one from a worker (a thrown non-Error becomes an Error).
        deliver(i, failed(files[i]!, errorFromWire(errorToWire(e))));
      }
    }
    return;
  }

  // Each worker is capped (resourceLimits): a recording that needs more memory ends its worker, and
  // that file alone gets a WORKER_LIMIT error; a fresh worker takes the rest of the queue.
  const requeued: number[] = [];
  let next = 0;
  let delivered = 0;
  const workers = new Set<Worker>();
  let closing = false;
  const take = (): number | undefined =>
    requeued.length > 0 ? requeued.shift() : next < files.length ? next++ : undefined;
  const remaining = () => requeued.length > 0 || next < files.length;
  try {
    await new Promise<void>((resolveAll) => {
      const settle = (id: number, o: Outcome<T>) => {
        deliver(id, o);
        if (++delivered === files.length) resolveAll();
      };
      const start = () => {
        const w = new Worker(WORKER, { resourceLimits: limits });
        workers.add(w);
        const inHand: number[] = [];
        let dead = false;
        const send = () => {
          const id = take();
          if (id === undefined) return;
          inHand.push(id);
          w.postMessage({ id, job: jobOf(files[id]!) } satisfies BatchJob);
        };
        w.on("message", (m: BatchReply | { id: number; progress: number }) => {
          if ("progress" in m) return report(m.id, m.progress);
          inHand.splice(inHand.indexOf(m.id), 1);
          const file = files[m.id]!;
          settle(
            m.id,
            "result" in m ? { file, ok: true, result: m.result as T } : failed(file, errorFromWire(m.error)),
          );
          send();
        });
        const died = (why: string) => {
          if (dead) return;
          dead = true;
          workers.delete(w);
          // The worker runs its jobs one after another: the first in hand is the one it died on.
          const [culprit, ...waiting] = inHand;
          requeued.unshift(...waiting);
          if (culprit !== undefined) {
            settle(culprit, {
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
          if (remaining() && !closing) start();
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
      };
      const n = Math.min(jobs, files.length);
      for (let k = 0; k < n; k++) start();
    });
  } finally {
    // Each worker ends once idle (threadEnd.ts), not by terminate(), which can race V8 and abort the process.
    closing = true;
    await Promise.all([...workers].map((w) => retireThread(w)));
  }
}

/** Heap limits of one batch worker (node:worker_threads resourceLimits). Sample buffers live outside the heap and are bounded by the analysis limits (read/analysisLimits.ts, checked in pass/resolveAnalysis.ts). */
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
