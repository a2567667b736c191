import { existsSync, statSync } from "node:fs";
import { availableParallelism } from "node:os";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";

/**
 * Starting the CSV body worker (csvParseWorker.ts). A thread's start-up and the loading of its modules take
 * about 60 ms on the 2-core development machine. openCsvTimeHistory starts the worker before it sniffs the
 * file; the CLI can start it even earlier, before the program's own modules load (`startEarly`, called
 * from cli/bin.ts), so that the two start-ups overlap; the first large CSV read then takes that worker.
 * This module imports only Node's own modules, so that bin.ts can load it first.
 */

/**
 * Files at least this large are read on a worker thread (csvBodyPass there: read, hash, parse, check
 * time stamps) while the reader's thread runs the accumulators; see bench/README.md.
 */
export const PARALLEL_BYTES = 8 << 20;
const WORKER = new URL("./csvParseWorker.js", import.meta.url);

export interface BodyWorker {
  thread: Worker;
  /** Settles with the reason when the thread fails or stops, whenever that happens. */
  ended: Promise<Error>;
}

/** A worker started early and not yet taken. */
let early: BodyWorker | undefined;

/** Whether the worker's module is there (it is in the built library; tests run from src/ without it). */
export function workerBuilt(): boolean {
  return existsSync(fileURLToPath(WORKER));
}

/** Whether a file of this size is read on a worker by default: it is large and there is a second core. */
export function parseOnWorker(size: number): boolean {
  return size >= PARALLEL_BYTES && availableParallelism() > 1;
}

/**
 * A worker that waits for its job: the one started early, else a new one. It is unref'd until the job
 * comes, so a source that is never read does not keep the process alive.
 */
export function takeBodyWorker(): BodyWorker {
  const w = early ?? startBodyWorker();
  early = undefined;
  return w;
}

/**
 * Starts a worker now when one of `args` is a file the CSV reader would parse on a worker (a regular file
 * of PARALLEL_BYTES or more that is not a WAV). A worker never taken costs its start-up on a spare core and
 * ends with the process.
 */
export function startEarly(args: readonly string[]): void {
  if (early) return;
  const csv = args.some((a) => {
    if (a.startsWith("-") || /\.wave?$/i.test(a)) return false;
    try {
      const s = statSync(a, { throwIfNoEntry: false });
      return s?.isFile() === true && parseOnWorker(s.size);
    } catch {
      return false;
    }
  });
  if (csv && workerBuilt()) early = startBodyWorker();
}

function startBodyWorker(): BodyWorker {
  const thread = new Worker(WORKER);
  thread.unref();
  const ended = new Promise<Error>((resolve) => {
    thread.once("error", resolve);
    thread.once("exit", (code) => resolve(new Error(`the CSV worker stopped (exit code ${code})`)));
  });
  return { thread, ended };
}
