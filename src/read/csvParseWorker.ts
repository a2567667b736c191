import { createHash } from "node:crypto";
import { parentPort, workerData } from "node:worker_threads";
import { InputError } from "../errors.js";
import { columnPool, CsvBodyParser, pieceBuffers, type CsvBodySpec } from "./csvBody.js";

/**
 * A CSV body parser in a worker thread: pieces in (transferred), columns out (transferred). It also
 * hashes the file: the reader sends the header bytes, then every piece whose first `fileBytes` bytes
 * are the file's next bytes, in order, and at the end asks for the digest.
 */
type Message =
  | { seq: number; buffer: ArrayBuffer; length: number; fileBytes: number }
  | { recycle: ArrayBuffer[] }
  | { hashOnly: Uint8Array }
  | { digest: true };

const parser = new CsvBodyParser(workerData as CsvBodySpec);
const hash = createHash("sha256");
/** Column buffers the reader sent back, filled again for later pieces (less garbage, flat memory). */
const columns = columnPool();
parentPort!.on("message", (m: Message) => {
  if ("recycle" in m) return columns.give(m.recycle);
  if ("hashOnly" in m) return void hash.update(m.hashOnly);
  if ("digest" in m) return parentPort!.postMessage({ digest: hash.digest("hex") });
  try {
    const bytes = new Uint8Array(m.buffer, 0, m.length);
    hash.update(bytes.subarray(0, m.fileBytes));
    const piece = parser.parse(bytes, 0, m.length, 0, columns.alloc);
    // The piece's own buffer goes back too, for the reader to fill again.
    const transfer: ArrayBuffer[] = [m.buffer, ...pieceBuffers(piece)];
    if (piece.rowLines) transfer.push(piece.rowLines.buffer as ArrayBuffer);
    parentPort!.postMessage({ seq: m.seq, piece, buffer: m.buffer }, transfer);
  } catch (e) {
    if (e instanceof InputError) parentPort!.postMessage({ seq: m.seq, inputError: { code: e.code, details: e.details } });
    else parentPort!.postMessage({ seq: m.seq, internal: (e as Error)?.stack ?? String(e) });
  }
});
