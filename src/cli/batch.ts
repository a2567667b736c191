import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import type { AnalysisOptions, RecordingAnalysis } from "../analyzeRecording.js";
import type { TestProfile } from "../compare/testProfile.js";
import { InputError } from "../errors.js";
import type { CheckOptions, CheckResult } from "../checkRecording.js";

/**
 * Runs one analysis per recording on a pool of worker threads (node:worker_threads: one message
 * per job, nothing more is needed), and hands the outcomes back in input order as each becomes
 * available. With one job, or where the built worker is missing (tests run the sources), it runs
 * in this thread.
 */
export interface BatchJob {
  id: number;
  file: string;
  options: Omit<CheckOptions, "onProgress">;
  profile?: TestProfile | undefined;
}

export type BatchReply =
  | { id: number; result: RecordingAnalysis | CheckResult }
  | { id: number; inputError: { code: string; details: InputError["details"] } }
  | { id: number; internal: string };

export type Outcome<T> = { file: string; ok: true; result: T } | { file: string; ok: false; error: InputError } ;

const WORKER = new URL("./batchWorker.js", import.meta.url);

export async function runBatch<T extends RecordingAnalysis | CheckResult>(
  files: string[], options: Omit<CheckOptions, "onProgress">, profile: TestProfile | undefined, jobs: number,
  onOutcome: (o: Outcome<T>, index: number) => void, onProgress?: (bytesDone: number) => void,
): Promise<void> {
  const useWorkers = jobs > 1 && files.length > 1 && existsSync(fileURLToPath(WORKER));
  // A batch is parallel across files only: one thread per recording, so --jobs says how many cores it uses.
  if (files.length > 1) options = { ...options, csv: { ...options.csv, parseWorkers: 0 } };
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
    for (let i = 0; i < files.length; i++) {
      try {
        const opts = { ...options, onProgress: (b: number) => report(i, b) };
        // The analysis modules load here, not with this module: with workers this thread needs none of
        // them, and the pool starts sooner (start-up is part of every batch); zod and yaml only for check.
        const result = (profile ? await (await import("../checkRecording.js")).checkRecording(files[i]!, profile, opts) : await (await import("../analyzeRecording.js")).analyzeRecording(files[i]!, opts)) as T;
        deliver(i, { file: files[i]!, ok: true, result });
      } catch (e) {
        if (!(e instanceof InputError)) throw e;
        deliver(i, { file: files[i]!, ok: false, error: e });
      }
    }
    return;
  }

  const pool = Array.from({ length: Math.min(jobs, files.length) }, () => new Worker(WORKER));
  let next = 0;
  let internal: Error | undefined;
  try {
    await Promise.all(
      pool.map(
        (w) =>
          new Promise<void>((resolve, reject) => {
            let inHand = 0;
            const send = () => {
              if (next >= files.length || internal) {
                if (inHand === 0) resolve();
                return;
              }
              inHand++;
              const id = next++;
              w.postMessage({ id, file: files[id]!, options, profile } satisfies BatchJob);
            };
            w.on("message", (m: BatchReply | { id: number; progress: number }) => {
              if ("progress" in m) return report(m.id, m.progress);
              inHand--;
              if ("result" in m) deliver(m.id, { file: files[m.id]!, ok: true, result: m.result as T });
              else if ("inputError" in m) deliver(m.id, { file: files[m.id]!, ok: false, error: new InputError(m.inputError.code, m.inputError.details) });
              else {
                internal = new Error(`worker failed on ${files[m.id]}: ${m.internal}`);
                reject(internal);
                return;
              }
              send();
            });
            w.on("error", reject);
            // Two jobs in hand, so a worker never waits for this thread between recordings.
            send();
            send();
          }),
      ),
    );
  } finally {
    await Promise.all(pool.map((w) => w.terminate()));
  }
}
