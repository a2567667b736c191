import { createHash } from "node:crypto";
import { parentPort } from "node:worker_threads";
import { errorToWire } from "../errors.js";
import { isLeaveRequest, leaveWhenAsked } from "../threadEnd.js";
import { columnPool, pieceBuffers } from "./csvBody.js";
import {
  csvBodyPass,
  HASH_ON_READER_BYTES_PER_VALUE,
  READ_BUFFER_BYTES,
  type CsvBodyJob,
  type HashHandOff,
} from "./csvBodyPass.js";

/**
 * The CSV body pass on a worker thread: it reads, parses and checks the file, and posts each piece's
 * columns (transferred) to the reader, which sends the buffers back once its accumulators have used
 * them. At most IN_FLIGHT pieces are out at a time, so memory stays flat however fast this runs.
 *
 * The SHA-256 goes to whichever thread has less else to do. This thread reads into READ_BUFFERS buffers of
 * shared memory in turn; the first piece tells how many file bytes there are to a selected value. Where
 * there are many (`%.6e`, ISO stamps: about 19 bytes a value), the parse here is the longer job, and the
 * reader hashes: each piece's message carries the ranges of new bytes read since the one before
 * ({ hash }: buffer, start, end, ...), which the reader hashes before it takes the piece's columns, and
 * then clears the buffer's flag in `busy` (shared, Atomics). With IN_FLIGHT pieces out at most, a buffer
 * is hashed before it comes round again, so the wait in `take` is for the rare reads that make no piece
 * (a line longer than a read). Where there are few (fixed decimals, counts: 9-13 bytes), the reader's
 * accumulators are the longer job, and this thread hashes as before.
 */
const IN_FLIGHT = 3;
/** Read buffers shared with the reader: one more than the pieces out, so a buffer is free when its turn comes. */
const READ_BUFFERS = IN_FLIGHT + 1;
const columns = columnPool();
let credits = IN_FLIGHT;
let wake: (() => void) | undefined;
const shared = Array.from({ length: READ_BUFFERS }, () => new SharedArrayBuffer(READ_BUFFER_BYTES));
const buffers = shared.map((b) => new Uint8Array(b));
/** 1 while buffer i holds bytes the reader has not hashed yet. */
const busy = new Int32Array(new SharedArrayBuffer(4 * READ_BUFFERS));
/** Where the hash is made: not decided before the first piece, then here or on the reader's thread. */
let hashWhere: "undecided" | "here" | "reader" = "undecided";
const here = createHash("sha256");
/** The bytes before the body, until the hash's place is decided. */
let head: Uint8Array | undefined;
/** Ranges read but not yet hashed here or sent to the reader: buffer, start, end, ... */
let ranges: number[] = [];
parentPort!.on("message", (m: { job: CsvBodyJob } | { recycle: ArrayBuffer[] }) => {
  if (isLeaveRequest(m)) return;
  if ("job" in m) return run(m.job);
  columns.give(m.recycle);
  credits++;
  wake?.();
});

leaveWhenAsked(parentPort!);

/** Settles where the hash is made; hashing here takes in what has been read so far. */
function decide(where: "here" | "reader"): void {
  if (hashWhere !== "undecided") return;
  hashWhere = where;
  if (where === "reader") return;
  if (head) here.update(head);
  head = undefined;
  for (let k = 0; k < ranges.length; k += 3) {
    here.update(buffers[ranges[k]!]!.subarray(ranges[k + 1], ranges[k + 2]));
    busy[ranges[k]!] = 0;
  }
  ranges = [];
}

/** What a message to the reader carries for its hash (and clears it here). */
function hashPart(): { hash: number[]; head?: Uint8Array } {
  const part = head ? { hash: ranges, head } : { hash: ranges };
  ranges = [];
  head = undefined;
  return part;
}

const hashing: HashHandOff = {
  buffers,
  head: (bytes) => {
    if (hashWhere === "here") here.update(bytes);
    else head = bytes;
  },
  hash: (i, start, end) => {
    if (hashWhere === "here") here.update(buffers[i]!.subarray(start, end));
    else {
      Atomics.store(busy, i, 1);
      ranges.push(i, start, end);
    }
  },
  take: (i) => {
    if (Atomics.load(busy, i) === 0) return;
    // A buffer comes round before any piece was sent (reads that end no line): the reader hashes.
    decide("reader");
    parentPort!.postMessage(hashPart());
    // Blocking is harmless here (this thread's only job is the pass); short waits let terminate() through.
    while (Atomics.load(busy, i) !== 0) Atomics.wait(busy, i, 1, 50);
  },
  digest: () => {
    decide("here");
    return hashWhere === "reader" ? "" : here.digest("hex");
  },
};

/** The reader starts this worker before it has sniffed the file; the job comes once it has. */
function run(job: CsvBodyJob): void {
  parentPort!.postMessage({ buffers: shared, busy: busy.buffer });
  csvBodyPass(
    job,
    async (piece, bytes) => {
      // The first piece decides (the sniffer found a row within the first 64 KB, so it has rows).
      if (hashWhere === "undecided" && piece.rows > 0)
        decide(bytes > HASH_ON_READER_BYTES_PER_VALUE * piece.rows * piece.channels.length ? "reader" : "here");
      while (credits === 0) await new Promise<void>((r) => (wake = r));
      credits--;
      const transfer: ArrayBuffer[] = pieceBuffers(piece);
      if (piece.rowLines) transfer.push(piece.rowLines.buffer as ArrayBuffer);
      // Until the place is decided, the ranges stay here (all hashed on one thread, in order).
      parentPort!.postMessage({ piece, bytes, ...(hashWhere === "reader" ? hashPart() : { hash: [] }) }, transfer);
    },
    columns,
    hashing,
  ).then(
    (done) => {
      if (hashWhere === "reader" && (ranges.length > 0 || head)) parentPort!.postMessage(hashPart());
      parentPort!.postMessage({ done });
    },
    (e: unknown) => parentPort!.postMessage({ error: errorToWire(e) }),
  );
}
