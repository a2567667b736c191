import { parentPort } from "node:worker_threads";
import { analyzeRecording } from "../analyzeRecording.js";
import { InputError } from "../errors.js";
import { isLeaveRequest, leaveWhenAsked } from "../threadEnd.js";
import type { BatchJob, BatchReply } from "./batch.js";

/** One worker of the batch pool: analyses or checks one recording per message, one after another. */
let queue: Promise<void> = Promise.resolve();
parentPort!.on("message", (job: BatchJob) => {
  if (isLeaveRequest(job)) return;
  queue = queue.then(() => run(job));
});

leaveWhenAsked(parentPort!, () => queue);

async function run(job: BatchJob): Promise<void> {
  let reply: BatchReply;
  try {
    const onProgress = (done: number, total: number) => parentPort!.postMessage({ id: job.id, progress: done, total });
    const options = { ...job.options, onProgress };
    // The check modules (zod, yaml) load only when a job needs them: worker start-up is part of every batch.
    const result = job.profile ? await (await import("../checkRecording.js")).checkRecording(job.file, job.profile, options) : await analyzeRecording(job.file, options);
    reply = { id: job.id, result };
  } catch (e) {
    reply = e instanceof InputError ? { id: job.id, inputError: { code: e.code, details: e.details } } : { id: job.id, internal: (e as Error)?.stack ?? String(e) };
  }
  parentPort!.postMessage(reply);
}
