import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import type { TestProfile } from "../compare/testProfile.js";
import { errorFromWire, errorToWire, type WireError } from "../errors.js";
import type { Job } from "./job.js";
import { retireThread } from "../threadEnd.js";
import { runJob, storedOutcome, type StoredOutcome } from "./runJob.js";

export interface ThreadRequest {
  id: number;
  job: Job;
  root: string;
  reportDir?: string | undefined;
}
/** A job's outcome, or the internal error it ended on (retried by the queue). */
export type ThreadReply = { id: number; outcome: StoredOutcome } | { id: number; crash: WireError };

/** An internal failure of a job (a bug, a crashed thread): retried by the queue, unlike an input error. */
export class JobCrash extends Error {}

export interface JobPool {
  /** Runs a job on an idle thread; at most `size` at once. Rejects with JobCrash on an internal failure. */
  run(job: Job): Promise<StoredOutcome>;
  close(): Promise<void>;
}

const THREAD = new URL("./jobThread.js", import.meta.url);

/**
 * `size` long-lived threads (start-up paid once, not per job), each running the dispatcher. Where the
 * built thread module is missing (tests run the sources) jobs run in this thread, one at a time.
 */
export function createJobPool(size: number, root: string, reportDir?: string): JobPool {
  if (!existsSync(fileURLToPath(THREAD))) {
    const profiles = new Map<string, TestProfile>();
    let chain: Promise<unknown> = Promise.resolve();
    return {
      run: (job) => {
        const p = chain.then(() =>
          runJob(job, { root, profiles, reportDir }).then(storedOutcome, (e: unknown) =>
            Promise.reject(new JobCrash(errorToWire(e).message)),
          ),
        );
        chain = p.catch(() => undefined);
        return p;
      },
      close: async () => undefined,
    };
  }
  interface Slot {
    worker: Worker;
    pending?: { resolve: (o: StoredOutcome) => void; reject: (e: Error) => void } | undefined;
  }
  const slots: Slot[] = [];
  let nextId = 0;
  const spawn = (): Slot => {
    const slot: Slot = { worker: new Worker(THREAD) };
    slot.worker.on("message", (m: ThreadReply) => {
      const p = slot.pending;
      slot.pending = undefined;
      if ("outcome" in m) p?.resolve(m.outcome);
      else p?.reject(new JobCrash(errorFromWire(m.crash).message));
    });
    // A thread that dies (out of memory, a crash in native code) fails its job and is replaced.
    const died = (e: Error) => {
      const p = slot.pending;
      slot.pending = undefined;
      const i = slots.indexOf(slot);
      if (i >= 0 && !closing) slots[i] = spawn();
      p?.reject(new JobCrash(`analysis thread stopped: ${e.message}`));
    };
    slot.worker.on("error", died);
    slot.worker.on("exit", (code) => died(new Error(`exit code ${code}`)));
    return slot;
  };
  let closing = false;
  for (let i = 0; i < size; i++) slots.push(spawn());
  return {
    run: (job) =>
      new Promise<StoredOutcome>((resolve, reject) => {
        const slot = slots.find((s) => s.pending === undefined);
        if (!slot) return reject(new Error("job pool: more jobs than threads"));
        slot.pending = { resolve, reject };
        slot.worker.postMessage({ id: nextId++, job, root, reportDir } satisfies ThreadRequest);
      }),
    close: async () => {
      closing = true;
      // Each thread ends once idle (threadEnd.ts), not by terminate(), which can race V8 and abort the process.
      await Promise.all(slots.map((s) => retireThread(s.worker)));
    },
  };
}
