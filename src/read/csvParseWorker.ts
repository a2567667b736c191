import { parentPort, workerData } from "node:worker_threads";
import { InputError } from "../errors.js";
import { columnPool, CsvBodyParser, pieceBuffers, type CsvBodySpec } from "./csvBody.js";

/** A CSV body parser in a worker thread: pieces in (transferred), columns out (transferred). */
const parser = new CsvBodyParser(workerData as CsvBodySpec);
/** Column buffers the reader sent back, filled again for later pieces (less garbage, flat memory). */
const columns = columnPool();
parentPort!.on("message", (m: { seq: number; buffer: ArrayBuffer; length: number } | { recycle: ArrayBuffer[] }) => {
  if ("recycle" in m) {
    columns.give(m.recycle);
    return;
  }
  try {
    const piece = parser.parse(new Uint8Array(m.buffer, 0, m.length), 0, m.length, 0, columns.alloc);
    // The piece's own buffer goes back too, for the reader to fill again.
    const transfer: ArrayBuffer[] = [m.buffer, ...pieceBuffers(piece)];
    if (piece.rowLines) transfer.push(piece.rowLines.buffer as ArrayBuffer);
    parentPort!.postMessage({ seq: m.seq, piece, buffer: m.buffer }, transfer);
  } catch (e) {
    if (e instanceof InputError) parentPort!.postMessage({ seq: m.seq, inputError: { code: e.code, details: e.details } });
    else parentPort!.postMessage({ seq: m.seq, internal: (e as Error)?.stack ?? String(e) });
  }
});
