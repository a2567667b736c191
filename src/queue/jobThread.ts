import { parentPort } from "node:worker_threads";
import { errorToWire } from "../errors.js";
import { isLeaveRequest, leaveWhenAsked } from "../threadEnd.js";
import type { TestProfile } from "../compare/testProfile.js";
import { runJob, storedOutcome } from "./runJob.js";
import type { ThreadReply, ThreadRequest } from "./jobPool.js";

/** One thread of a queue worker's pool: runs the dispatcher on one job per message, one after another. */
const profiles = new Map<string, TestProfile>();
let chain: Promise<void> = Promise.resolve();
parentPort!.on("message", (m: ThreadRequest) => {
  if (isLeaveRequest(m)) return;
  chain = chain.then(async () => {
    let reply: ThreadReply;
    try {
      // The line goes back as text: one stringify here instead of a structured clone and a stringify there.
      reply = {
        id: m.id,
        outcome: storedOutcome(await runJob(m.job, { root: m.root, profiles, reportDir: m.reportDir })),
      };
    } catch (e) {
      reply = { id: m.id, crash: errorToWire(e) };
    }
    parentPort!.postMessage(reply);
  });
});
leaveWhenAsked(parentPort!, () => chain);
