import { createRequire } from "node:module";
import type Papa from "papaparse";
import { InputError, quoted, type ErrorCode } from "../errors.js";
import {
  nonFiniteToken,
  numberTextResolution,
  parseNumberText,
  POW10,
  scanNumber,
  type ScanState,
} from "./csvNumber.js";
import { parseDateTimeText, scanDateTime, type DateTimeScan } from "./dateTimeStamp.js";

/**
 * The body of a delimited-text time history, parsed piece by piece. A piece is a run of whole lines;
 * the parser turns it into one column per selected channel (plus the time column), with the line of
 * every row relative to the piece's first line, so it can run in a worker thread and still name exact
 * lines in its errors. Plain numeric fields take the byte-level fast path; a line it does not
 * understand (quotes, text) goes to papaparse and the text parser, which reads it or says why not.
 */
export type Delimiter = "," | ";" | "\t" | "whitespace";

/** Everything the parser needs; plain data, so it can be posted to a worker. */
export interface CsvBodySpec {
  file: string;
  columns: number;
  columnNames: string[];
  delimiter: Delimiter;
  decimal: "." | ",";
  /** Index of the time column, or -1. */
  timeIndex: number;
  /** File columns of the selected channels, in output order. */
  selectColumns: number[];
  /** The time column holds date-time stamps (dateTimeStamp.ts), counted in seconds from this day. */
  timeDateTime?: { baseDays: number } | undefined;
  /** Columns that are not read at all (a date-time column under --no-time-column). */
  ignoreColumns?: number[] | undefined;
  /** Every row ends with one more delimiter (an empty last column, not counted in `columns`). */
  trailingEmpty?: boolean | undefined;
}

export interface CsvPiece {
  rows: number;
  /** Lines in the piece (rows, blank lines and comments). */
  lines: number;
  channels: Float64Array[];
  /** Raw time column values (file units), when there is one. */
  time: Float64Array | undefined;
  /** Line of each row relative to the piece's first line; undefined when row i is line i. */
  rowLines: Uint32Array | undefined;
  /**
   * Resolution of the printed time stamps: the smallest decimal place of a last digit (-3 for
   * "1.234", -5 for "1.000020E+01"; 99 without stamps), and the largest mantissa as an integer
   * (1000020 for "1.000020E+01"), whose digit count is the stamps' significant digits.
   */
  timeMinPlace: number;
  timeMaxMant: number;
}

export const MAX_LINE_BYTES = 1 << 20;

/**
 * A pool of column buffers: `alloc(n)` hands out a Float64Array of n values, reusing a buffer given
 * back through `give` when one is large enough (the parser's columns come and go once per piece).
 */
export function columnPool(): { alloc: (n: number) => Float64Array; give: (buffers: ArrayBuffer[]) => void } {
  const spare: ArrayBuffer[] = [];
  return {
    alloc: (n) => {
      const i = spare.findIndex((b) => b.byteLength >= n * 8);
      return i >= 0 ? new Float64Array(spare.splice(i, 1)[0]!, 0, n) : new Float64Array(n);
    },
    give: (buffers) => void spare.push(...buffers),
  };
}

/** The buffers behind a piece's columns, to give back to a pool. */
export function pieceBuffers(piece: CsvPiece): ArrayBuffer[] {
  return [...piece.channels, ...(piece.time ? [piece.time] : [])].map((c) => c.buffer as ArrayBuffer);
}

// papaparse is loaded on the first quoted row: most logger files have none, and the parse worker
// starts about 12 ms sooner without it.
const require = createRequire(import.meta.url);
let papa: typeof Papa | undefined;
function papaparse(): typeof Papa {
  return (papa ??= require("papaparse") as typeof Papa);
}

export function splitRow(text: string, delimiter: Delimiter): string[] {
  if (delimiter === "whitespace") return text.trim().split(/\s+/);
  if (!text.includes('"')) return text.split(delimiter);
  const r = papaparse().parse<string[]>(text, { delimiter, header: false });
  return r.data[0] ?? [""];
}

/** `longer` with `a` copied to its start (a column grown). */
function lengthened<T extends Float64Array | Uint32Array>(a: T, longer: T): T {
  longer.set(a);
  return longer;
}

const SPACE = 32;
const TAB = 9;
const CR = 13;

export class CsvBodyParser {
  private readonly spec: CsvBodySpec;
  private readonly ncol: number;
  private readonly delimByte: number;
  private readonly decimalByte: number;
  /** Where each file column goes: -1 dropped, -2 time, else the output channel. */
  private readonly target: Int32Array;
  private readonly row: Float64Array;
  private readonly scan: ScanState = { end: 0, value: 0, fractionDigits: 0, place: 0, mant: 0 };
  private readonly dateScan: DateTimeScan = { end: -1, value: 0, fractionDigits: 0, zone: 0, days: 0 };
  private readonly plain: PlainRowsState = { end: 0, timeMinPlace: 99, timeMaxMant: 0, zoneMode: -1 };
  private readonly plainSpec: PlainRowsSpec;
  /** Whether the plain-row loop may run (not with ignored columns, or whitespace between fields). */
  private readonly plainOk: boolean;
  private readonly trailing: boolean;
  /** Zone state of the date-time stamps: -1 before the first, else 0 (none) or 1 (with a zone). */
  private zoneMode = -1;
  /** Whether the date-time stamps carried a zone (Z or an offset). */
  get zoned(): boolean {
    return this.zoneMode === 1;
  }
  /** The time field of the line parsed last: place of its last digit and its mantissa. */
  private rowPlace = 0;
  private rowMant = 0;

  constructor(spec: CsvBodySpec) {
    this.spec = spec;
    this.ncol = spec.columns;
    this.delimByte = spec.delimiter === "whitespace" ? -1 : spec.delimiter.charCodeAt(0);
    this.decimalByte = spec.decimal.charCodeAt(0);
    this.target = new Int32Array(this.ncol).fill(-1);
    spec.selectColumns.forEach((c, i) => (this.target[c] = i));
    if (spec.timeIndex >= 0) this.target[spec.timeIndex] = -2;
    for (const c of spec.ignoreColumns ?? []) this.target[c] = -3;
    this.row = new Float64Array(this.ncol);
    this.plainOk = this.delimByte >= 0 && (spec.ignoreColumns ?? []).length === 0;
    this.trailing = spec.trailingEmpty === true;
    this.plainSpec = {
      ncol: this.ncol,
      delim: this.delimByte,
      decimal: this.decimalByte,
      timeIndex: spec.timeIndex,
      stampBase: spec.timeDateTime?.baseDays ?? NaN,
      trailing: this.trailing,
    };
  }

  /**
   * Parse the lines of buf[s, e). The piece must end with a newline (buf[e - 1] is LF): the readers
   * add one after a last line that has none, so no scan can run past the piece. `firstLine` is the
   * line number of the first line (0 when it is not known: errors then carry a relative line).
   */
  parse(
    buf: Uint8Array,
    s: number,
    e: number,
    firstLine: number,
    alloc: (n: number) => Float64Array = (n) => new Float64Array(n),
  ): CsvPiece {
    if (e > s && buf[e - 1] !== 10) throw new RangeError("a CSV piece must end with a newline");
    // Room for rows of 4 bytes a field or more; a piece of shorter rows grows its columns.
    let cap = Math.max(16, Math.ceil((e - s) / (4 * this.ncol)));
    let channels = this.spec.selectColumns.map(() => alloc(cap));
    const hasTime = this.spec.timeIndex >= 0;
    let time = hasTime ? alloc(cap) : undefined;
    let rowLines: Uint32Array | undefined;
    let rows = 0;
    let line = 0;
    let minPlace = 99;
    let maxMant = 0;
    // Where each file column's values go in the plain-row loop: its output column, or a scratch column.
    let outs: Float64Array[] = [];
    const route = () => {
      let scratch: Float64Array | undefined;
      outs = Array.from(this.target, (t) =>
        t >= 0 ? channels[t]! : t === -2 ? time! : (scratch ??= new Float64Array(cap)),
      );
    };
    route();
    const grow = () => {
      const n = cap * 2;
      channels = channels.map((c) => lengthened(c, new Float64Array(n)));
      if (time) time = lengthened(time, new Float64Array(n));
      if (rowLines) rowLines = lengthened(rowLines, new Uint32Array(n));
      cap = n;
      route();
    };
    const plain = this.plain;
    let p = s;
    while (p < e) {
      if (this.plainOk) {
        // Plain rows (numbers and delimiters only) in one tight loop; it stops at anything else.
        plain.zoneMode = this.zoneMode;
        const n = plainRows(buf, p, e, outs, rows, cap, this.plainSpec, plain);
        this.zoneMode = plain.zoneMode;
        if (n > 0) {
          if (plain.timeMinPlace < minPlace) minPlace = plain.timeMinPlace;
          if (plain.timeMaxMant > maxMant) maxMant = plain.timeMaxMant;
          if (rowLines) for (let i = 0; i < n; i++) rowLines[rows + i] = line + i;
          rows += n;
          line += n;
          p = plain.end;
          if (p >= e) break;
        }
        if (rows === cap) {
          grow();
          continue;
        }
      }
      const got = this.parseLine(buf, p, e, firstLine + line);
      const next = this.next;
      if (next - p > MAX_LINE_BYTES)
        this.fail(
          "CSV_LINE_TOO_LONG",
          firstLine + line,
          undefined,
          `lines shorter than ${MAX_LINE_BYTES} bytes`,
          "a longer line",
        );
      if (got >= 0) {
        if (rows === cap) grow();
        const r = this.row;
        for (let c = 0; c < this.ncol; c++) {
          const t = this.target[c]!;
          if (t >= 0) channels[t]![rows] = r[c]!;
        }
        if (time) {
          time[rows] = r[this.spec.timeIndex]!;
          if (this.rowPlace < minPlace) minPlace = this.rowPlace;
          if (this.rowMant > maxMant) maxMant = this.rowMant;
        }
        if (rowLines) rowLines[rows] = line;
        else if (line !== rows) {
          rowLines = new Uint32Array(cap);
          for (let i = 0; i < rows; i++) rowLines[i] = i;
          rowLines[rows] = line;
        }
        rows++;
      }
      line++;
      p = next;
    }
    return {
      rows,
      lines: line,
      channels: channels.map((c) => c.subarray(0, rows)),
      time: time?.subarray(0, rows),
      rowLines: rowLines?.subarray(0, rows),
      timeMinPlace: minPlace,
      timeMaxMant: maxMant,
    };
  }

  private fail(
    code: ErrorCode,
    line: number,
    column: number | undefined,
    expected: string,
    received: string,
    hint?: string,
  ): never {
    throw new InputError(code, {
      file: this.spec.file,
      line,
      column,
      field: column !== undefined ? this.spec.columnNames[column - 1] : undefined,
      expected,
      received,
      hint,
    });
  }

  /** Index just after the line parsed last (after its newline, or the end). */
  private next = 0;

  /** End of the line starting at s: the index of its newline, or e. */
  private lineEnd(buf: Uint8Array, s: number, e: number): number {
    const nl = buf.indexOf(10, s);
    return nl < 0 || nl >= e ? e : nl;
  }

  /**
   * Parses the line starting at s into this.row and sets this.next past it. Returns 0 for a row
   * (the time field's resolution in rowPlace and rowMant), or -1 for a line without data. The fast
   * path finds the line's end while it scans; anything unusual goes to slowLine with the line's
   * exact extent.
   */
  private parseLine(buf: Uint8Array, s: number, e: number, line: number): number {
    let p = s;
    let c = buf[p]!;
    while (c === SPACE || c === TAB) c = buf[++p]!;
    if (c === 10 || c === 35 /* # */ || (c === CR && buf[p + 1] === 10)) {
      this.next = (c === 10 ? p : this.lineEnd(buf, p, e)) + 1;
      return -1;
    }
    const ncol = this.ncol;
    const delim = this.delimByte;
    const scan = this.scan;
    const ti = this.spec.timeIndex;
    const dt = this.spec.timeDateTime;
    for (let col = 0; col < ncol; col++) {
      c = buf[p]!;
      while (c === SPACE || (delim < 0 && c === TAB)) c = buf[++p]!;
      if (this.target[col] === -3) {
        // An ignored column: its bytes up to the next delimiter (or end of line), unread.
        while (c !== 10 && c !== CR && (delim >= 0 ? c !== delim : c !== SPACE && c !== TAB)) c = buf[++p]!;
      } else if (col === ti && dt !== undefined) {
        const d = this.dateScan;
        scanDateTime(buf, p, dt.baseDays, d);
        if (d.end < 0 || (this.zoneMode >= 0 && d.zone !== this.zoneMode)) return this.slowLine(buf, s, e, line);
        this.zoneMode = d.zone;
        this.row[col] = d.value;
        this.rowPlace = -d.fractionDigits;
        this.rowMant = 0;
        p = d.end;
      } else {
        scanNumber(buf, p, this.decimalByte, scan);
        if (scan.end < 0) return this.slowLine(buf, s, e, line);
        this.row[col] = scan.value;
        if (col === ti) {
          this.rowPlace = scan.place;
          this.rowMant = scan.mant;
        }
        p = scan.end;
      }
      c = buf[p]!;
      while (c === SPACE || (delim < 0 && c === TAB)) c = buf[++p]!;
      if (col < ncol - 1) {
        if (delim >= 0) {
          if (c !== delim) return this.slowLine(buf, s, e, line);
          p++;
        } else if (c === 10 || c === CR) return this.slowLine(buf, s, e, line);
      }
    }
    if (this.trailing) {
      if (c !== delim) return this.slowLine(buf, s, e, line);
      c = buf[++p]!;
      while (c === SPACE) c = buf[++p]!;
    }
    if (c === CR) c = buf[++p]!;
    if (c !== 10) return this.slowLine(buf, s, e, line);
    this.next = p + 1;
    return 0;
  }

  private slowLine(buf: Uint8Array, s: number, e: number, line: number): number {
    e = this.lineEnd(buf, s, e);
    this.next = e + 1;
    if (e > s && buf[e - 1] === CR) e--;
    const text = Buffer.from(buf.buffer, buf.byteOffset + s, e - s).toString("utf8");
    const fields = splitRow(text, this.spec.delimiter);
    const ncol = this.ncol;
    // An empty last field after the trailing delimiter is no column; a row without it is read too.
    if (this.trailing && fields.length === ncol + 1 && fields[ncol]!.trim() === "") fields.pop();
    const names = this.spec.columnNames;
    if (fields.length !== ncol) {
      const few = fields.length < ncol;
      this.fail(
        few ? "CSV_TOO_FEW_FIELDS" : "CSV_TOO_MANY_FIELDS",
        line,
        few ? fields.length + 1 : ncol + 1,
        `${ncol} fields as in the first row`,
        `${fields.length}`,
      );
    }
    const dt = this.spec.timeDateTime;
    for (let c = 0; c < ncol; c++) {
      const f = fields[c]!.trim();
      if (this.target[c] === -3) continue;
      if (c === this.spec.timeIndex && dt !== undefined) {
        const d = parseDateTimeText(f, dt.baseDays);
        if (d === undefined)
          this.fail(
            "CSV_TIME_FORMAT",
            line,
            c + 1,
            "a date-time stamp like 2024-05-17T14:03:00.000 (ISO 8601) as in the first row",
            quoted(f),
          );
        if (this.zoneMode >= 0 && d!.zone !== this.zoneMode) {
          this.fail(
            "CSV_TIME_FORMAT",
            line,
            c + 1,
            this.zoneMode
              ? "a time zone (Z or an offset) as in the rows before"
              : "no time zone, as in the rows before",
            quoted(f),
          );
        }
        this.zoneMode = d!.zone;
        this.row[c] = d!.value;
        this.rowPlace = -d!.fractionDigits;
        this.rowMant = 0;
        continue;
      }
      if (f === "")
        this.fail("CSV_EMPTY_CELL", line, c + 1, `a number in column ${quoted(names[c]!)}`, "an empty cell");
      let v = parseNumberText(f, this.spec.decimal);
      if (Number.isNaN(v)) {
        const nf = nonFiniteToken(f);
        if (nf === undefined) {
          // In a comma-separated file a decimal comma can only sit inside quotes, a layout psdgate does not read.
          const hint =
            this.spec.decimal === "." && /^[+-]?\d+,\d+$/.test(f)
              ? this.spec.delimiter === ","
                ? "decimal commas inside quoted fields of a comma-separated file are not read: export it with ';' between fields, or with decimal points"
                : 'the file may use decimal commas: give `csv.delimiter: ";"` `csv.decimal: ","`'
              : undefined;
          this.fail("CSV_NOT_A_NUMBER", line, c + 1, `a number in column ${quoted(names[c]!)}`, quoted(f), hint);
        }
        v = nf!;
      }
      this.row[c] = v;
      if (c === this.spec.timeIndex) {
        const r = numberTextResolution(f);
        this.rowPlace = r.place;
        this.rowMant = r.mant;
      }
    }
    return 0;
  }
}

const SIGN = new Float64Array([1, -1]);

/** What plainRows reads the rows by: fixed for a parser (CsvBodyParser's fields of the same meaning). */
interface PlainRowsSpec {
  ncol: number;
  /** The delimiter and decimal mark as bytes. */
  delim: number;
  decimal: number;
  timeIndex: number;
  /** Day the date-time stamps count from, or NaN when the time column holds numbers. */
  stampBase: number;
  trailing: boolean;
}

interface PlainRowsState {
  /** Index of the first byte not parsed: the start of the line that stopped the loop. */
  end: number;
  /** Resolution of the time column's stamps (CsvPiece.timeMinPlace, timeMaxMant). */
  timeMinPlace: number;
  timeMaxMant: number;
  /** Zone state of date-time stamps, in and out (CsvBodyParser.zoneMode). */
  zoneMode: number;
}

const stampScan: DateTimeScan = { end: -1, value: 0, fractionDigits: 0, zone: 0, days: 0 };

/**
 * The common case in one loop: rows of exactly `ncol` plain numbers ([+-]digits[.digits][(e|E)[+-]digits],
 * at most 15 digits, decimal exponent of the last digit within +-22, either decimal mark) separated by
 * the delimiter byte and ended by LF or CRLF. Row r's values go to
 * outs[column][row0 + r]. It stops before the first line that is anything else (spaces, longer
 * exponents, quotes, comments, blank lines, a short row), when the columns are full (`cap`), or at `e`, and
 * returns the rows parsed; the caller's general path takes the line it stopped at. The value is m / 10^k
 * or m * 10^-k with m exact (at most 15 digits), one correctly rounded operation: the same double as
 * Number() (Clinger 1990, as in scanNumber).
 */
function plainRows(
  buf: Uint8Array,
  p: number,
  e: number,
  outs: Float64Array[],
  row0: number,
  cap: number,
  spec: PlainRowsSpec,
  state: PlainRowsState,
): number {
  const { ncol, delim, decimal, timeIndex, stampBase, trailing } = spec;
  let row = row0;
  let timeMaxK = -99;
  let timeMant = 0;
  let zone = state.zoneMode;
  const last = ncol - 1;
  // The column of date-time stamps, or -1: the same scanner as the general parser's, so the same double.
  const stampCol = stampBase === stampBase ? timeIndex : -1;
  // Start of the row being read: a line that stops the loop (`break rows`) is left whole to the caller.
  let lineStart = p;
  rows: while (p < e && row < cap) {
    for (let col = 0; col < ncol; col++) {
      if (col === stampCol) {
        scanDateTime(buf, p, stampBase, stampScan);
        if (stampScan.end < 0 || (zone >= 0 && stampScan.zone !== zone)) break rows;
        zone = stampScan.zone;
        p = stampScan.end;
        const c = buf[p]!;
        // The delimiter, or after the last column LF: a stamp ends the row only plainly (LF); anything else
        // goes to the general parser.
        if (col < last ? c !== delim : trailing || c !== 10) break rows;
        p++;
        outs[col]![row] = stampScan.value;
        if (stampScan.fractionDigits > timeMaxK) timeMaxK = stampScan.fractionDigits;
        continue;
      }
      // The sign without a branch (signs are random in vibration data, so a branch would be mispredicted
      // half the time; this took the loop from 20 to 14 ns a number): neg is 1 for '-' else 0, by integer
      // arithmetic; p skips it, and the value is multiplied by SIGN[neg] at the end.
      const neg = (((buf[p]! ^ 45) /* - */ - 1) >>> 31) as 0 | 1;
      p += neg;
      let c = buf[p]!;
      if (c === 43 /* + */ && neg === 0) c = buf[++p]!;
      const start = p;
      let m = 0;
      while ((c - 48) >>> 0 < 10) {
        m = m * 10 + (c - 48);
        c = buf[++p]!;
      }
      let digits = p - start;
      let frac = 0;
      if (c === decimal) {
        const f0 = ++p;
        c = buf[p]!;
        while ((c - 48) >>> 0 < 10) {
          m = m * 10 + (c - 48);
          c = buf[++p]!;
        }
        frac = p - f0;
        digits += frac;
      }
      // The value is m / 10^k; an exponent (e or E, then [+-]digits) moves k.
      let k = frac;
      if ((c | 32) === 101 /* e, E */) {
        c = buf[++p]!;
        const eneg = (((c ^ 45) - 1) >>> 31) as 0 | 1;
        p += eneg;
        c = buf[p]!;
        if (c === 43 /* + */ && eneg === 0) c = buf[++p]!;
        const e0 = p;
        let ev = 0;
        while ((c - 48) >>> 0 < 10) {
          ev = ev * 10 + (c - 48);
          c = buf[++p]!;
        }
        if ((p - e0 - 1) >>> 0 > 2) break rows;
        k += eneg === 1 ? ev : -ev;
      }
      // At most 15 digits and |k| <= 22: m and 10^|k| are exact, and one division or product rounds
      // correctly (Clinger 1990), so the double is Number()'s.
      if ((digits - 1) >>> 0 > 14 || (k + 22) >>> 0 > 44) break rows;
      if (col < last) {
        if (c !== delim) break rows;
      } else if (trailing && c !== 10 && c !== 13) {
        // The empty last column: its delimiter, then the line's end.
        if (c !== delim || (buf[p + 1] !== 10 && (buf[p + 1] !== 13 || buf[p + 2] !== 10))) break rows;
        p += buf[p + 1] === 13 ? 2 : 1;
      } else if (c !== 10) {
        if (c !== 13 || buf[p + 1] !== 10) break rows;
        p++;
      }
      p++;
      outs[col]![row] = (k >= 0 ? m / POW10[k]! : m * POW10[-k]!) * SIGN[neg]!;
      if (col === timeIndex) {
        if (k > timeMaxK) timeMaxK = k;
        if (m > timeMant) timeMant = m;
      }
    }
    row++;
    lineStart = p;
  }
  state.end = lineStart;
  state.timeMinPlace = -timeMaxK;
  state.timeMaxMant = timeMant;
  state.zoneMode = zone;
  return row - row0;
}

// A few short calls at load time give every line of plainRows type feedback (as for blockSums in
// runningMoments.ts): without them, a first long call compiled in mid-loop kept being entered and
// thrown away again, 215 times over four 3 M-row files read in one thread.
{
  const row = new Uint8Array([49, 44, 50, 10]); // "1,2\n"
  const outs = [new Float64Array(1), new Float64Array(1)];
  const state: PlainRowsState = { end: 0, timeMinPlace: 99, timeMaxMant: 0, zoneMode: -1 };
  const spec: PlainRowsSpec = { ncol: 2, delim: 44, decimal: 46, timeIndex: 0, stampBase: NaN, trailing: false };
  for (let i = 0; i < 32; i++) plainRows(row, 0, row.length, outs, 0, 1, spec, state);
  const stamped = new Uint8Array(Buffer.from("2026-03-09T08:15:00.000039,2\n", "latin1"));
  const stamps: PlainRowsSpec = { ncol: 2, delim: 44, decimal: 46, timeIndex: 0, stampBase: 0, trailing: false };
  for (let i = 0; i < 32; i++) plainRows(stamped, 0, stamped.length, outs, 0, 1, stamps, { ...state, zoneMode: -1 });
}
