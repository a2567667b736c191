import { parentPort } from "node:worker_threads";
import { errorToWire } from "../errors.js";
import { isLeaveRequest, leaveWhenAsked } from "../threadEnd.js";
import { columnPool, pieceBuffers } from "./csvBody.js";
import { csvBodyPass, type CsvBodyJob } from "./csvBodyPass.js";

/**
 * The CSV body pass on a worker thread: it reads, hashes, parses and checks the file, and posts each
 * piece's columns (transferred) to the reader, which sends the buffers back once its accumulators have
 * used them. At most IN_FLIGHT pieces are out at a time, so memory stays flat however fast this runs.
 */
const IN_FLIGHT = 3;
const columns = columnPool();
let credits = IN_FLIGHT;
let wake: (() => void) | undefined;
parentPort!.on("message", (m: { job: CsvBodyJob } | { recycle: ArrayBuffer[] }) => {
  if (isLeaveRequest(m)) return;
  if ("job" in m) return run(m.job);
  columns.give(m.recycle);
  credits++;
  wake?.();
});

leaveWhenAsked(parentPort!);

/** The reader starts this worker before it has sniffed the file; the job comes once it has. */
function run(job: CsvBodyJob): void {
  csvBodyPass(job, async (piece, bytes) => {
    while (credits === 0) await new Promise<void>((r) => (wake = r));
    credits--;
    const transfer: ArrayBuffer[] = pieceBuffers(piece);
    if (piece.rowLines) transfer.push(piece.rowLines.buffer as ArrayBuffer);
    parentPort!.postMessage({ piece, bytes }, transfer);
  }, columns).then(
    (done) => parentPort!.postMessage({ done }),
    (e: unknown) => parentPort!.postMessage({ error: errorToWire(e) }),
  );
}
