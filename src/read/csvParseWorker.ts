import { parentPort } from "node:worker_threads";
import { errorToWire } from "../errors.js";
import { isLeaveRequest, leaveWhenAsked } from "../threadEnd.js";
import { columnPool, pieceBuffers } from "./csvBody.js";
import { csvBodyPass, READ_BUFFER_BYTES, type CsvBodyJob, type HashHandOff } from "./csvBodyPass.js";

/**
 * The CSV body pass on a worker thread: it reads, parses and checks the file, and posts each piece's
 * columns (transferred) to the reader, which sends the buffers back once its accumulators have used
 * them. At most IN_FLIGHT pieces are out at a time, so memory stays flat however fast this runs.
 *
 * The SHA-256 is the reader's: this thread reads into READ_BUFFERS buffers of shared memory in turn, and
 * each piece's message carries the ranges of new bytes read since the one before ({ hash }: buffer, start,
 * end, ...); the reader hashes them before it takes the piece's columns and clears the buffer's flag in
 * `free` (shared, Atomics). With IN_FLIGHT pieces out at most, a buffer is hashed before it comes round
 * again, so the wait in `take` is for the rare reads that make no piece (a line longer than a read). On two
 * cores the parse is the longer of the two threads' jobs, and the hash (about 0.5 ns a byte) fits in the
 * reader's idle time.
 */
const IN_FLIGHT = 3;
/** Read buffers shared with the reader: one more than the pieces out, so a buffer is free when its turn comes. */
const READ_BUFFERS = IN_FLIGHT + 1;
const columns = columnPool();
let credits = IN_FLIGHT;
let wake: (() => void) | undefined;
const shared = Array.from({ length: READ_BUFFERS }, () => new SharedArrayBuffer(READ_BUFFER_BYTES));
/** 1 while buffer i holds bytes the reader has not hashed yet. */
const busy = new Int32Array(new SharedArrayBuffer(4 * READ_BUFFERS));
/** Ranges read but not yet sent to the reader: buffer, start, end, ... */
let ranges: number[] = [];
parentPort!.on("message", (m: { job: CsvBodyJob } | { recycle: ArrayBuffer[] }) => {
  if (isLeaveRequest(m)) return;
  if ("job" in m) return run(m.job);
  columns.give(m.recycle);
  credits++;
  wake?.();
});

leaveWhenAsked(parentPort!);

/** Sends the ranges not yet sent on their own (before the end, or before a wait for a buffer). */
function flushRanges(): void {
  if (ranges.length === 0) return;
  parentPort!.postMessage({ hash: ranges });
  ranges = [];
}

const hashing: HashHandOff = {
  buffers: shared.map((b) => new Uint8Array(b)),
  head: (bytes) => parentPort!.postMessage({ hash: [], head: bytes }),
  hash: (i, start, end) => {
    Atomics.store(busy, i, 1);
    ranges.push(i, start, end);
  },
  take: (i) => {
    if (Atomics.load(busy, i) === 0) return;
    flushRanges();
    // Blocking is harmless here (this thread's only job is the pass); short waits let terminate() through.
    while (Atomics.load(busy, i) !== 0) Atomics.wait(busy, i, 1, 50);
  },
  digest: () => "",
};

/** The reader starts this worker before it has sniffed the file; the job comes once it has. */
function run(job: CsvBodyJob): void {
  parentPort!.postMessage({ buffers: shared, busy: busy.buffer });
  csvBodyPass(job, async (piece, bytes) => {
    while (credits === 0) await new Promise<void>((r) => (wake = r));
    credits--;
    const transfer: ArrayBuffer[] = pieceBuffers(piece);
    if (piece.rowLines) transfer.push(piece.rowLines.buffer as ArrayBuffer);
    parentPort!.postMessage({ piece, bytes, hash: ranges }, transfer);
    ranges = [];
  }, columns, hashing).then(
    (done) => {
      flushRanges();
      parentPort!.postMessage({ done });
    },
    (e: unknown) => parentPort!.postMessage({ error: errorToWire(e) }),
  );
}
