import { existsSync } from "node:fs";
import { open, stat } from "node:fs/promises";
import { availableParallelism } from "node:os";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import { InputError, quoted } from "../errors.js";
import { parseAccelUnit } from "../units.js";
import { columnPool, MAX_LINE_BYTES, pieceBuffers, splitRow, type CsvPiece, type Delimiter } from "./csvBody.js";
import { csvBodyPass, type CsvBodyJob } from "./csvBodyPass.js";
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
/**
 * Files at least this large are read on a worker thread (csvBodyPass there: read, hash, parse, check
 * time stamps) while this thread runs the accumulators; see bench/README.md.
 */
const PARALLEL_BYTES = 8 << 20;
const WORKER = new URL("./csvParseWorker.js", import.meta.url);
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
  if (head.indexOf(10) < 0) {
    // No line feed in the head: CR-only line ends (classic Mac), or a first line longer than the head.
    const cr = head.indexOf(13);
    if (cr >= 0 && cr < head.length - 1) {
      throw new InputError("CSV_LINE_ENDS", { file, line: 1, expected: "LF or CRLF line ends", received: "CR-only line ends", hint: "convert the line ends to LF (e.g. tr '\\r' '\\n')" });
    }
    if (!wholeFile) throw new InputError("CSV_LINE_TOO_LONG", { file, line: 1, expected: `a first line within the first ${HEAD_BYTES >> 10} KB`, received: "a longer line" });
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
  if (body === undefined && !wholeFile) {
    // More follows, but no whole row within the head: the line after the header is too long to sniff.
    const line = head.toString("latin1").split("\n").length;
    throw new InputError("CSV_LINE_TOO_LONG", { file, line, expected: `a first row of samples within the first ${HEAD_BYTES >> 10} KB`, received: "a longer line" });
  }
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
  // A large file's body is read on a worker thread. It starts now, so that its start-up (about 45 ms)
  // overlaps the sniffing here, and waits for its job; it is unref'd until then, so a source that is
  // never read does not keep the process alive (and close() ends it).
  const worker = (opts.parseWorkers ?? (size >= PARALLEL_BYTES && availableParallelism() > 1 ? 1 : 0)) > 0 && existsSync(fileURLToPath(WORKER)) ? startBodyWorker() : undefined;
  try {
    return await openSniffed(file, size, opts, worker);
  } catch (e) {
    await worker?.thread.terminate();
    throw e;
  }
}

interface BodyWorker {
  thread: Worker;
  /** Settles with the reason when the thread fails or stops, whenever that happens. */
  ended: Promise<Error>;
}

function startBodyWorker(): BodyWorker {
  const thread = new Worker(WORKER);
  thread.unref();
  const ended = new Promise<Error>((resolve) => {
    thread.once("error", resolve);
    thread.once("exit", (code) => resolve(new Error(`the CSV worker stopped (exit code ${code})`)));
  });
  return { thread, ended };
}

async function openSniffed(file: string, size: number, opts: CsvReadOptions, worker: BodyWorker | undefined): Promise<TimeHistorySource> {
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
    read: (select, sink, onProgress) => {
      // The worker serves one read; a later read of the same source parses here.
      const w = worker;
      worker = undefined;
      return readBody(file, dialect, columns, timeIndex, timeFactor, opts.sampleRateHz, select.map((s) => channelCols[s]!.index), sink, onProgress, w);
    },
    close: async () => {
      const w = worker;
      worker = undefined;
      await w?.thread.terminate();
    },
  };
}

async function readBody(
  file: string, d: Dialect, columns: Column[], timeIndex: number, timeFactor: number, rateOverride: number | undefined,
  selectCols: number[], sink: BlockSink, onProgress: ((bytes: number) => void) | undefined, bodyWorker: BodyWorker | undefined,
): Promise<ReadSummary> {
  const job: CsvBodyJob = {
    file, columns: d.columns, columnNames: columns.map((c) => c.name), delimiter: d.delimiter, decimal: d.decimal, timeIndex, selectColumns: selectCols,
    bodyStart: d.bodyStart, bodyLine: d.bodyLine, timeFactor, rateOverride,
  };
  if (!bodyWorker) {
    const pool = columnPool();
    return csvBodyPass(job, (piece, bytes) => {
      if (piece.rows > 0) sink(piece.channels, piece.rows);
      pool.give(pieceBuffers(piece));
      onProgress?.(bytes);
    }, pool);
  }
  const worker = bodyWorker.thread;
  worker.ref();
  worker.postMessage({ job });
  try {
    return await new Promise<ReadSummary>((resolve, reject) => {
      void bodyWorker.ended.then(reject);
      worker.on("message", (m: WorkerReply) => {
        if ("piece" in m) {
          try {
            if (m.piece.rows > 0) sink(m.piece.channels, m.piece.rows);
            onProgress?.(m.bytes);
          } catch (e) {
            reject(e);
            return;
          }
          // The sink has consumed the columns: their memory goes back to the worker.
          const bufs = pieceBuffers(m.piece);
          worker.postMessage({ recycle: bufs }, bufs);
        } else if ("done" in m) resolve(m.done);
        else if ("inputError" in m) reject(new InputError(m.inputError.code, m.inputError.details));
        else reject(new Error(m.internal));
      });
    });
  } finally {
    await worker.terminate();
  }
}

type WorkerReply =
  | { piece: CsvPiece; bytes: number }
  | { done: ReadSummary }
  | { inputError: { code: string; details: InputError["details"] } }
  | { internal: string };
