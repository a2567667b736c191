import { parentPort, workerData } from "node:worker_threads";
import { InputError } from "../errors.js";
import { CsvBodyParser, type CsvBodySpec } from "./csvBody.js";

/** A CSV body parser in a worker thread: pieces in (transferred), columns out (transferred). */
const parser = new CsvBodyParser(workerData as CsvBodySpec);
parentPort!.on("message", (m: { seq: number; buffer: ArrayBuffer; length: number }) => {
  try {
    const piece = parser.parse(new Uint8Array(m.buffer, 0, m.length), 0, m.length, 0);
    // The piece's own buffer goes back too, for the reader to fill again.
    const transfer: ArrayBuffer[] = [m.buffer, ...piece.channels.map((c) => c.buffer as ArrayBuffer)];
    if (piece.time) transfer.push(piece.time.buffer as ArrayBuffer);
    if (piece.rowLines) transfer.push(piece.rowLines.buffer as ArrayBuffer);
    parentPort!.postMessage({ seq: m.seq, piece, buffer: m.buffer }, transfer);
  } catch (e) {
    if (e instanceof InputError) parentPort!.postMessage({ seq: m.seq, inputError: { code: e.code, details: e.details } });
    else parentPort!.postMessage({ seq: m.seq, internal: (e as Error)?.stack ?? String(e) });
  }
});
