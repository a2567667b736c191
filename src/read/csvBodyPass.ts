import { createHash } from "node:crypto";
import { closeSync, openSync, readSync } from "node:fs";
import { InputError } from "../errors.js";
import { columnPool, CsvBodyParser, MAX_LINE_BYTES, type CsvBodySpec, type CsvPiece } from "./csvBody.js";
import { daysFromCivil, isoDateTime } from "./dateTimeStamp.js";

const SERIAL_EPOCH_DAYS = daysFromCivil(1899, 12, 30);
import {
  implausibleRate,
  MIN_PLAUSIBLE_RATE_HZ,
  rateConflict,
  TimeStampCheck,
  type TimeColumnInfo,
} from "./timeStampCheck.js";
import { roundRate } from "./roundRate.js";
import type { ReadSummary } from "./timeHistory.js";

/**
 * The one sequential pass over a CSV body: read the file in pieces of whole lines, hash every byte
 * (SHA-256), parse each piece into columns, check the time stamps, and hand the columns on in file
 * order. It runs in the reader's own thread for small files and on a worker thread for large ones
 * (csvParseWorker.ts), where it leaves the reader's thread free for the accumulators.
 */
export interface CsvBodyJob extends CsvBodySpec {
  /** Byte offset of the first body line: the bytes before it are hashed, not parsed. */
  bodyStart: number;
  /** 1-based line number of the first body line. */
  bodyLine: number;
  /** Seconds per unit of the time column. */
  timeFactor: number;
  /** The rate given by the user; a time column that disagrees with it is OPTION_CONFLICT. */
  rateOverride: number | undefined;
  /** The time column holds spreadsheet serial day numbers (days since 1899-12-30): its start time is said. */
  serialDays?: boolean | undefined;
  /** The time column, for the messages about its rate and the plausibility rule. */
  timeColumn?: TimeColumnInfo | undefined;
}

/**
 * Receives each piece, in file order, with the bytes read so far. The piece's column buffers came
 * from the pass's column pool: give them back there once used. A returned promise holds the pass
 * until it settles (flow control on the worker).
 */
export type PieceSink = (piece: CsvPiece, bytesDone: number) => void | Promise<void>;

/** Pieces of about this size are parsed at a time. */
export const PIECE_BYTES = 1 << 20;

/** Size of a read buffer: a piece's new bytes after the partial line carried from the one before. */
export const READ_BUFFER_BYTES = MAX_LINE_BYTES + PIECE_BYTES + 1;

/**
 * Where the file's bytes are hashed. The pass reads into `buffers` in turn and says which of their bytes
 * are new (`hash`), in file order; it calls `take(i)` before it reads into buffer i again, so that a
 * hasher on another thread can still be reading it. By default (`localHashing`) the pass hashes its one
 * buffer itself; csvParseWorker.ts hands the hashing to the reader's thread (buffers over shared memory),
 * which on two cores has time to spare while the worker parses.
 */
export interface HashHandOff {
  buffers: Uint8Array[];
  /** The bytes before the body (comments, header); the callee keeps a copy if it needs one. */
  head(bytes: Uint8Array): void;
  /** buffers[i][start, end) are the file's next bytes. */
  hash(i: number, start: number, end: number): void;
  /** Resolves when buffers[i] may be read into again. */
  take(i: number): void | Promise<void>;
  /** The SHA-256 of every byte, in hex ("" when the hasher is elsewhere and says it itself). */
  digest(): string;
}

/**
 * File bytes per selected value from which the reader hashes. Thread CPU times on the 2-core development
 * machine (3 M rows, 3 channels): the parse thread about 3.0 ns a byte, the SHA-256 about 0.55 ns a
 * byte, the reader's accumulators about 50 ns a value; the hash shortens the longer thread when it
 * moves to the reader (csvParseWorker.ts), that is when 3.0 ns x bytes > 50 ns x values: above about 17 bytes a value.
 */
export const HASH_ON_READER_BYTES_PER_VALUE = 17;

/** SHA-256 in the pass's own thread, over one read buffer. */
export function localHashing(): HashHandOff {
  const h = createHash("sha256");
  const buffers = [new Uint8Array(READ_BUFFER_BYTES)];
  return {
    buffers,
    head: (bytes) => void h.update(bytes),
    hash: (i, start, end) => void h.update(buffers[i]!.subarray(start, end)),
    take: () => undefined,
    digest: () => h.digest("hex"),
  };
}

export async function csvBodyPass(
  job: CsvBodyJob,
  emit: PieceSink,
  columns = columnPool(),
  hashing: HashHandOff = localHashing(),
): Promise<ReadSummary> {
  const { file, timeIndex, timeFactor, rateOverride } = job;
  const parser = new CsvBodyParser(job);
  let frames = 0;
  let lineNo = job.bodyLine;

  const times =
    timeIndex >= 0
      ? new TimeStampCheck({ file, index: timeIndex, name: job.columnNames[timeIndex], factor: timeFactor })
      : undefined;

  // Plain blocking reads: the pass runs on a worker for large files, and an asynchronous read of each
  // piece cost more (0.15-0.23 s on 10 M rows) than the copy itself (about 0.05 s).
  const fd = openSync(file, "r");
  let pos = 0;
  try {
    // The bytes before the body (comments, header) are hashed, not parsed.
    if (job.bodyStart > 0) {
      const head = Buffer.alloc(job.bodyStart);
      readSync(fd, head, 0, job.bodyStart, 0);
      hashing.head(head);
      pos = job.bodyStart;
    }
    // The read buffers in turn: the partial line after a piece's cut goes to the start of the next
    // buffer (or of the same one, when there is one), and the next bytes are read after it. The new
    // bytes of each read are the file's bytes in order, each once: those are hashed.
    const bufs = hashing.buffers;
    let cur = 0;
    let buf = bufs[0]!;
    await hashing.take(0);
    let carry = 0;
    for (;;) {
      const bytesRead = readSync(fd, buf, carry, PIECE_BYTES, pos);
      pos += bytesRead;
      if (bytesRead > 0) hashing.hash(cur, carry, carry + bytesRead);
      const atEnd = bytesRead === 0;
      const len = carry + bytesRead;
      let cut = len;
      if (!atEnd) {
        const nl = buf.lastIndexOf(10, len - 1);
        if (nl < 0) {
          if (len > MAX_LINE_BYTES)
            throw new InputError("CSV_LINE_TOO_LONG", {
              file,
              line: lineNo,
              expected: `lines shorter than ${MAX_LINE_BYTES} bytes`,
              received: "a longer line",
            });
          cut = 0;
        } else cut = nl + 1;
      }
      let end = cut;
      if (end > 0 && buf[end - 1] !== 10) buf[end++] = 10; // the file's last line had no newline
      if (end > 0) {
        const piece = parser.parse(buf, 0, end, lineNo, columns.alloc);
        if (times && piece.rows > 0) times.check(piece, lineNo);
        frames += piece.rows;
        lineNo += piece.lines;
        await emit(piece, pos);
      }
      if (atEnd) break;
      carry = len - cut;
      if (bufs.length === 1) buf.copyWithin(0, cut, len);
      else {
        const next = (cur + 1) % bufs.length;
        await hashing.take(next);
        bufs[next]!.set(buf.subarray(cut, len), 0);
        cur = next;
        buf = bufs[next]!;
      }
    }
  } finally {
    closeSync(fd);
  }
  const span = times?.finish();
  if (frames < 2) {
    throw new InputError("CSV_TOO_SHORT", { file, expected: "at least 2 samples", received: `${frames}` });
  }
  let rate = rateOverride ?? NaN;
  let startTime: string | undefined;
  if (span) {
    // Rate from the whole span, snapped to the roundest rate its printed stamps cannot tell apart
    // from it (read/roundRate.ts): each stamp is rounded to its last digit (quantum q), so the span is
    // uncertain by q and the rate by rate * q / span.
    const t = span.tLast - span.t0;
    const estimate = (frames - 1) / t;
    const margin = (estimate * span.quantum) / t;
    const columnRate = roundRate(estimate, margin);
    const col = job.timeColumn;
    if (rateOverride !== undefined) {
      // --rate against a time column: they must agree within the stamps' rounding, or 0.1 % (common practice: clock
      // tolerance of a logger).
      if (col && Math.abs(columnRate - rateOverride) > Math.max(margin, 1e-3 * rateOverride))
        throw rateConflict(col, rateOverride, columnRate);
    } else {
      if (col && !col.unitDeclared && columnRate < MIN_PLAUSIBLE_RATE_HZ) throw implausibleRate(col, columnRate);
      rate = columnRate;
    }
    if (job.timeDateTime)
      startTime = isoDateTime(job.timeDateTime.baseDays, span.t0, span.fractionDigits, parser.zoned);
    // Serial day numbers count from 1899-12-30 in the 1900 date system of spreadsheets (day 1 is
    // 1900-01-01 there, and day 60 the 29 February 1900 that never was; from day 61 on the count is
    // true, common practice). 10^-d day is 86.4 * 10^(3-d) s: about d - 4 digits of seconds.
    if (job.serialDays)
      startTime = isoDateTime(SERIAL_EPOCH_DAYS, span.t0, Math.max(0, span.fractionDigits - 4), false);
  }
  return { frames, sampleRateHz: rate, sha256: hashing.digest(), bytes: pos, startTime };
}
