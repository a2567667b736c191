import { createReadStream } from "node:fs";
import { open, stat } from "node:fs/promises";
import { createHash } from "node:crypto";
import Papa from "papaparse";
import { InputError, quoted } from "../errors.js";
import { parseAccelUnit } from "../units.js";
import { nonFiniteToken, parseNumberText, scanNumber, type ScanState } from "./csvNumber.js";
import { BLOCK_FRAMES, type BlockSink, type ChannelInfo, type ReadSummary, type TimeHistorySource } from "./timeHistory.js";

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
}

type Delimiter = "," | ";" | "\t" | "whitespace";

const HEAD_BYTES = 65536;
const MAX_LINE_BYTES = 1 << 20;
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

function splitRow(text: string, delimiter: Delimiter): string[] {
  if (delimiter === "whitespace") return text.trim().split(/\s+/);
  if (!text.includes('"')) return text.split(delimiter);
  const r = Papa.parse<string[]>(text, { delimiter, header: false });
  return r.data[0] ?? [""];
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
    for (const d of ["\t", ";", ","] as const) {
      const counts = lines.map((l) => splitRow(l.text, d).length);
      if (counts[0]! >= 2 && counts.every((c) => c === counts[0])) {
        delimiter = d;
        break;
      }
    }
    if (delimiter === undefined) {
      const counts = lines.map((l) => splitRow(l.text, "whitespace").length);
      delimiter = counts[0]! >= 2 && counts.every((c) => c === counts[0]) ? "whitespace" : ",";
    }
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
      readBody(file, dialect, columns, timeIndex, timeFactor, opts.sampleRateHz, select.map((s) => channelCols[s]!.index), sink, onProgress),
  };
}

const SPACE = 32;
const TAB = 9;
const CR = 13;

async function readBody(
  file: string, d: Dialect, columns: Column[], timeIndex: number, timeFactor: number, rateOverride: number | undefined,
  selectCols: number[], sink: BlockSink, onProgress?: (bytes: number) => void,
): Promise<ReadSummary> {
  const ncol = d.columns;
  const delimByte = d.delimiter === "whitespace" ? -1 : d.delimiter.charCodeAt(0);
  const decimalByte = d.decimal.charCodeAt(0);
  const hash = createHash("sha256");
  // Where each file column goes: -1 dropped, -2 time, else the output channel.
  const target = new Int32Array(ncol).fill(-1);
  selectCols.forEach((c, i) => (target[c] = i));
  if (timeIndex >= 0) target[timeIndex] = -2;
  const outs = selectCols.map(() => new Float64Array(BLOCK_FRAMES));
  const row = new Float64Array(ncol);
  let frames = 0;
  let inBlock = 0;
  let lineNo = d.bodyLine;
  const scan: ScanState = { end: 0, value: 0, fractionDigits: 0 };

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
  let timeFrac = 0;

  const fail = (code: string, column: number | undefined, expected: string, received: string, hint?: string): never => {
    throw new InputError(code, { file, line: lineNo, column, field: column !== undefined ? columns[column - 1]?.name : undefined, expected, received, hint });
  };
  const checkStep = (t: number, line: number, prev: number) => {
    const step = t - prev;
    if (!(step > 0)) {
      throw new InputError(step === 0 ? "CSV_TIME_DUPLICATE" : "CSV_TIME_DECREASING", {
        file, line, column: timeIndex + 1, field: columns[timeIndex]!.name, expected: "time stamps that increase", received: step === 0 ? `a repeated time ${t / timeFactor}` : `${t / timeFactor} after ${prev / timeFactor}`,
      });
    }
    if (Math.abs(step - dt) > tol) {
      throw new InputError("CSV_TIME_IRREGULAR", {
        file, line, column: timeIndex + 1, field: columns[timeIndex]!.name, expected: `a uniform time step of ${fmt(dt / timeFactor)} (within 1 %)`, received: `a step of ${fmt(step / timeFactor)}`,
        hint: "psdgate needs uniformly sampled data; split the record at the gap or resample it",
      });
    }
  };
  const onTime = (t: number) => {
    if (frames === 0) t0 = t;
    if (frames <= PROBE) {
      probeT[frames] = t;
      probeLine[frames] = lineNo;
      if (timeFrac > maxFrac) maxFrac = timeFrac;
      if (frames === PROBE) settleStep(frames + 1);
    } else checkStep(t, lineNo, tPrev);
    tPrev = t;
    tLast = t;
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

  const emitRow = () => {
    for (let c = 0; c < ncol; c++) {
      const tg = target[c]!;
      if (tg >= 0) outs[tg]![inBlock] = row[c]!;
    }
    if (timeIndex >= 0) {
      const t = row[timeIndex]! * timeFactor;
      if (!Number.isFinite(t)) fail("CSV_TIME_NOT_A_NUMBER", timeIndex + 1, "a finite time stamp", String(row[timeIndex]));
      onTime(t);
    }
    frames++;
    inBlock++;
    if (inBlock === BLOCK_FRAMES) {
      sink(outs, inBlock);
      inBlock = 0;
    }
  };

  const slowLine = (buf: Buffer, s: number, e: number) => {
    const text = buf.toString("utf8", s, e);
    const fields = splitRow(text, d.delimiter);
    if (fields.length !== ncol) {
      fail(fields.length < ncol ? "CSV_TOO_FEW_FIELDS" : "CSV_TOO_MANY_FIELDS", fields.length < ncol ? fields.length + 1 : ncol + 1, `${ncol} fields as in the first row`, `${fields.length}`);
    }
    for (let c = 0; c < ncol; c++) {
      const f = fields[c]!.trim();
      if (f === "") fail("CSV_EMPTY_CELL", c + 1, `a number in column ${quoted(columns[c]!.name)}`, "an empty cell");
      let v = parseNumberText(f, d.decimal);
      if (Number.isNaN(v)) {
        const nf = nonFiniteToken(f);
        if (nf === undefined) {
          const hint = d.decimal === "." && /^[+-]?\d+,\d+$/.test(f) ? "the file may use decimal commas: give --delimiter ';' --decimal comma" : undefined;
          fail("CSV_NOT_A_NUMBER", c + 1, `a number in column ${quoted(columns[c]!.name)}`, quoted(f), hint);
        }
        v = nf!;
      }
      row[c] = v;
      if (c === timeIndex) {
        const m = /[.,](\d+)/.exec(f);
        timeFrac = m ? m[1]!.length : 0;
      }
    }
    emitRow();
  };

  const parseLine = (buf: Buffer, s: number, e: number) => {
    if (e > s && buf[e - 1] === CR) e--;
    let p = s;
    while (p < e && (buf[p] === SPACE || buf[p] === TAB)) p++;
    if (p === e || buf[p] === 35 /* # */) return;
    for (let c = 0; c < ncol; c++) {
      if (delimByte !== TAB) while (p < e && (buf[p] === SPACE || (delimByte < 0 && buf[p] === TAB))) p++;
      else while (p < e && buf[p] === SPACE) p++;
      scanNumber(buf, p, e, decimalByte, scan);
      if (scan.end < 0) return slowLine(buf, s, e);
      row[c] = scan.value;
      if (c === timeIndex) timeFrac = scan.fractionDigits;
      p = scan.end;
      if (delimByte !== TAB) while (p < e && (buf[p] === SPACE || (delimByte < 0 && buf[p] === TAB))) p++;
      else while (p < e && buf[p] === SPACE) p++;
      if (c < ncol - 1) {
        if (delimByte >= 0) {
          if (buf[p] !== delimByte) return slowLine(buf, s, e);
          p++;
        } else if (p === e) return slowLine(buf, s, e);
      } else if (p !== e) return slowLine(buf, s, e);
    }
    emitRow();
  };

  let carry: Buffer | undefined;
  let skip = d.bodyStart;
  let done = 0;
  const stream = createReadStream(file, { highWaterMark: 65536 });
  for await (const chunk of stream as AsyncIterable<Buffer>) {
    hash.update(chunk);
    done += chunk.length;
    let data = chunk;
    if (skip > 0) {
      if (skip >= chunk.length) {
        skip -= chunk.length;
        continue;
      }
      data = chunk.subarray(skip);
      skip = 0;
    }
    let pos = 0;
    if (carry !== undefined) {
      // Finish the line carried over from the last chunk without copying the whole chunk.
      const nl = data.indexOf(10);
      if (nl < 0) {
        carry = Buffer.concat([carry, data]);
        if (carry.length > MAX_LINE_BYTES) fail("CSV_LINE_TOO_LONG", undefined, `lines shorter than ${MAX_LINE_BYTES} bytes`, "a longer line");
        onProgress?.(done);
        continue;
      }
      const joined = Buffer.concat([carry, data.subarray(0, nl)]);
      parseLine(joined, 0, joined.length);
      lineNo++;
      pos = nl + 1;
      carry = undefined;
    }
    for (;;) {
      const nl = data.indexOf(10, pos);
      if (nl < 0) break;
      parseLine(data, pos, nl);
      lineNo++;
      pos = nl + 1;
    }
    carry = pos < data.length ? Buffer.from(data.subarray(pos)) : undefined;
    if (carry !== undefined && carry.length > MAX_LINE_BYTES) fail("CSV_LINE_TOO_LONG", undefined, `lines shorter than ${MAX_LINE_BYTES} bytes`, "a longer line");
    onProgress?.(done);
  }
  if (carry !== undefined) parseLine(carry, 0, carry.length);
  if (inBlock > 0) sink(outs, inBlock);
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
  return { frames, sampleRateHz: rate, sha256: hash.digest("hex"), bytes: done };
}

function fmt(x: number): string {
  return Number(x.toPrecision(6)).toString();
}
