import { parentPort } from "node:worker_threads";
import { errorToWire } from "../errors.js";
import { runAnalysis } from "../analyses/runAnalysis.js";
import { isLeaveRequest, leaveWhenAsked } from "../threadEnd.js";
import type { BatchJob, BatchReply } from "./batch.js";

/** One worker of the batch pool: runs one recording's job per message through the dispatcher, one after another. */
let queue: Promise<void> = Promise.resolve();
parentPort!.on("message", (m: BatchJob) => {
  if (isLeaveRequest(m)) return;
  queue = queue.then(() => run(m));
});

leaveWhenAsked(parentPort!, () => queue);

// The PSD modules load while the worker waits for its first job (the check modules, zod and yaml,
// only when a job needs them: worker start-up is part of every batch).
void import("../pass/analyzeRecording.js");

async function run({ id, job }: BatchJob): Promise<void> {
  let reply: BatchReply;
  try {
    reply = {
      id,
      result: await runAnalysis(job, (done, total) => parentPort!.postMessage({ id, progress: done, total })),
    };
  } catch (e) {
    reply = { id, error: errorToWire(e) };
  }
  parentPort!.postMessage(reply);
}
