/**
 * One error type for every problem with what the user gave us (files, options, profiles).
 * It carries a stable code and the place (file, line, column, key path, WAV chunk, option),
 * and every message is built by one function in the form "expected … received …".
 */

/** Where a problem sits. Lines and columns are 1-based file positions. */
export interface ErrorPlace {
  file?: string | undefined;
  line?: number | undefined;
  column?: number | undefined;
  /** A column or channel name. */
  field?: string | undefined;
  /** A key path inside a structured file, e.g. `points[2].hz`. */
  keyPath?: string | undefined;
  /** A RIFF chunk of a WAV file, e.g. `fmt ` or `data`. */
  chunk?: string | undefined;
  /** A command-line option, e.g. `--segment`. */
  option?: string | undefined;
}

export interface InputErrorDetails extends ErrorPlace {
  expected: string;
  received?: string | undefined;
  hint?: string | undefined;
}

/**
 * Every code psdgate can give, by group. README's "Errors" section lists the same set
 * (tests/errors.test.ts holds the two, and every code literal in src/, to each other).
 */
export const ERROR_CODES = {
  csv: [
    "CSV_EMPTY",
    "CSV_NO_DATA",
    "CSV_TOO_SHORT",
    "CSV_NOT_A_NUMBER",
    "CSV_EMPTY_CELL",
    "CSV_TOO_FEW_FIELDS",
    "CSV_TOO_MANY_FIELDS",
    "CSV_TIME_DUPLICATE",
    "CSV_TIME_DECREASING",
    "CSV_TIME_IRREGULAR",
    "CSV_TIME_NOT_A_NUMBER",
    "CSV_TIME_UNIT",
    "CSV_NO_RATE",
    "CSV_ENCODING",
    "CSV_BINARY",
    "CSV_DECIMAL_AMBIGUOUS",
    "CSV_LINE_TOO_LONG",
    "CSV_LINE_ENDS",
    "CSV_DUPLICATE_COLUMN",
    "CSV_NO_CHANNELS",
    "CSV_TIME_FORMAT",
    "CSV_RATE_IMPLAUSIBLE",
    "CSV_SEP_LINE",
  ],
  wav: [
    "WAV_NOT_RIFF",
    "WAV_TRUNCATED_HEADER",
    "WAV_NO_FMT",
    "WAV_BAD_FMT",
    "WAV_NO_DATA",
    "WAV_DATA_BEFORE_FMT",
    "WAV_DATA_TRUNCATED",
    "WAV_UNSUPPORTED_ENCODING",
    "WAV_NO_CHANNELS",
    "WAV_DUPLICATE_CHUNK",
    "WAV_BAD_DS64",
    "WAV_BAD_CALIBRATION",
  ],
  profile: ["PROFILE_INVALID", "PROFILE_SYNTAX", "PROFILE_CSV", "PROFILE_TOO_LARGE"],
  meta: ["META_INVALID", "META_SYNTAX", "META_TABLE_UNKNOWN", "META_TABLE_DUPLICATE", "META_TABLE_AMBIGUOUS"],
  derive: ["MIX_INVALID", "MIX_SYNTAX", "RECORDINGS_UNLIKE", "NO_VIBRATION"],
  psdTable: ["PSD_TABLE_HEADER", "PSD_TABLE_NUMBER", "PSD_TABLE_SPACING", "PSD_TABLE_SHORT", "OPTION_MISSING"],
  limits: ["TOO_MANY_CHANNELS", "ANALYSIS_TOO_LARGE", "WORKER_LIMIT", "INPUT_TOO_LARGE", "REPORT_TOO_LARGE"],
  usage: [
    "USAGE",
    "OPTION_INVALID",
    "OPTION_CONFLICT",
    "OPTION_NOT_FOR_WAV",
    "CHANNEL_NOT_FOUND",
    "TIME_COLUMN_NOT_FOUND",
    "UNIT_CONFLICT",
    "UNIT_UNKNOWN",
    "UNIT_NEEDS_SENSITIVITY",
    "RECORD_TOO_SHORT",
    "NO_FILES",
    "NO_FILES_MATCH",
    "FILE_UNREADABLE",
    "WINDOW_EMPTY",
    "RIDE_RATE_TOO_LOW",
    "SRS_RATE_TOO_LOW",
    "CHECK_RATE_TOO_LOW",
    "SHOCK_TOO_MANY_EVENTS",
    "SHOCK_NO_BACKGROUND",
    "NOT_A_REPORT",
  ],
  output: ["OUTPUT_EXISTS", "OUTPUT_IS_INPUT", "OUTPUT_UNWRITABLE", "OUTPUT_FORMAT"],
  queue: [
    "DB_NOT_GIVEN",
    "DB_UNREACHABLE",
    "DB_PERMISSION",
    "JOB_PATH_REFUSED",
    "JOB_INVALID",
    "RECORDING_CHANGED",
    "PROFILE_CHANGED",
    "JOB_LOST",
  ],
  internal: ["INTERNAL"],
} as const;

export type ErrorCode = (typeof ERROR_CODES)[keyof typeof ERROR_CODES][number];

/** All codes in one list. */
export const ALL_ERROR_CODES: readonly ErrorCode[] = Object.values(ERROR_CODES).flat();

export class InputError extends Error {
  readonly code: ErrorCode;
  readonly details: InputErrorDetails;
  constructor(code: ErrorCode, details: InputErrorDetails) {
    super(formatInputError(code, details));
    this.name = "InputError";
    this.code = code;
    this.details = details;
  }
}

/** `file:line:col: expected …, received … [CODE] (hint: …)` */
export function formatInputError(code: string, d: InputErrorDetails): string {
  const place: string[] = [];
  if (d.file !== undefined) {
    let p = d.file;
    if (d.line !== undefined) p += `:${d.line}`;
    if (d.line !== undefined && d.column !== undefined) p += `:${d.column}`;
    if (d.field !== undefined) p += ` (${d.field})`;
    place.push(p);
  } else if (d.field !== undefined) place.push(`channel ${JSON.stringify(d.field)}`);
  if (d.keyPath !== undefined) place.push(d.keyPath);
  if (d.chunk !== undefined) place.push(`chunk '${d.chunk}'`);
  if (d.option !== undefined) place.push(`option ${d.option}`);
  let msg = place.length > 0 ? `${place.join(": ")}: ` : "";
  msg += `expected ${d.expected}`;
  if (d.received !== undefined) msg += `, received ${d.received}`;
  msg += ` [${code}]`;
  if (d.hint !== undefined) msg += ` (hint: ${d.hint})`;
  return msg;
}

/** Quote a received value for a message, shortened so a megabyte line cannot flood the terminal. */
export function quoted(value: string, max = 40): string {
  const s = value.length > max ? `${value.slice(0, max)}…` : value;
  return JSON.stringify(s);
}

export const EXIT = { ok: 0, fail: 1, input: 2, inconclusive: 3, internal: 70 } as const;

/**
 * An error as it crosses a thread or a process (postMessage, the job queue): plain data that a
 * structured clone or JSON keeps whole. An input error keeps its code and details, so the other side
 * rebuilds the same InputError (same message); anything else is INTERNAL, with its message and stack.
 */
export interface WireError {
  code: ErrorCode;
  /** The message as the error gave it: what is printed and stored. */
  message: string;
  /** An input error's details (absent for an internal error). */
  details?: InputErrorDetails | undefined;
  /** An internal error's stack, where it had one. */
  stack?: string | undefined;
}

/** The wire form of anything thrown. */
export function errorToWire(e: unknown): WireError {
  if (e instanceof InputError) return { code: e.code, message: e.message, details: e.details };
  if (e instanceof Error) return { code: "INTERNAL", message: e.message, stack: e.stack };
  return { code: "INTERNAL", message: String(e) };
}

/**
 * The error a wire form stands for: the InputError it was made from, or an internal Error with its message and stack.
 */
export function errorFromWire(w: WireError): Error {
  if (w.details !== undefined) return new InputError(w.code, w.details);
  const e = new Error(w.message);
  if (w.stack !== undefined) e.stack = w.stack;
  return e;
}
