import { InputError } from "../errors.js";
import type { CsvPiece } from "./csvBody.js";
import { stampQuantum } from "./roundRate.js";

/**
 * The time column's checks, piece by piece in file order: finite stamps that increase, in uniform
 * steps. The median step of the first PROBE + 1 rows is the reference; every step must lie within 1 %
 * of it plus the resolution of the printed stamps (so stamps rounded to 6 decimals pass).
 *
 * The resolution of a printed stamp is the place of its last digit. Over the column, two figures
 * describe it: the finest place seen (fixed decimals: 1e-6 for "%.6f") and the most significant
 * digits seen (significant-digit formats such as "%.6g" or "%.6e", whose place grows with the
 * stamp). The quantum of a stamp t is the larger of 10^finest and 10^(floor(log10 |t|) - digits + 1):
 * for fixed decimals the first is the larger, for significant digits the second (trailing zeros
 * that "%g" drops do not change either figure). Both figures are updated from each piece before its
 * steps are checked, so the allowance always reflects the stamps seen so far, over the whole column;
 * within one piece it is taken at the piece's largest stamp (at most one decade too generous where a
 * piece crosses a power of ten).
 */
const PROBE = 1024;

export interface TimeColumn {
  file: string;
  /** 0-based index of the time column among the file's columns. */
  index: number;
  name: string | undefined;
  /** Seconds per unit of the column. */
  factor: number;
}

export class TimeStampCheck {
  /** Rows checked so far. */
  private frames = 0;
  private readonly col: TimeColumn;
  private readonly probeT = new Float64Array(PROBE + 1);
  private readonly probeLine = new Float64Array(PROBE + 1);
  private t0 = NaN;
  private tLast = NaN;
  private dt = NaN;
  private tol = NaN;
  /** Finest decimal place of a last digit, and the most significant digits, seen so far. */
  private minPlace = 99;
  private maxSig = 0;

  constructor(col: TimeColumn) {
    this.col = col;
  }

  /** Checks the piece's stamps; `firstLine` is the file line of the piece's first line. */
  check(piece: CsvPiece, firstLine: number): void {
    const tv = piece.time!;
    const rows = piece.rows;
    const k = this.col.factor;
    const lineOf = (i: number) => firstLine + (piece.rowLines ? piece.rowLines[i]! : i);
    if (piece.timeMinPlace < this.minPlace) this.minPlace = piece.timeMinPlace;
    const sig = piece.timeMaxMant > 0 ? Math.floor(Math.log10(piece.timeMaxMant)) + 1 : 0;
    if (sig > this.maxSig) this.maxSig = sig;
    let i = 0;
    // The first rows settle the reference step (the probe); they take the careful path.
    for (; i < rows && this.frames <= PROBE; i++) {
      const t = tv[i]! * k;
      if (!Number.isFinite(t)) this.notANumber(lineOf(i), tv[i]!);
      if (this.frames === 0) this.t0 = t;
      this.probeT[this.frames] = t;
      this.probeLine[this.frames] = lineOf(i);
      if (this.frames === PROBE) this.settle(PROBE + 1);
      this.tLast = t;
      this.frames++;
    }
    if (i >= rows) return;
    this.tol = this.allowance(Math.max(Math.abs(tv[0]!), Math.abs(tv[rows - 1]!)));
    // Every later row: one subtraction and two comparisons; the line only on failure.
    const bad = firstBadStep(tv, i, rows, k, this.tLast, this.dt, this.tol);
    if (bad < rows) {
      const t = tv[bad]! * k;
      if (!Number.isFinite(t)) this.notANumber(lineOf(bad), tv[bad]!);
      this.step(t, lineOf(bad), bad > i ? tv[bad - 1]! * k : this.tLast);
    }
    this.frames += rows - i;
    this.tLast = tv[rows - 1]! * k;
  }

  /** First and last stamp (s), the quantum of the printed stamps at the larger (s), and the most fraction digits. */
  finish(): { t0: number; tLast: number; quantum: number; fractionDigits: number } {
    if (this.frames <= PROBE) this.settle(this.frames);
    const k = this.col.factor;
    return {
      t0: this.t0,
      tLast: this.tLast,
      quantum: this.quantum(Math.max(Math.abs(this.t0), Math.abs(this.tLast)) / k) * k,
      fractionDigits: Math.max(0, -this.minPlace),
    };
  }

  /** Rounding quantum of a printed stamp of magnitude `abs` (file units), from the column's figures. */
  private quantum(abs: number): number {
    return stampQuantum(this.minPlace, this.maxSig, abs);
  }

  /** Allowed deviation of a step from the reference (s) near stamps of magnitude `abs` (file units). */
  private allowance(abs: number): number {
    return 0.01 * this.dt + Math.min(1.01 * this.quantum(abs) * this.col.factor, 0.5 * this.dt);
  }

  private settle(count: number): void {
    if (count < 2) return;
    const t = this.probeT;
    // Order first, so a decreasing stamp is named as such; then the median step of the probe.
    for (let i = 1; i < count; i++) {
      if (!(t[i]! > t[i - 1]!)) {
        this.dt = Infinity;
        this.tol = Infinity;
        this.step(t[i]!, this.probeLine[i]!, t[i - 1]!);
      }
    }
    const steps = new Float64Array(count - 1);
    for (let i = 1; i < count; i++) steps[i - 1] = t[i]! - t[i - 1]!;
    steps.sort();
    this.dt = steps[(steps.length - 1) >> 1]!;
    let abs = 0;
    for (let i = 0; i < count; i++) abs = Math.max(abs, Math.abs(t[i]!));
    this.tol = this.allowance(abs / this.col.factor);
    for (let i = 1; i < count; i++) this.step(t[i]!, this.probeLine[i]!, t[i - 1]!);
  }

  /** Throws when the step from `prev` to `t` is not positive or not uniform. */
  private step(t: number, line: number, prev: number): void {
    const { file, index, name, factor } = this.col;
    const step = t - prev;
    if (!(step > 0)) {
      throw new InputError(step === 0 ? "CSV_TIME_DUPLICATE" : "CSV_TIME_DECREASING", {
        file,
        line,
        column: index + 1,
        field: name,
        expected: "time stamps that increase",
        received: step === 0 ? `a repeated time ${t / factor}` : `${t / factor} after ${prev / factor}`,
        // A logger that prints its stamps more coarsely than it samples (200 Hz to 0.01 s) repeats them: the rate
        // then has to come from the user.
        ...(step === 0
          ? {
              hint: "if the stamps are printed too coarsely to tell the samples apart, read the record without them: `csv.timeColumn: false` with `csv.sampleRateHz`",
            }
          : {}),
      });
    }
    if (Math.abs(step - this.dt) > this.tol) {
      throw new InputError("CSV_TIME_IRREGULAR", {
        file,
        line,
        column: index + 1,
        field: name,
        expected: `a uniform time step of ${fmt(this.dt / factor)} (within 1 %)`,
        received: `a step of ${fmt(step / factor)}`,
        hint:
          Math.abs(step - this.dt) > 0.5 * this.dt
            ? "psdgate needs uniformly sampled data; split the record at the gap or resample it"
            : "psdgate needs uniformly sampled data; the stamps jitter by more than their printed resolution allows: resample the record, or give `csv.timeColumn: false` `csv.sampleRateHz: HZ` if the rate is known",
      });
    }
  }

  private notANumber(line: number, value: number): never {
    const { file, index, name } = this.col;
    throw new InputError("CSV_TIME_NOT_A_NUMBER", {
      file,
      line,
      column: index + 1,
      field: name,
      expected: "a finite time stamp",
      received: String(value),
    });
  }
}

/**
 * Index of the first row in [from, rows) whose step from the stamp before it is not within `allowed`
 * of `ref` (or not positive), or `rows` when there is none. `prev` is the stamp before row `from`.
 * A module-level loop with nothing after it: V8 keeps one optimised copy for every file.
 */
function firstBadStep(
  tv: Float64Array,
  from: number,
  rows: number,
  k: number,
  prev: number,
  ref: number,
  allowed: number,
): number {
  for (let i = from; i < rows; i++) {
    const t = tv[i]! * k;
    const step = t - prev;
    if (!(step > 0 && Math.abs(step - ref) <= allowed)) return i;
    prev = t;
  }
  return rows;
}

function fmt(x: number): string {
  return Number(x.toPrecision(6)).toString();
}

/**
 * A vibration record is sampled at tens of hertz at least (common practice: accelerometer logging
 * for PSDs starts around 100 Hz, and nothing below 20 Hz makes a useful spectrum of shaker or ride
 * vibration). A time column without a unit whose rate, read as seconds, falls below this is refused:
 * the stamps are most likely milliseconds, and reading them as seconds would analyse the record at a
 * thousandth of its rate.
 */
export const MIN_PLAUSIBLE_RATE_HZ = 20;

/** The time column as named in messages about its rate. */
export interface TimeColumnInfo {
  file: string;
  /** Line of the first row of samples. */
  line: number;
  /** 1-based column. */
  column: number;
  name: string;
  /** Whether its unit was stated (header, --time-unit) or implied (date-time stamps). */
  unitDeclared: boolean;
}

function hz(x: number): string {
  return `${Number(x.toPrecision(6))} Hz`;
}

export function implausibleRate(t: TimeColumnInfo, rateHz: number): InputError {
  return new InputError("CSV_RATE_IMPLAUSIBLE", {
    file: t.file,
    line: t.line,
    column: t.column,
    field: t.name,
    expected: `a sample rate of at least ${MIN_PLAUSIBLE_RATE_HZ} Hz from a time column without a unit (read as seconds)`,
    received: hz(rateHz),
    hint: `if the stamps are milliseconds (${hz(rateHz * 1000)}) give \`csv.timeUnit: ms\`; to keep seconds give \`csv.timeUnit: s\``,
  });
}

export function rateConflict(t: TimeColumnInfo, optionHz: number, columnHz: number): InputError {
  return new InputError("OPTION_CONFLICT", {
    file: t.file,
    option: "csv.sampleRateHz",
    expected: `a rate that agrees with the time column ${JSON.stringify(t.name)} (${hz(columnHz)})`,
    received: hz(optionHz),
    hint: "drop `csv.sampleRateHz` to use the time column, or give `csv.timeColumn: false` to analyse at `csv.sampleRateHz`",
  });
}
