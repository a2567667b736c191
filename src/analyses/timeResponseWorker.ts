import { parentPort, workerData } from "node:worker_threads";
import { TimeResponseAccumulator } from "../estimate/response/timeResponse.js";
import { leaveWhenAsked } from "../threadEnd.js";
import { CTL, type PoolWorkerData } from "./timeResponsePool.js";

/**
 * One thread of the time-domain response pool (timeResponsePool.ts): it follows the blocks the reader
 * publishes in shared memory, runs its share of the natural frequencies over each, and writes its results
 * into the shared result array. It waits with Atomics (a thread of its own, so blocking is harmless).
 */
const d = workerData as PoolWorkerData;
leaveWhenAsked(parentPort!);
const ctl = new Int32Array(d.control);
const data = new Float64Array(d.data);
const results = new Float64Array(d.results);
const consumed = CTL.consumed(d.slots) + d.index;
const done = CTL.done(d.slots, d.workers) + d.index;
try {
  const acc = new TimeResponseAccumulator(Float64Array.from(d.fnHz), d.q, d.sampleRateHz, d.basquinB);
  let seq = 0;
  for (;;) {
    const published = Atomics.load(ctl, CTL.published);
    if (published > seq) {
      const slot = seq % d.slots;
      const frames = ctl[CTL.frames + slot]!;
      acc.push(data.subarray(slot * d.slotFrames, slot * d.slotFrames + frames), frames);
      seq++;
      Atomics.store(ctl, consumed, seq);
      Atomics.notify(ctl, consumed);
      continue;
    }
    if (Atomics.load(ctl, CTL.closed) === 1 && Atomics.load(ctl, CTL.published) <= seq) break;
    // Timed, so a wake-up that raced the check costs at most this long.
    Atomics.wait(ctl, CTL.published, published, 20);
  }
  const r = acc.finish();
  for (let k = 0; k < d.indexes.length; k++) {
    const i = d.indexes[k]!;
    results[3 * i] = r.maxAccel[k]!;
    results[3 * i + 1] = r.minAccel[k]!;
    results[3 * i + 2] = r.rainflowSum[k]!;
  }
  if (d.index === 0) {
    results[3 * d.totalFn] = r.samples;
    results[3 * d.totalFn + 1] = r.heldSamples;
  }
  Atomics.store(ctl, done, 1);
} catch {
  Atomics.store(ctl, done, 2);
}
Atomics.notify(ctl, done);
