import { existsSync } from "node:fs";
import { open, stat } from "node:fs/promises";
import { createHash } from "node:crypto";
import { availableParallelism } from "node:os";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import { InputError, quoted } from "../errors.js";
import { parseAccelUnit } from "../units.js";
import { columnPool, CsvBodyParser, MAX_LINE_BYTES, pieceBuffers, splitRow, type CsvBodySpec, type CsvPiece, type Delimiter } from "./csvBody.js";
import { nonFiniteToken, parseNumberText } from "./csvNumber.js";
import type { BlockSink, ChannelInfo, ReadSummary, TimeHistorySource } from "./timeHistory.js";

/**
 * Streaming reader for delimited-text time histories (logger exports).
 *
 * The first 64 KB are decoded and sniffed: delimiter (tab, semicolon, comma, whitespace), decimal
 * mark, header row, time column, units in headers. papaparse splits the sniffed rows (it knows
 * quoting); the body then goes through a byte-level fast path that parses plain numeric rows without
 * making strings, and hands any row it does not understand (quotes, text) to papaparse and the
 * slow parser, which either reads it or names the line and column in an error. Both paths give
 * bit-identical numbers (tests/read/csvTimeHistory.test.ts).
 */
export interface CsvReadOptions {
  /** Name or 1-based index of the time column; `false` means there is none. */
  timeColumn?: string | number | false | undefined;
  /** Sample rate when the file has no time column (or to override it). */
  sampleRateHz?: number | undefined;
  delimiter?: "," | ";" | "\t" | "whitespace" | undefined;
  decimal?: "." | "," | undefined;
  /** 1 to parse (and hash) the body on a worker thread, 0 for this thread (default: 1 for files of 8 MB and more when there is a second core). */
  parseWorkers?: number | undefined;
}

const HEAD_BYTES = 65536;
const TIME_NAMES = /^(t|time|times|timestamp|time_?s|time_?ms|time_?us|seconds?|secs?|zeit|temps|tiempo)$/i;
const TIME_UNITS: Record<string, number> = { s: 1, sec: 1, secs: 1, seconds: 1, ms: 1e-3, us: 1e-6, µs: 1e-6, μs: 1e-6, ns: 1e-9, min: 60 };

interface Dialect {
  delimiter: Delimiter;
  decimal: "." | ",";
  header: string[] | undefined;
  columns: number;
  /** Byte offset of the first body row (after the header, if any). */
  bodyStart: number;
  /** 1-based line number of the first body line. */
  bodyLine: number;
}

interface Column {
  index: number;
  name: string;
  unitText: string | undefined;
}

function splitNameUnit(field: string, index: number): Column {
  const f = field.trim();
  const m = /^(.*?)\s*[[(]\s*([^\])]*?)\s*[\])]\s*$/.exec(f);
  if (m && m[1] !== "") return { index, name: m[1]!, unitText: m[2] };
  const u = /^(.*?)_(ms|us|s)$/i.exec(f);
  if (u && TIME_NAMES.test(u[1]!)) return { index, name: f, unitText: u[2]!.toLowerCase() };
  return { index, name: f === "" ? `col${index + 1}` : f, unitText: undefined };
}

/** Lines of the head, with their byte offsets and 1-based numbers; comments and blank lines skipped. */
function headLines(head: Buffer, wholeFile: boolean): { text: string; line: number; start: number; end: number }[] {
  const out: { text: string; line: number; start: number; end: number }[] = [];
  let pos = head[0] === 0xef && head[1] === 0xbb && head[2] === 0xbf ? 3 : 0;
  let line = 1;
  while (pos < head.length) {
    let nl = head.indexOf(10, pos);
    if (nl < 0) {
      if (!wholeFile) break;
      nl = head.length;
    }
    const text = head.toString("utf8", pos, nl).replace(/\r$/, "");
    const trimmed = text.trim();
    if (trimmed !== "" && !trimmed.startsWith("#")) out.push({ text, line, start: pos, end: nl + 1 });
    pos = nl + 1;
    line++;
  }
  return out;
}

function sniff(file: string, head: Buffer, wholeFile: boolean, opts: CsvReadOptions): Dialect {
  if (head.length === 0) throw new InputError("CSV_EMPTY", { file, expected: "a CSV time history", received: "an empty file" });
  if ((head[0] === 0xff && head[1] === 0xfe) || (head[0] === 0xfe && head[1] === 0xff)) {
    throw new InputError("CSV_ENCODING", { file, line: 1, expected: "UTF-8 or ASCII text", received: "UTF-16 (byte-order mark)", hint: "re-save the export as UTF-8" });
  }
  const nul = head.indexOf(0);
  if (nul >= 0) {
    const line = head.subarray(0, nul).toString("latin1").split("\n").length;
    throw new InputError("CSV_BINARY", { file, line, expected: "text", received: "binary data (a NUL byte)", hint: "is this really a CSV file?" });
  }
  const lines = headLines(head, wholeFile).slice(0, 64);
  if (lines.length === 0) throw new InputError("CSV_NO_DATA", { file, expected: "rows of samples", received: "only comments or blank lines" });
  const first = lines[0]!;
  if (first.end - first.start > MAX_LINE_BYTES || (!wholeFile && lines.length < 2 && head.indexOf(10) < 0)) {
    throw new InputError("CSV_LINE_TOO_LONG", { file, line: first.line, expected: `lines shorter than ${MAX_LINE_BYTES} bytes`, received: "a longer line" });
  }

  let delimiter: Delimiter | undefined = opts.delimiter;
  if (delimiter === undefined) {
    // A candidate must split every sniffed row into the same number (>= 2) of fields, and the rows
    // after the first must read as numbers (with either decimal mark): mixed space/tab alignment
    // splits consistently on tabs but gives fields like "0.00   1.5", so it falls through to whitespace.
    const numeric = (f: string) => /^\s*"?[+-]?(\d+[.,]?\d*|[.,]\d+)([eE][+-]?\d+)?"?\s*$/.test(f) || nonFiniteToken(f.replace(/"/g, "")) !== undefined;
    const fits = (d: Delimiter) => {
      const rows = lines.map((l) => splitRow(l.text, d));
      return rows[0]!.length >= 2 && rows.every((r) => r.length === rows[0]!.length) && rows.slice(1).every((r) => r.every(numeric));
    };
    delimiter = (["\t", ";", ",", "whitespace"] as const).find(fits) ?? ",";
  }

  const rows = lines.map((l) => splitRow(l.text, delimiter!).map((f) => f.trim()));
  let decimal: "." | "," | undefined = opts.decimal;
  if (decimal === ",") {
    if (delimiter === ",") {
      throw new InputError("OPTION_CONFLICT", { option: "--decimal", expected: "a delimiter other than ',' with decimal commas", received: "comma as both", hint: "add --delimiter ';'" });
    }
  } else if (decimal === undefined) {
    const body = rows.slice(1).flat();
    const commaNum = body.some((f) => /^[+-]?\d*,\d+([eE][+-]?\d+)?$/.test(f));
    const pointNum = body.some((f) => /^[+-]?\d*\.\d+([eE][+-]?\d+)?$/.test(f));
    if (commaNum && delimiter !== ",") {
      if (pointNum) {
        throw new InputError("CSV_DECIMAL_AMBIGUOUS", {
          file, line: lines[1]?.line, expected: "one decimal mark throughout", received: "both '.' and ',' in numbers",
          hint: "declare it with --decimal point or --decimal comma",
        });
      }
      decimal = ",";
    } else decimal = ".";
  }

  const isNumeric = (f: string) => !Number.isNaN(parseNumberText(f, decimal!)) || nonFiniteToken(f) !== undefined;
  const hasHeader = !rows[0]!.every(isNumeric);
  const header = hasHeader ? rows[0] : undefined;
  const bodyIndex = hasHeader ? 1 : 0;
  const body = lines[bodyIndex];
  if (body === undefined) {
    throw new InputError("CSV_NO_DATA", { file, line: first.line, expected: "rows of samples after the header", received: "a header only" });
  }
  return {
    delimiter, decimal, header, columns: rows[0]!.length,
    bodyStart: body.start, bodyLine: body.line,
  };
}

export async function openCsvTimeHistory(file: string, opts: CsvReadOptions = {}): Promise<TimeHistorySource> {
  const { size } = await stat(file);
  const fh = await open(file, "r");
  let head: Buffer;
  try {
    const buf = Buffer.alloc(Math.min(HEAD_BYTES, size));
    const { bytesRead } = await fh.read(buf, 0, buf.length, 0);
    head = buf.subarray(0, bytesRead);
  } finally {
    await fh.close();
  }
  const dialect = sniff(file, head, head.length >= size, opts);
  const columns: Column[] = [];
  for (let i = 0; i < dialect.columns; i++) columns.push(dialect.header ? splitNameUnit(dialect.header[i]!, i) : { index: i, name: `ch${i + 1}`, unitText: undefined });
  if (dialect.header) {
    const seen = new Map<string, number>();
    for (const c of columns) {
      if (seen.has(c.name.toLowerCase())) {
        throw new InputError("CSV_DUPLICATE_COLUMN", { file, line: dialect.bodyLine - 1, column: c.index + 1, expected: "distinct column names", received: quoted(c.name) });
      }
      seen.set(c.name.toLowerCase(), c.index);
    }
  }

  // Time column.
  let timeIndex = -1;
  if (opts.timeColumn !== undefined && opts.timeColumn !== false) {
    const tc = opts.timeColumn;
    timeIndex = typeof tc === "number" ? tc - 1 : columns.findIndex((c) => c.name.toLowerCase() === tc.toLowerCase());
    if (timeIndex < 0 || timeIndex >= columns.length) {
      throw new InputError("TIME_COLUMN_NOT_FOUND", { file, option: "--time-column", expected: `one of ${columns.map((c) => quoted(c.name)).join(", ")} or 1..${columns.length}`, received: quoted(String(tc)) });
    }
  } else if (opts.timeColumn !== false && dialect.header) {
    timeIndex = columns.findIndex((c) => TIME_NAMES.test(c.name));
  }
  let timeFactor = 1;
  if (timeIndex >= 0) {
    const u = columns[timeIndex]!.unitText;
    if (u !== undefined) {
      const f = TIME_UNITS[u.toLowerCase()];
      if (f === undefined) {
        throw new InputError("CSV_TIME_UNIT", { file, line: dialect.bodyLine - 1, column: timeIndex + 1, expected: "a time unit (s, ms, us)", received: quoted(u) });
      }
      timeFactor = f;
    }
  }
  if (timeIndex < 0 && opts.sampleRateHz === undefined) {
    throw new InputError("CSV_NO_RATE", {
      file, expected: "a time column (header 'time', 't', 'time [ms]', …) or a sample rate", received: dialect.header ? `columns ${dialect.header.map((h) => quoted(h)).join(", ")}` : "no header",
      hint: "give --rate HZ, or --time-column NAME",
    });
  }
  const channelCols = columns.filter((c) => c.index !== timeIndex);
  if (channelCols.length === 0) throw new InputError("CSV_NO_CHANNELS", { file, expected: "at least one data column besides time", received: "only a time column" });
  const channels: ChannelInfo[] = channelCols.map((c) => {
    const unit = c.unitText === undefined ? undefined : parseAccelUnit(c.unitText);
    return { name: c.name, declaredUnit: unit, declaredUnitText: unit === undefined ? c.unitText : undefined };
  });

  // Provisional rate from the sniffed rows; the final one comes from the whole time column.
  let provisionalRate = opts.sampleRateHz ?? NaN;
  if (opts.sampleRateHz === undefined) {
    const times = headLines(head, head.length >= size)
      .filter((l) => l.start >= dialect.bodyStart)
      .map((l) => parseNumberText(splitRow(l.text, dialect.delimiter)[timeIndex] ?? "", dialect.decimal) * timeFactor)
      .filter((t) => Number.isFinite(t));
    if (times.length >= 2) provisionalRate = (times.length - 1) / (times[times.length - 1]! - times[0]!);
  }

  const delimName = dialect.delimiter === "\t" ? "tab" : dialect.delimiter === "whitespace" ? "whitespace" : `'${dialect.delimiter}'`;
  return {
    info: {
      file, format: "csv", sampleRateHz: provisionalRate, channels, bytes: size,
      layout: `delimited text, ${delimName} delimiter, decimal '${dialect.decimal}', ${dialect.header ? "header row" : "no header"}${timeIndex >= 0 ? `, time column ${quoted(columns[timeIndex]!.name)}` : ""}`,
    },
    read: (select, sink, onProgress) =>
      readBody(file, dialect, columns, timeIndex, timeFactor, opts.sampleRateHz, select.map((s) => channelCols[s]!.index), sink, onProgress, opts.parseWorkers),
  };
}

/** Pieces of about this size are parsed at a time (in workers for large files). */
const PIECE_BYTES = 1 << 20;
/**
 * Files at least this large are parsed on a worker thread while this thread hashes, checks time
 * stamps and runs the accumulators. One parser worker measured fastest on 2 cores (10 M rows x 4
 * columns: about 1.9 s, against 2.5 s with two and 3.2 s with none; see bench/README.md).
 */
const PARALLEL_BYTES = 8 << 20;
const WORKER = new URL("./csvParseWorker.js", import.meta.url);

async function readBody(
  file: string, d: Dialect, columns: Column[], timeIndex: number, timeFactor: number, rateOverride: number | undefined,
  selectCols: number[], sink: BlockSink, onProgress: ((bytes: number) => void) | undefined, parseWorkers: number | undefined,
): Promise<ReadSummary> {
  const spec: CsvBodySpec = {
    file, columns: d.columns, columnNames: columns.map((c) => c.name), delimiter: d.delimiter, decimal: d.decimal, timeIndex, selectColumns: selectCols,
  };
  let frames = 0;
  let lineNo = d.bodyLine;

  // Time-step check: the median step of the first rows is the reference; every step must lie within
  // 1 % of it plus the resolution of the printed stamps (so stamps rounded to 6 decimals pass).
  const PROBE = 1024;
  const probeT = new Float64Array(PROBE + 1);
  const probeLine = new Float64Array(PROBE + 1);
  let t0 = NaN;
  let tPrev = NaN;
  let tLast = NaN;
  let dt = NaN;
  let tol = NaN;
  let maxFrac = 0;
  const timeName = timeIndex >= 0 ? columns[timeIndex]!.name : undefined;
  const checkStep = (t: number, line: number, prev: number) => {
    const step = t - prev;
    if (!(step > 0)) {
      throw new InputError(step === 0 ? "CSV_TIME_DUPLICATE" : "CSV_TIME_DECREASING", {
        file, line, column: timeIndex + 1, field: timeName, expected: "time stamps that increase", received: step === 0 ? `a repeated time ${t / timeFactor}` : `${t / timeFactor} after ${prev / timeFactor}`,
      });
    }
    if (Math.abs(step - dt) > tol) {
      throw new InputError("CSV_TIME_IRREGULAR", {
        file, line, column: timeIndex + 1, field: timeName, expected: `a uniform time step of ${fmt(dt / timeFactor)} (within 1 %)`, received: `a step of ${fmt(step / timeFactor)}`,
        hint: "psdgate needs uniformly sampled data; split the record at the gap or resample it",
      });
    }
  };
  const settleStep = (count: number) => {
    if (timeIndex < 0 || count < 2) return;
    // Order first, so a decreasing stamp is named as such; then the median step of the probe.
    for (let i = 1; i < count; i++) {
      if (!(probeT[i]! > probeT[i - 1]!)) {
        dt = Infinity;
        tol = Infinity;
        checkStep(probeT[i]!, probeLine[i]!, probeT[i - 1]!);
      }
    }
    const steps = new Float64Array(count - 1);
    for (let i = 1; i < count; i++) steps[i - 1] = probeT[i]! - probeT[i - 1]!;
    steps.sort();
    dt = steps[(steps.length - 1) >> 1]!;
    tol = 0.01 * dt + Math.min(1.01 * Math.pow(10, -maxFrac) * timeFactor, 0.5 * dt);
    for (let i = 1; i < count; i++) checkStep(probeT[i]!, probeLine[i]!, probeT[i - 1]!);
  };

  /** Pieces come here in file order, from this thread's parser or from the workers. */
  const take = (piece: CsvPiece) => {
    const base = lineNo;
    const lineOf = (i: number) => base + (piece.rowLines ? piece.rowLines[i]! : i);
    if (piece.time) {
      const tv = piece.time;
      const rows = piece.rows;
      let i = 0;
      // The first rows settle the reference step (the probe); they take the careful path.
      for (; i < rows && frames <= PROBE; i++) {
        const t = tv[i]! * timeFactor;
        if (!Number.isFinite(t)) {
          throw new InputError("CSV_TIME_NOT_A_NUMBER", { file, line: lineOf(i), column: timeIndex + 1, field: timeName, expected: "a finite time stamp", received: String(tv[i]) });
        }
        if (frames === 0) t0 = t;
        probeT[frames] = t;
        probeLine[frames] = lineOf(i);
        if (piece.timeFractionDigits > maxFrac) maxFrac = piece.timeFractionDigits;
        if (frames === PROBE) settleStep(PROBE + 1);
        tPrev = t;
        frames++;
      }
      // Every later row: one subtraction and two comparisons on locals; the line only on failure.
      const fastFrom = i;
      let prev = tPrev;
      const ref = dt;
      const allowed = tol;
      const k = timeFactor;
      for (; i < rows; i++) {
        const t = tv[i]! * k;
        const step = t - prev;
        if (!(step > 0 && Math.abs(step - ref) <= allowed)) {
          if (!Number.isFinite(t)) {
            throw new InputError("CSV_TIME_NOT_A_NUMBER", { file, line: lineOf(i), column: timeIndex + 1, field: timeName, expected: "a finite time stamp", received: String(tv[i]) });
          }
          checkStep(t, lineOf(i), prev);
        }
        prev = t;
      }
      frames += rows - fastFrom;
      tPrev = prev;
      tLast = prev;
    } else frames += piece.rows;
    if (piece.rows > 0) sink(piece.channels, piece.rows);
    lineNo += piece.lines;
  };

  const fh = await open(file, "r");
  const size = (await fh.stat()).size;
  const useWorker = (parseWorkers ?? (size >= PARALLEL_BYTES && availableParallelism() > 1 ? 1 : 0)) > 0 && existsSync(fileURLToPath(WORKER));
  // With a worker, the worker hashes the bytes it is given, in file order, beside its parsing.
  const worker = useWorker ? new Worker(WORKER, { workerData: spec }) : undefined;
  const hash = worker ? undefined : createHash("sha256");
  let sha256 = "";
  const parser = worker ? undefined : new CsvBodyParser(spec);
  let pos = 0;
  try {
    /** Piece buffers handed back (by the worker, or free again here), to be filled again: less garbage. */
    const spare: ArrayBuffer[] = [];
    const columnsHere = columnPool();
    // Pieces in flight on the worker, by sequence number; results are taken strictly in order.
    const waiting = new Map<number, Deferred<CsvPiece>>();
    let digest: Deferred<string> | undefined;
    let sent = 0;
    let taken = 0;
    worker?.on("message", (m: WorkerReply) => {
      if ("digest" in m) return digest?.resolve(m.digest);
      if (m.buffer) spare.push(m.buffer);
      const slot = waiting.get(m.seq)!;
      if (m.piece) slot.resolve(m.piece);
      else if (m.inputError) slot.reject(m.inputError);
      else slot.reject(new Error(m.internal));
    });
    worker?.on("error", (e) => {
      waiting.forEach((s) => s.reject(e));
      digest?.reject(e);
    });
    const takeNext = async () => {
      const slot = waiting.get(taken)!;
      try {
        const piece = await slot.promise;
        take(piece);
        // The sink has consumed the columns: hand their memory back to the worker that made them.
        const bufs = pieceBuffers(piece);
        worker!.postMessage({ recycle: bufs }, bufs);
      } catch (e) {
        if (e instanceof Error) throw e;
        // A worker's input error carries a line relative to its piece.
        const err = e as { code: string; details: InputError["details"] };
        throw new InputError(err.code, { ...err.details, line: err.details.line !== undefined ? lineNo + err.details.line : undefined });
      }
      waiting.delete(taken);
      taken++;
    };

    // The bytes before the body (comments, header) are hashed, not parsed.
    if (d.bodyStart > 0) {
      const head = Buffer.alloc(d.bodyStart);
      await fh.read(head, 0, d.bodyStart, 0);
      if (worker) worker.postMessage({ hashOnly: head });
      else hash!.update(head);
      pos = d.bodyStart;
    }
    // Each piece is read straight into a buffer of its own (after the carried partial line), which
    // is then handed to the parser or transferred to the worker without another copy. The pieces'
    // bytes up to their cut are the file's bytes in order, each once; the partial line after the cut
    // starts the next piece.
    let carry: Uint8Array | undefined;
    for (;;) {
      const carryLen = carry?.length ?? 0;
      const reuse = spare.length > 0 && spare[spare.length - 1]!.byteLength >= carryLen + PIECE_BYTES + 1 ? spare.pop() : undefined;
      const own = reuse ? new Uint8Array(reuse) : new Uint8Array(carryLen + PIECE_BYTES + 1);
      if (carry) own.set(carry, 0);
      const { bytesRead } = await fh.read(own, carryLen, PIECE_BYTES, pos);
      pos += bytesRead;
      const atEnd = bytesRead === 0;
      const len = carryLen + bytesRead;
      let cut = len;
      carry = undefined;
      if (!atEnd) {
        const nl = own.lastIndexOf(10, len - 1);
        if (nl < 0) {
          if (len > MAX_LINE_BYTES) throw new InputError("CSV_LINE_TOO_LONG", { file, line: lineNo, expected: `lines shorter than ${MAX_LINE_BYTES} bytes`, received: "a longer line" });
          carry = own.slice(0, len);
          continue;
        }
        cut = nl + 1;
        if (cut < len) carry = own.slice(cut, len);
      }
      const fileBytes = cut;
      if (cut > 0 && own[cut - 1] !== 10) own[cut++] = 10; // the file's last line had no newline
      if (cut > 0) {
        if (parser) {
          hash!.update(own.subarray(0, fileBytes));
          // In this thread the sink consumes a piece at once, so its memory is free again right after.
          const piece = parser.parse(own, 0, cut, lineNo, columnsHere.alloc);
          take(piece);
          columnsHere.give(pieceBuffers(piece));
          spare.push(own.buffer);
        } else {
          waiting.set(sent, deferred<CsvPiece>());
          worker!.postMessage({ seq: sent, buffer: own.buffer, length: cut, fileBytes }, [own.buffer]);
          sent++;
          while (sent - taken > 2) await takeNext();
        }
      }
      onProgress?.(pos);
      if (atEnd) break;
    }
    while (taken < sent) await takeNext();
    if (worker) {
      digest = deferred<string>();
      worker.postMessage({ digest: true });
      sha256 = await digest.promise;
    } else sha256 = hash!.digest("hex");
  } finally {
    await fh.close();
    await worker?.terminate();
  }
  if (frames <= PROBE) settleStep(frames);
  if (frames < 2) {
    throw new InputError("CSV_TOO_SHORT", { file, expected: "at least 2 samples", received: `${frames}` });
  }
  let rate = rateOverride ?? NaN;
  if (rateOverride === undefined) {
    // Rate from the whole span. Each printed time stamp is rounded to its last digit (quantum q), so
    // the span is uncertain by q and the rate by rate * q / span; a whole-Hz rate inside that margin
    // is the logger's nominal rate (common practice: loggers run at whole-Hz rates).
    const span = tLast - t0;
    rate = (frames - 1) / span;
    const q = Math.pow(10, -maxFrac) * timeFactor;
    const whole = Math.round(rate);
    if (whole > 0 && Math.abs(whole - rate) <= (rate * q) / span) rate = whole;
  }
  return { frames, sampleRateHz: rate, sha256, bytes: pos };
}

interface Deferred<T> {
  promise: Promise<T>;
  resolve: (v: T) => void;
  reject: (e: unknown) => void;
}

function deferred<T>(): Deferred<T> {
  let resolve!: (v: T) => void;
  let reject!: (e: unknown) => void;
  const promise = new Promise<T>((a, b) => ((resolve = a), (reject = b)));
  promise.catch(() => undefined);
  return { promise, resolve, reject };
}

type WorkerReply =
  | { digest: string }
  | { seq: number; piece?: CsvPiece; buffer?: ArrayBuffer; inputError?: { code: string; details: InputError["details"] }; internal?: string };

function fmt(x: number): string {
  return Number(x.toPrecision(6)).toString();
}
