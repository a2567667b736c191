import { pathExists } from "../read/regularFile.js";
import { availableParallelism } from "node:os";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import { TimeResponseAccumulator, type TimeResponse } from "../estimate/response/timeResponse.js";
import { retireThread } from "../threadEnd.js";

/**
 * The time-domain SDOF responses on worker threads: the natural frequencies are shared out among T
 * threads (each runs TimeResponseAccumulator over its share), and the reader's blocks go to all of them
 * through a ring of S slots in shared memory. push() copies a block into the next free slot (waiting,
 * with Atomics, while the slowest thread still reads the slot S blocks back), so memory stays flat;
 * finish() waits for every thread's results. The filters and counters are O(n) per natural frequency and
 * independent, so T threads take about 1/T of the time. Worker files exist only in dist/: from the
 * sources (tests) and with one thread, the plain accumulator runs instead.
 */
export interface TimeResponseSink {
  push(x: Float64Array, frames: number): void;
  finish(): TimeResponse;
}

/** Layout of the shared control array (Int32). */
export const CTL = {
  published: 0,
  closed: 1,
  frames: 2,
  consumed: (slots: number) => 2 + slots,
  done: (slots: number, workers: number) => 2 + slots + workers,
  length: (slots: number, workers: number) => 2 + slots + 2 * workers,
};

export interface PoolWorkerData {
  control: SharedArrayBuffer;
  data: SharedArrayBuffer;
  results: SharedArrayBuffer;
  slots: number;
  slotFrames: number;
  workers: number;
  index: number;
  indexes: number[];
  fnHz: number[];
  totalFn: number;
  q: number;
  sampleRateHz: number;
  basquinB: number;
}

const WORKER = new URL("./timeResponseWorker.js", import.meta.url);
const SLOTS = 4;
const SLOT_FRAMES = 16384;
/** Below this many natural frequencies x samples a thread's start-up costs more than it saves. */
const MIN_WORK = 2e7;

/**
 * How many threads: PSDGATE_RESPONSE_THREADS if set, else one per core but one, at most one per 4 natural frequencies.
 */
export function responseThreads(
  fnCount: number,
  expectedSamples: number,
  env: NodeJS.ProcessEnv = process.env,
): number {
  const asked = Number(env.PSDGATE_RESPONSE_THREADS);
  if (Number.isInteger(asked) && asked >= 0) return Math.min(asked, fnCount);
  if (fnCount * expectedSamples < MIN_WORK) return 0;
  return Math.max(0, Math.min(availableParallelism() - 1, Math.ceil(fnCount / 4), 16));
}

export function timeResponseSink(
  fnHz: Float64Array,
  q: number,
  sampleRateHz: number,
  basquinB: number,
  threads: number,
): TimeResponseSink {
  if (threads < 1 || !pathExists(fileURLToPath(WORKER)))
    return new TimeResponseAccumulator(fnHz, q, sampleRateHz, basquinB);
  return new TimeResponsePool(fnHz, q, sampleRateHz, basquinB, threads);
}

class TimeResponsePool implements TimeResponseSink {
  private readonly ctl: Int32Array;
  private readonly data: Float64Array;
  private readonly results: Float64Array;
  private readonly threads: Worker[] = [];
  private published = 0;
  private readonly n: number;

  constructor(
    private readonly fnHz: Float64Array,
    private readonly q: number,
    sampleRateHz: number,
    private readonly basquinB: number,
    private readonly workers: number,
  ) {
    this.n = fnHz.length;
    const control = new SharedArrayBuffer(4 * CTL.length(SLOTS, workers));
    const data = new SharedArrayBuffer(8 * SLOTS * SLOT_FRAMES);
    const results = new SharedArrayBuffer(8 * (3 * this.n + 2));
    this.ctl = new Int32Array(control);
    this.data = new Float64Array(data);
    this.results = new Float64Array(results);
    for (let w = 0; w < workers; w++) {
      // Interleaved shares (w, w + T, ...): low and high natural frequencies cost alike per sample, and so do the
      // shares.
      const indexes: number[] = [];
      for (let i = w; i < this.n; i += workers) indexes.push(i);
      const wd: PoolWorkerData = {
        control,
        data,
        results,
        slots: SLOTS,
        slotFrames: SLOT_FRAMES,
        workers,
        index: w,
        indexes,
        fnHz: indexes.map((i) => fnHz[i]!),
        totalFn: this.n,
        q,
        sampleRateHz,
        basquinB,
      };
      this.threads.push(new Worker(WORKER, { workerData: wd }));
    }
  }

  push(x: Float64Array, frames: number): void {
    for (let off = 0; off < frames; off += SLOT_FRAMES) {
      const m = Math.min(SLOT_FRAMES, frames - off);
      // The slot is free once every thread has consumed the block S back.
      const need = this.published - SLOTS + 1;
      for (let w = 0; w < this.workers; w++) this.waitFor(CTL.consumed(SLOTS) + w, need);
      const slot = this.published % SLOTS;
      this.data.set(x.subarray(off, off + m), slot * SLOT_FRAMES);
      this.ctl[CTL.frames + slot] = m;
      this.published++;
      Atomics.store(this.ctl, CTL.published, this.published);
      Atomics.notify(this.ctl, CTL.published);
    }
  }

  /** Waits until ctl[i] >= value, or a thread has failed. */
  private waitFor(i: number, value: number): void {
    for (;;) {
      const v = Atomics.load(this.ctl, i);
      if (v >= value) return;
      this.checkFailed();
      Atomics.wait(this.ctl, i, v, 50);
    }
  }

  private checkFailed(): void {
    const base = CTL.done(SLOTS, this.workers);
    for (let w = 0; w < this.workers; w++)
      if (Atomics.load(this.ctl, base + w) === 2) {
        this.end();
        throw new Error("a time-response thread failed");
      }
  }

  finish(): TimeResponse {
    Atomics.store(this.ctl, CTL.closed, 1);
    Atomics.notify(this.ctl, CTL.published);
    const base = CTL.done(SLOTS, this.workers);
    for (let w = 0; w < this.workers; w++) this.waitFor(base + w, 1);
    this.checkFailed();
    this.end();
    const r = this.results;
    const n = this.n;
    return {
      fnHz: Float64Array.from(this.fnHz),
      q: this.q,
      basquinB: this.basquinB,
      maxAccel: Float64Array.from({ length: n }, (_, i) => r[3 * i]!),
      minAccel: Float64Array.from({ length: n }, (_, i) => r[3 * i + 1]!),
      rainflowSum: Float64Array.from({ length: n }, (_, i) => r[3 * i + 2]!),
      samples: r[3 * n]!,
      heldSamples: r[3 * n + 1]!,
    };
  }

  private end(): void {
    for (const t of this.threads) void retireThread(t, { wait: false });
  }
}
