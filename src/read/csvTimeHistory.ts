import { createHash } from "node:crypto";
import { open, stat } from "node:fs/promises";
import { errorFromWire, InputError, quoted, type WireError } from "../errors.js";
import { retireThread } from "../threadEnd.js";
import { parseUnitSpec, parseVoltUnit } from "../units.js";
import { columnPool, MAX_LINE_BYTES, pieceBuffers, splitRow, type CsvPiece, type Delimiter } from "./csvBody.js";
import { csvBodyPass, type CsvBodyJob } from "./csvBodyPass.js";
import { type BodyWorker, parseOnWorker, takeBodyWorker, workerBuilt } from "./csvWorkerStart.js";
import { roundRate, stampQuantum } from "./roundRate.js";
import { implausibleRate, MIN_PLAUSIBLE_RATE_HZ, rateConflict, type TimeColumnInfo } from "./timeStampCheck.js";
import { nonFiniteToken, numberTextResolution, parseNumberText } from "./csvNumber.js";
import { looksLikeDateTime, parseDateTimeText } from "./dateTimeStamp.js";
import type { BlockSink, ChannelInfo, CsvDialect, ReadSummary, TimeHistorySource } from "./timeHistory.js";

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
  /** Unit of a time column whose header does not say (default: seconds, with the plausibility rule). */
  timeUnit?: "s" | "ms" | "us" | "days" | "serial-days" | undefined;
  /**
   * 1 to parse (and hash) the body on a worker thread, 0 for this thread (default: 1 for files of 8 MB and more when
   * there is a second core).
   */
  parseWorkers?: number | undefined;
}

const HEAD_BYTES = 65536;
const TIME_NAMES =
  /^(t|time|times|timestamp|time_?s|time_?ms|time_?us|seconds?|secs?|elapsed|elapsed_?time|time_?elapsed|seconds_?elapsed|zeit|temps|tiempo|date ?time|date_time|date\/time|zeitstempel)$/i;
const TIME_UNITS: Record<string, number> = {
  s: 1,
  sec: 1,
  secs: 1,
  seconds: 1,
  ms: 1e-3,
  us: 1e-6,
  µs: 1e-6,
  μs: 1e-6,
  ns: 1e-9,
  min: 60,
  days: 86400,
  day: 86400,
  d: 86400,
};

interface Dialect {
  delimiter: Delimiter;
  decimal: "." | ",";
  header: string[] | undefined;
  columns: number;
  /** Byte offset of the first body row (after the header, if any). */
  bodyStart: number;
  /** 1-based line number of the first body line. */
  bodyLine: number;
  /** 1-based line of the header row, and of a units row under it. */
  headerLine?: number | undefined;
  unitLine?: number | undefined;
  /** The units row's fields, if there is one. */
  units?: string[] | undefined;
  /** Every row ends with a delimiter: an empty last column that is not read. */
  trailingEmpty: boolean;
  /** Lines before the header that are not comments (a logger's metadata), kept as text. */
  preamble: string[];
  preambleLines: number;
  /** Line of a `sep=` line, if any. */
  sepLine?: number | undefined;
  /** Fields of the first row of samples. */
  firstRow: string[];
}

interface Column {
  index: number;
  name: string;
  unitText: string | undefined;
}

function splitNameUnit(field: string, index: number): Column {
  const f = field.trim();
  const m = /^(.*?)\s*[[(]\s*([^\])]*?)\s*[\])]\s*$/.exec(f);
  // A bracketed suffix is a unit only if it holds a letter (or µ, °): "ax (2)" is a name, "ax (mg)" a unit.
  if (m && m[1] !== "" && /[\p{L}°]/u.test(m[2]!)) return { index, name: m[1]!, unitText: m[2] };
  const u = /^(.*?)_(ms|us|s)$/i.exec(f);
  if (u && TIME_NAMES.test(u[1]!)) return { index, name: f, unitText: u[2]!.toLowerCase() };
  return { index, name: f === "" ? `col${index + 1}` : f, unitText: undefined };
}

/** A line of the head: its text (no line end), 1-based number, and byte offsets of its start and past its LF. */
interface HeadLine {
  text: string;
  line: number;
  start: number;
  end: number;
}

/** Lines of the head, with their byte offsets and 1-based numbers; comments and blank lines skipped. */
function headLines(head: Buffer, wholeFile: boolean): HeadLine[] {
  const out: HeadLine[] = [];
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

/** A field that reads as a number, a non-finite token or a date-time stamp (either decimal mark). */
function dataField(f: string): boolean {
  return (
    /^\s*"?[+-]?(\d+[.,]?\d*|[.,]\d+)([eE][+-]?\d+)?"?\s*$/.test(f) ||
    nonFiniteToken(f.replace(/"/g, "")) !== undefined ||
    looksLikeDateTime(f.replace(/"/g, ""))
  );
}

/**
 * A row of the units a header's columns are in (`s,g,m/s^2` or `[s],[mV],[g]`); empty fields allowed.
 * Every field a unit psdgate knows (time, acceleration or voltage) or bracketed, as before; or, with
 * fields psdgate does not know, each of them shaped like a unit (a short token of letters, digits and
 * / ^ * · - . µ °, not a time column's name) and the row anchored as units: an acceleration or voltage
 * unit psdgate knows among its fields, or a time unit under a time column's name in the row `above`
 * (so `sec,ch1` under a preamble line stays a header). Then `ms,gee` under `time,accel` is a units row
 * whose `gee` the channel's conditioning refuses as UNIT_UNKNOWN (naming its line, column and text),
 * never a header whose data would be read as g.
 */
function unitsRow(fields: string[], above?: string[]): boolean {
  let known = false;
  let unknown = false;
  let anchored = false;
  for (let i = 0; i < fields.length; i++) {
    const f = fields[i]!.trim()
      .replace(/^"(.*)"$/, "$1")
      .trim();
    if (f === "") continue;
    const inner = /^[[(](.*)[\])]$/.exec(f);
    const u = inner ? inner[1]!.trim() : f;
    if (inner || parseUnitSpec(u) !== undefined || parseVoltUnit(u) !== undefined) {
      known = true;
      anchored = true;
    } else if (TIME_UNITS[u.toLowerCase()] !== undefined) {
      known = true;
      if (
        above !== undefined &&
        TIME_NAMES.test(
          (above[i] ?? "")
            .trim()
            .replace(/^"(.*)"$/, "$1")
            .trim(),
        )
      )
        anchored = true;
    } else if (!UNIT_SHAPED.test(u) || TIME_NAMES.test(u)) return false;
    else unknown = true;
  }
  return known && (!unknown || anchored);
}

/**
 * A token that could be a unit nobody taught psdgate (`gee`, `m/s²`, `counts`): no spaces, at most 16 characters, not a
 * number.
 */
const UNIT_SHAPED = /^[A-Za-zµμ°%][A-Za-z0-9µμ°%/^*·.²³-]{0,15}$/;

/**
 * Whether a split row is a row of samples: >= 2 fields, all data (an empty last field allowed: a trailing delimiter).
 */
function sampleRow(row: string[]): boolean {
  if (row.length < 2) return false;
  for (let c = 0; c < row.length; c++)
    if (!(dataField(row[c]!) || (c === row.length - 1 && c >= 2 && row[c]!.trim() === ""))) return false;
  return true;
}

interface DataStart {
  k: number;
  consistent: boolean;
  trailing: boolean;
}

/**
 * Where the data begins when the rows are split on one delimiter: the first row of samples (k, or -1
 * when there is none). `consistent` says whether every sniffed row after it is one too, with the same
 * number of fields; `trailing` whether it ends with an empty field. Rows before k are the
 * header, a units row and a preamble.
 */
function dataStart(rows: string[][]): DataStart {
  const k = rows.findIndex(sampleRow);
  if (k < 0) return { k, consistent: false, trailing: false };
  const count = rows[k]!.length;
  let consistent = true;
  for (let r = k; r < rows.length && consistent; r++) consistent = rows[r]!.length === count && sampleRow(rows[r]!);
  // A trailing delimiter: the first row of samples ends with an empty field (a later row with a value
  // there is named by the body pass as a row with too many fields).
  return { k, consistent, trailing: rows[k]![count - 1]!.trim() === "" };
}

/** The head's bytes refused before its lines are read: empty, UTF-16, binary, CR-only line ends, no LF in the head. */
function checkHeadBytes(file: string, head: Buffer, wholeFile: boolean): void {
  if (head.length === 0)
    throw new InputError("CSV_EMPTY", { file, expected: "a CSV time history", received: "an empty file" });
  if ((head[0] === 0xff && head[1] === 0xfe) || (head[0] === 0xfe && head[1] === 0xff)) {
    throw new InputError("CSV_ENCODING", {
      file,
      line: 1,
      expected: "UTF-8 or ASCII text",
      received: "UTF-16 (byte-order mark)",
      hint: "re-save the export as UTF-8",
    });
  }
  const nul = head.indexOf(0);
  if (nul >= 0) {
    const line = head.subarray(0, nul).toString("latin1").split("\n").length;
    throw new InputError("CSV_BINARY", {
      file,
      line,
      expected: "text",
      received: "binary data (a NUL byte)",
      hint: "is this really a CSV file?",
    });
  }
  if (head.indexOf(10) < 0) {
    // No line feed in the head: CR-only line ends (classic Mac), or a first line longer than the head.
    const cr = head.indexOf(13);
    if (cr >= 0 && cr < head.length - 1) {
      throw new InputError("CSV_LINE_ENDS", {
        file,
        line: 1,
        expected: "LF or CRLF line ends",
        received: "CR-only line ends",
        hint: "convert the line ends to LF (e.g. tr '\\r' '\\n')",
      });
    }
    if (!wholeFile)
      throw new InputError("CSV_LINE_TOO_LONG", {
        file,
        line: 1,
        expected: `a first line within the first ${HEAD_BYTES >> 10} KB`,
        received: "a longer line",
      });
  }
}

/** The head's first 256 lines of content; refused when there are none, or the first is too long. */
function sniffedLines(file: string, head: Buffer, wholeFile: boolean): HeadLine[] {
  const lines = headLines(head, wholeFile).slice(0, 256);
  if (lines.length === 0)
    throw new InputError("CSV_NO_DATA", {
      file,
      expected: "rows of samples",
      received: "only comments or blank lines",
    });
  const first = lines[0]!;
  if (first.end - first.start > MAX_LINE_BYTES || (!wholeFile && lines.length < 2 && head.indexOf(10) < 0)) {
    throw new InputError("CSV_LINE_TOO_LONG", {
      file,
      line: first.line,
      expected: `lines shorter than ${MAX_LINE_BYTES} bytes`,
      received: "a longer line",
    });
  }
  return lines;
}

/**
 * A spreadsheet's `sep=;` first line names the delimiter; an option given by the user still wins.
 * Returns the delimiter so far, the sep= line's number, and the lines after it.
 */
function readSepLine(
  file: string,
  lines: HeadLine[],
  given: Delimiter | undefined,
): { delimiter: Delimiter | undefined; sepLine: number | undefined; lines: HeadLine[] } {
  const first = lines[0]!;
  const sep = /^\s*"?sep=(.)"?\s*$/i.exec(first.text);
  if (!sep) return { delimiter: given, sepLine: undefined, lines };
  const d = sep[1] === "\t" ? "\t" : sep[1];
  if (d !== "," && d !== ";" && d !== "\t")
    throw new InputError("CSV_SEP_LINE", {
      file,
      line: first.line,
      expected: "sep=, sep=; or sep=<tab>",
      received: quoted(first.text.trim()),
    });
  const rest = lines.slice(1);
  if (rest.length === 0)
    throw new InputError("CSV_NO_DATA", { file, expected: "rows of samples", received: "a sep= line only" });
  return { delimiter: given ?? d, sepLine: first.line, lines: rest };
}

/**
 * The delimiter (the one given, else found) and where the data begins under it. A candidate must split the
 * data rows at the end of the head into the same number (>= 2) of fields that read as numbers (either decimal
 * mark) or date-time stamps: mixed space/tab alignment splits consistently on tabs but gives fields like
 * "0.00   1.5", so it falls through to whitespace.
 */
function chooseDelimiter(lines: HeadLine[], given: Delimiter | undefined): { delimiter: Delimiter; found: DataStart } {
  if (given !== undefined) return { delimiter: given, found: dataStart(lines.map((l) => splitRow(l.text, given))) };
  // The first delimiter (in this order) under which all rows after the first row of samples agree;
  // failing that (a bad cell in the head), the first that finds a row of samples at all.
  const order = ["\t", ";", ",", "whitespace"] as const;
  const tries = order.map((d) => dataStart(lines.map((l) => splitRow(l.text, d))));
  let i = tries.findIndex((f) => f.k >= 0 && f.consistent);
  if (i < 0) i = tries.findIndex((f) => f.k >= 0);
  return {
    delimiter: i >= 0 ? order[i]! : ",",
    found: i >= 0 ? tries[i]! : { k: -1, consistent: false, trailing: false },
  };
}

/** The rows before the data, as sniff reads them: where the data begins, header and units row, columns. */
interface HeadRows {
  /** Index of the first row of samples. */
  k: number;
  header: string[] | undefined;
  headerIndex: number;
  units: string[] | undefined;
  unitIndex: number;
  columns: number;
  trailing: boolean;
}

/**
 * Rows before the data: a header (the row just before), a units row under it, and a preamble. The header
 * sets the number of columns; a row of samples with another count is named by the body pass.
 */
function headRows(rows: string[][], found: DataStart): HeadRows {
  let k = found.k;
  let trailing = found.trailing;
  if (k < 0) {
    // No data rows in the head: the first row is a header (if it is not numbers), and what follows is checked by the
    // body pass.
    k = rows[0]!.every(dataField) ? 0 : 1;
  }
  const count = rows[Math.min(k, rows.length - 1)]!.length;
  let header: string[] | undefined;
  let headerIndex = -1;
  let units: string[] | undefined;
  let unitIndex = -1;
  if (k > 0) {
    const fits = (r: string[]) => r.length === count || (trailing && r.length === count - 1);
    if (
      k >= 2 &&
      unitsRow(rows[k - 1]!, rows[k - 2]!) &&
      fits(rows[k - 1]!) &&
      fits(rows[k - 2]!) &&
      !unitsRow(rows[k - 2]!)
    ) {
      units = rows[k - 1];
      unitIndex = k - 1;
      headerIndex = k - 2;
    } else headerIndex = k - 1;
    header = rows[headerIndex];
  }
  let columns = trailing ? count - 1 : count;
  if (header && header.length !== columns && !(trailing && header.length === count)) {
    columns = header.length;
    trailing = false;
  }
  if (header) header = header.slice(0, columns);
  if (units) units = units.slice(0, columns);
  return { k, header, headerIndex, units, unitIndex, columns, trailing };
}

/**
 * The decimal mark: the one given (a comma not with a comma delimiter), else a comma when the body's fields
 * (the rows from the first row of samples, `line`) hold numbers with decimal commas and none with points.
 */
function chooseDecimal(
  file: string,
  given: "." | "," | undefined,
  delimiter: Delimiter,
  bodyRows: string[][],
  line: number | undefined,
): "." | "," {
  if (given === ",") {
    if (delimiter === ",") {
      throw new InputError("OPTION_CONFLICT", {
        option: "csv.decimal",
        expected: "a delimiter other than ',' with decimal commas",
        received: "comma as both",
        hint: 'add `csv.delimiter: ";"`',
      });
    }
    return given;
  }
  if (given !== undefined) return given;
  const body = bodyRows.flat();
  const commaNum = body.some((f) => /^[+-]?\d*,\d+([eE][+-]?\d+)?$/.test(f));
  const pointNum = body.some((f) => /^[+-]?\d*\.\d+([eE][+-]?\d+)?$/.test(f));
  if (!commaNum || delimiter === ",") return ".";
  if (pointNum) {
    throw new InputError("CSV_DECIMAL_AMBIGUOUS", {
      file,
      line,
      expected: "one decimal mark throughout",
      received: "both '.' and ',' in numbers",
      hint: 'declare it with `csv.decimal: "."` or `csv.decimal: ","`',
    });
  }
  return ",";
}

/** The first row of samples' line; refused when the head has none (`first` is the head's first line). */
function firstBodyLine(
  file: string,
  head: Buffer,
  wholeFile: boolean,
  body: HeadLine | undefined,
  first: HeadLine,
): HeadLine {
  if (body === undefined && !wholeFile) {
    // More follows, but no whole row within the head: the line after the header is too long to sniff.
    const line = head.toString("latin1").split("\n").length;
    throw new InputError("CSV_LINE_TOO_LONG", {
      file,
      line,
      expected: `a first row of samples within the first ${HEAD_BYTES >> 10} KB`,
      received: "a longer line",
    });
  }
  if (body === undefined) {
    throw new InputError("CSV_NO_DATA", {
      file,
      line: first.line,
      expected: "rows of samples after the header",
      received: "a header only",
    });
  }
  return body;
}

/** The dialect of a delimited-text head: delimiter, decimal mark, header, units row, preamble, first body row. */
function sniff(file: string, head: Buffer, wholeFile: boolean, opts: CsvReadOptions): Dialect {
  checkHeadBytes(file, head, wholeFile);
  const all = sniffedLines(file, head, wholeFile);
  const sep = readSepLine(file, all, opts.delimiter);
  const lines = sep.lines;
  const { delimiter, found } = chooseDelimiter(lines, sep.delimiter);
  const rows = lines.map((l) => splitRow(l.text, delimiter).map((f) => f.trim()));
  const h = headRows(rows, found);
  const preamble = lines.slice(0, Math.max(0, h.headerIndex)).map((l) => l.text.trim());
  const decimal = chooseDecimal(file, opts.decimal, delimiter, rows.slice(h.k), lines[h.k]?.line);
  const body = firstBodyLine(file, head, wholeFile, lines[h.k], all[0]!);
  return {
    delimiter,
    decimal,
    header: h.header,
    columns: h.columns,
    trailingEmpty: h.trailing,
    bodyStart: body.start,
    bodyLine: body.line,
    headerLine: h.headerIndex >= 0 ? lines[h.headerIndex]!.line : undefined,
    units: h.units,
    unitLine: h.unitIndex >= 0 ? lines[h.unitIndex]!.line : undefined,
    preamble,
    preambleLines: preamble.length,
    sepLine: sep.sepLine,
    firstRow: rows[h.k]!,
  };
}

export async function openCsvTimeHistory(file: string, opts: CsvReadOptions = {}): Promise<TimeHistorySource> {
  const { size } = await stat(file);
  // A large file's body is read on a worker thread. It starts now (or started before the program loaded,
  // csvWorkerStart.ts), so that its start-up overlaps the sniffing here, and waits for its job.
  const worker =
    (opts.parseWorkers ?? (parseOnWorker(size) ? 1 : 0)) > 0 && workerBuilt() ? takeBodyWorker() : undefined;
  try {
    return await openSniffed(file, size, opts, worker);
  } catch (e) {
    await worker?.thread.terminate();
    throw e;
  }
}

/** The first HEAD_BYTES of the file (the whole of a smaller one). */
async function readHead(file: string, size: number): Promise<Buffer> {
  const fh = await open(file, "r");
  try {
    const buf = Buffer.alloc(Math.min(HEAD_BYTES, size));
    const { bytesRead } = await fh.read(buf, 0, buf.length, 0);
    return buf.subarray(0, bytesRead);
  } finally {
    await fh.close();
  }
}

/**
 * The columns: names and units from the header (`ch1`, `ch2`, … without one), and each non-empty field of a
 * units row under it as its column's unit (agreeing with the header's); the names distinct.
 */
function readColumns(file: string, dialect: Dialect): Column[] {
  // Names and units in bytes that are not UTF-8 (a Latin-1 or Windows-1252 export: "accél", "m/s²") were decoded
  // with a replacement character; a preamble line is left alone (it is not read).
  for (const [row, line] of [
    [dialect.header, dialect.headerLine],
    [dialect.units, dialect.unitLine],
  ] as const) {
    if (row?.some((f) => f.includes("\uFFFD")))
      throw new InputError("CSV_ENCODING", {
        file,
        line,
        expected: "UTF-8 or ASCII text in the header and units row",
        received: "bytes that are not UTF-8 (Latin-1 or Windows-1252?)",
        hint: "re-save the export as UTF-8",
      });
  }
  const columns: Column[] = [];
  for (let i = 0; i < dialect.columns; i++)
    columns.push(
      dialect.header ? splitNameUnit(dialect.header[i]!, i) : { index: i, name: `ch${i + 1}`, unitText: undefined },
    );
  if (dialect.units) {
    // A units row under the header: each non-empty field is its column's unit.
    for (const c of columns) {
      const raw = (dialect.units[c.index] ?? "").replace(/^"(.*)"$/, "$1").trim();
      const u = raw.replace(/^[[(](.*)[\])]$/, "$1").trim();
      if (u === "") continue;
      if (c.unitText !== undefined && c.unitText !== u) {
        throw new InputError("UNIT_CONFLICT", {
          file,
          line: dialect.unitLine,
          column: c.index + 1,
          field: c.name,
          expected: `the units row to agree with the header's unit ${quoted(c.unitText)}`,
          received: quoted(u),
        });
      }
      c.unitText = u;
    }
  }
  if (dialect.header) {
    const seen = new Map<string, number>();
    for (const c of columns) {
      if (seen.has(c.name.toLowerCase())) {
        throw new InputError("CSV_DUPLICATE_COLUMN", {
          file,
          line: dialect.headerLine,
          column: c.index + 1,
          expected: "distinct column names",
          received: quoted(c.name),
        });
      }
      seen.set(c.name.toLowerCase(), c.index);
    }
  }
  return columns;
}

/** The time column as the head and the options give it. */
interface TimeColumnChoice {
  /** Index of the time column used, or -1. */
  timeIndex: number;
  /** Index of a time column found and left unused, as asked (`csv.timeColumn: false`), or -1. */
  ignoredTime: number;
  /** The time column (used or not) holds date-time stamps. */
  dateTime: boolean;
  /** Seconds a unit of the time column's numbers. */
  timeFactor: number;
  /** Whether the time unit is said (header, units row, `csv.timeUnit`), or the column holds date-time stamps. */
  timeUnitDeclared: boolean;
}

/**
 * Time column: named by the option, else by its header, else the first column of date-time stamps.
 * With --no-time-column it is still found, and left out of the channels (neither time nor a channel).
 */
function findTimeColumn(
  file: string,
  opts: CsvReadOptions,
  dialect: Dialect,
  columns: Column[],
): Pick<TimeColumnChoice, "timeIndex" | "ignoredTime" | "dateTime"> {
  let timeIndex = -1;
  if (opts.timeColumn !== undefined && opts.timeColumn !== false) {
    const tc = opts.timeColumn;
    timeIndex = typeof tc === "number" ? tc - 1 : columns.findIndex((c) => c.name.toLowerCase() === tc.toLowerCase());
    if (timeIndex < 0 || timeIndex >= columns.length) {
      throw new InputError("TIME_COLUMN_NOT_FOUND", {
        file,
        option: "csv.timeColumn",
        expected: `one of ${columns.map((c) => quoted(c.name)).join(", ")} or 1..${columns.length}`,
        received: quoted(String(tc)),
      });
    }
  } else {
    // A name with its unit as a suffix (`timestamp_ms`, `elapsed_s`) is a time name too.
    if (dialect.header)
      timeIndex = columns.findIndex(
        (c) =>
          TIME_NAMES.test(c.name) || (c.unitText !== undefined && TIME_NAMES.test(c.name.replace(/_(ms|us|s)$/i, ""))),
      );
    if (timeIndex < 0)
      timeIndex = dialect.firstRow.slice(0, columns.length).findIndex((f) => looksLikeDateTime(f.replace(/"/g, "")));
  }
  const dateTime = timeIndex >= 0 && looksLikeDateTime((dialect.firstRow[timeIndex] ?? "").replace(/"/g, ""));
  if (opts.timeColumn === false && timeIndex >= 0) return { timeIndex: -1, ignoredTime: timeIndex, dateTime };
  return { timeIndex, ignoredTime: -1, dateTime };
}

/**
 * The unit of the time column used (`column`, undefined for none) in seconds: from its header or units row
 * (`unitLine`), or from `csv.timeUnit`, which must agree with it; none for date-time stamps.
 */
function timeColumnUnit(
  file: string,
  opts: CsvReadOptions,
  column: Column | undefined,
  dateTime: boolean,
  unitLine: number,
): Pick<TimeColumnChoice, "timeFactor" | "timeUnitDeclared"> {
  let timeFactor = 1;
  let timeUnitDeclared = dateTime;
  if (column === undefined) return { timeFactor, timeUnitDeclared };
  if (dateTime) {
    if (opts.timeUnit !== undefined) {
      throw new InputError("OPTION_CONFLICT", {
        file,
        option: "csv.timeUnit",
        field: column.name,
        expected: "no time unit for a column of date-time stamps",
        received: opts.timeUnit,
      });
    }
    return { timeFactor, timeUnitDeclared };
  }
  const u = column.unitText;
  if (u !== undefined) {
    const f = TIME_UNITS[u.toLowerCase()];
    if (f === undefined) {
      throw new InputError("CSV_TIME_UNIT", {
        file,
        line: unitLine,
        column: column.index + 1,
        expected: "a time unit (s, ms, us)",
        received: quoted(u),
      });
    }
    timeFactor = f;
    timeUnitDeclared = true;
  }
  if (opts.timeUnit !== undefined) {
    const f = TIME_UNITS[opts.timeUnit === "serial-days" ? "days" : opts.timeUnit]!;
    if (timeUnitDeclared && f !== timeFactor) {
      throw new InputError("OPTION_CONFLICT", {
        file,
        option: "csv.timeUnit",
        field: column.name,
        expected: `the header's time unit ${quoted(u!)}`,
        received: opts.timeUnit,
        hint: "drop `csv.timeUnit` (the header already says), or fix the header",
      });
    }
    timeFactor = f;
    timeUnitDeclared = true;
  }
  return { timeFactor, timeUnitDeclared };
}

/** The time column, its stamps' kind and its unit (errors in that order); then a rate must be known. */
function chooseTimeColumn(
  file: string,
  opts: CsvReadOptions,
  dialect: Dialect,
  columns: Column[],
  unitLine: number,
): TimeColumnChoice {
  const found = findTimeColumn(file, opts, dialect, columns);
  const column = found.timeIndex >= 0 ? columns[found.timeIndex] : undefined;
  const time = { ...found, ...timeColumnUnit(file, opts, column, found.dateTime, unitLine) };
  if (time.timeIndex < 0 && opts.sampleRateHz === undefined) {
    throw new InputError("CSV_NO_RATE", {
      file,
      expected: "a time column (header 'time', 't', 'time [ms]', …) or a sample rate",
      received: dialect.header ? `columns ${dialect.header.map((h) => quoted(h)).join(", ")}` : "no header",
      hint:
        opts.timeColumn === false
          ? "give `csv.sampleRateHz: HZ` with `csv.timeColumn: false`"
          : "give `csv.sampleRateHz: HZ`, or `csv.timeColumn: NAME`",
    });
  }
  return time;
}

/**
 * The channels: every column but the time column (`skip`, used or left unused), with the units their
 * headers or the units row (`unitLine`) declare.
 */
function channelColumns(
  file: string,
  columns: Column[],
  skip: number,
  unitLine: number,
): { channelCols: Column[]; channels: ChannelInfo[] } {
  const channelCols = columns.filter((c) => c.index !== skip);
  if (channelCols.length === 0)
    throw new InputError("CSV_NO_CHANNELS", {
      file,
      expected: "at least one data column besides time",
      received: "only a time column",
    });
  const channels: ChannelInfo[] = channelCols.map((c) => {
    if (c.unitText === undefined) return { name: c.name };
    const spec = parseUnitSpec(c.unitText);
    return {
      name: c.name,
      declaredUnit: spec?.base,
      declaredUnitSpec: spec,
      declaredVolts: spec ? undefined : parseVoltUnit(c.unitText),
      declaredUnitText: c.unitText,
      unitPlace: { line: unitLine, column: c.index + 1 },
    };
  });
  return { channelCols, channels };
}

/**
 * Provisional rate from the sniffed rows (NaN without two finite stamps); the final one comes from the whole
 * time column. It is snapped by the rule the whole column's rate follows (read/roundRate.ts), on the head's
 * stamps and their printed resolution, so the segment chosen for a resolution is the one the final rate gives.
 * Date-time stamps (`baseDays` defined) count seconds from that day; numbers are in units of `timeFactor` s.
 */
function headRate(
  head: Buffer,
  wholeFile: boolean,
  dialect: Dialect,
  timeIndex: number,
  baseDays: number | undefined,
  timeFactor: number,
): number {
  let minPlace = 99;
  let maxSig = 0;
  const times = headLines(head, wholeFile)
    .filter((l) => l.start >= dialect.bodyStart)
    .map((l) => {
      const f = (splitRow(l.text, dialect.delimiter)[timeIndex] ?? "").replace(/"/g, "").trim();
      if (baseDays !== undefined) {
        const scan = parseDateTimeText(f, baseDays);
        if (scan) minPlace = Math.min(minPlace, -scan.fractionDigits);
        return scan?.value ?? NaN;
      }
      const v = parseNumberText(f, dialect.decimal) * timeFactor;
      if (Number.isFinite(v)) {
        const r = numberTextResolution(dialect.decimal === "," ? f.replace(",", ".") : f);
        minPlace = Math.min(minPlace, r.place);
        if (r.mant > 0) maxSig = Math.max(maxSig, Math.floor(Math.log10(r.mant)) + 1);
      }
      return v;
    })
    .filter((t) => Number.isFinite(t));
  if (times.length < 2) return NaN;
  const t0 = times[0]!;
  const t1 = times[times.length - 1]!;
  const estimate = (times.length - 1) / (t1 - t0);
  const k = baseDays !== undefined ? 1 : timeFactor;
  const quantum = stampQuantum(minPlace, maxSig, Math.max(Math.abs(t0), Math.abs(t1)) / k) * k;
  return roundRate(estimate, (estimate * quantum) / (t1 - t0));
}

/** The layout line of the report: delimiter, decimal mark, header and units rows, time column, preamble. */
function layoutText(dialect: Dialect, columns: Column[], time: TimeColumnChoice): string {
  const { timeIndex, ignoredTime, dateTime } = time;
  const delimName =
    dialect.delimiter === "\t" ? "tab" : dialect.delimiter === "whitespace" ? "whitespace" : `'${dialect.delimiter}'`;
  return (
    `delimited text, ${delimName} delimiter${dialect.sepLine !== undefined ? " (from its sep= line)" : ""}, decimal '${dialect.decimal}', ${dialect.header ? "header row" : "no header"}${dialect.units ? " and units row" : ""}` +
    `${timeIndex >= 0 ? `, time column ${quoted(columns[timeIndex]!.name)}${dateTime ? " (date-time stamps)" : ""}` : ignoredTime >= 0 ? `, time column ${quoted(columns[ignoredTime]!.name)} not used, as asked` : ""}` +
    `${dialect.trailingEmpty ? ", empty last column ignored" : ""}${dialect.preambleLines > 0 ? `, ${dialect.preambleLines} preamble line${dialect.preambleLines > 1 ? "s" : ""} before the header kept as metadata` : ""}`
  );
}

/** What the report says of the dialect (RecordingInfo.dialect). */
function dialectInfo(dialect: Dialect, columns: Column[], time: TimeColumnChoice, opts: CsvReadOptions): CsvDialect {
  const { timeIndex, ignoredTime, dateTime, timeFactor } = time;
  return {
    delimiter: dialect.delimiter,
    decimal: dialect.decimal,
    header: dialect.header !== undefined,
    unitsRow: dialect.units !== undefined,
    preambleLines: dialect.preambleLines,
    timeColumn: timeIndex >= 0 ? columns[timeIndex]!.name : null,
    ignoredTimeColumn: ignoredTime >= 0 ? columns[ignoredTime]!.name : null,
    timeUnitS: timeIndex >= 0 && !dateTime ? timeFactor : null,
    dateTimeStamps: dateTime && timeIndex >= 0,
    rateFrom: opts.sampleRateHz !== undefined ? "given" : "time column",
    trailingEmptyColumn: dialect.trailingEmpty === true,
  };
}

/** A CSV source from its sniffed head: what it holds (info), and a read of its body (on `worker`, if given, once). */
async function openSniffed(
  file: string,
  size: number,
  opts: CsvReadOptions,
  worker: BodyWorker | undefined,
): Promise<TimeHistorySource> {
  const head = await readHead(file, size);
  const dialect = sniff(file, head, head.length >= size, opts);
  const columns = readColumns(file, dialect);
  const unitLine = dialect.unitLine ?? dialect.headerLine ?? 1;
  const time = chooseTimeColumn(file, opts, dialect, columns, unitLine);
  const { timeIndex, ignoredTime, dateTime, timeFactor, timeUnitDeclared } = time;
  const { channelCols, channels } = channelColumns(file, columns, timeIndex >= 0 ? timeIndex : ignoredTime, unitLine);

  // Date-time stamps count seconds from the first stamp's day.
  const firstScan =
    dateTime && timeIndex >= 0 ? parseDateTimeText(dialect.firstRow[timeIndex]!.replace(/"/g, "")) : undefined;
  const baseDays = firstScan?.days;
  const columnRate =
    timeIndex >= 0 ? headRate(head, head.length >= size, dialect, timeIndex, baseDays, timeFactor) : NaN;
  const timeCol: TimeColumnInfo | undefined =
    timeIndex >= 0
      ? {
          file,
          line: dialect.bodyLine,
          column: timeIndex + 1,
          name: columns[timeIndex]!.name,
          unitDeclared: timeUnitDeclared,
        }
      : undefined;
  if (timeCol && Number.isFinite(columnRate)) {
    // Early, on the head's rows: a gross disagreement or an implausible rate is said before the whole file is read.
    if (opts.sampleRateHz !== undefined && Math.abs(columnRate - opts.sampleRateHz) > 0.05 * opts.sampleRateHz)
      throw rateConflict(timeCol, opts.sampleRateHz, columnRate);
    if (opts.sampleRateHz === undefined && !timeUnitDeclared && columnRate < MIN_PLAUSIBLE_RATE_HZ)
      throw implausibleRate(timeCol, columnRate);
  }
  const provisionalRate = opts.sampleRateHz ?? columnRate;

  return {
    info: {
      file,
      format: "csv",
      sampleRateHz: provisionalRate,
      channels,
      bytes: size,
      layout: layoutText(dialect, columns, time),
      preamble: dialect.preamble.length > 0 ? dialect.preamble : undefined,
      firstStamp: firstScan
        ? { baseDays: firstScan.days, seconds: firstScan.value, zoned: firstScan.zone !== 0 }
        : undefined,
      dialect: dialectInfo(dialect, columns, time, opts),
    },
    read: (select, sink, onProgress) => {
      // The worker serves one read; a later read of the same source parses here.
      const w = worker;
      worker = undefined;
      const job: CsvBodyJob = {
        file,
        columns: dialect.columns,
        columnNames: columns.map((c) => c.name),
        delimiter: dialect.delimiter,
        decimal: dialect.decimal,
        timeIndex,
        selectColumns: select.map((s) => channelCols[s]!.index),
        bodyStart: dialect.bodyStart,
        bodyLine: dialect.bodyLine,
        timeFactor,
        rateOverride: opts.sampleRateHz,
        timeDateTime: baseDays !== undefined ? { baseDays } : undefined,
        ignoreColumns: ignoredTime >= 0 && dateTime ? [ignoredTime] : undefined,
        trailingEmpty: dialect.trailingEmpty,
        timeColumn: timeCol,
        serialDays: opts.timeUnit === "serial-days" && timeIndex >= 0 && !dateTime,
      };
      return readBody(job, sink, onProgress, w);
    },
    close: async () => {
      const w = worker;
      worker = undefined;
      await w?.thread.terminate();
    },
  };
}

async function readBody(
  job: CsvBodyJob,
  sink: BlockSink,
  onProgress: ((bytes: number) => void) | undefined,
  bodyWorker: BodyWorker | undefined,
): Promise<ReadSummary> {
  if (!bodyWorker) {
    const pool = columnPool();
    return csvBodyPass(
      job,
      (piece, bytes) => {
        if (piece.rows > 0) sink(piece.channels, piece.rows);
        pool.give(pieceBuffers(piece));
        onProgress?.(bytes);
      },
      pool,
    );
  }
  const worker = bodyWorker.thread;
  worker.ref();
  worker.postMessage({ job });
  // The worker reads into shared buffers; when its parse is the longer job, this thread hashes their new
  // bytes (csvParseWorker.ts), and the worker's summary comes without a SHA-256.
  const hash = createHash("sha256");
  let shared: Uint8Array[] = [];
  let busy: Int32Array<ArrayBufferLike> = new Int32Array(0);
  try {
    const summary = await new Promise<ReadSummary>((resolve, reject) => {
      void bodyWorker.ended.then(reject);
      worker.on("message", (m: WorkerReply) => {
        if ("buffers" in m) {
          shared = m.buffers.map((b) => new Uint8Array(b));
          busy = new Int32Array(m.busy);
          return;
        }
        if ("hash" in m) {
          if (m.head) hash.update(m.head);
          const r = m.hash;
          for (let k = 0; k < r.length; k += 3) {
            hash.update(shared[r[k]!]!.subarray(r[k + 1], r[k + 2]));
            Atomics.store(busy, r[k]!, 0);
            Atomics.notify(busy, r[k]!);
          }
          if (m.piece === undefined) return;
          try {
            if (m.piece.rows > 0) sink(m.piece.channels, m.piece.rows);
            onProgress?.(m.bytes!);
          } catch (e) {
            reject(e);
            return;
          }
          // The sink has consumed the columns: their memory goes back to the worker.
          const bufs = pieceBuffers(m.piece);
          worker.postMessage({ recycle: bufs }, bufs);
        } else if ("done" in m) resolve(m.done.sha256 !== "" ? m.done : { ...m.done, sha256: hash.digest("hex") });
        else reject(errorFromWire(m.error));
      });
    });
    // A pass that ended leaves the thread idle: it ends on its own (threadEnd.ts), without holding the
    // process up. A pass that failed (or was cut short here because the sink threw) is terminated.
    await retireThread(worker, { wait: false });
    return summary;
  } catch (e) {
    await worker.terminate();
    throw e;
  }
}

type WorkerReply =
  | { buffers: SharedArrayBuffer[]; busy: SharedArrayBuffer }
  /**
   * Ranges of new bytes in the shared buffers (buffer, start, end, ...) to hash first, with the bytes
   * before the body ahead of them in the first message; then a piece's columns, when there is one.
   */
  | { hash: number[]; head?: Uint8Array; piece?: CsvPiece; bytes?: number }
  | { done: ReadSummary }
  | { error: WireError };
