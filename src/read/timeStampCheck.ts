import { InputError } from "../errors.js";
import type { CsvPiece } from "./csvBody.js";

/**
 * The time column's checks, piece by piece in file order: finite stamps that increase, in uniform
 * steps. The median step of the first PROBE + 1 rows is the reference; every step must lie within 1 %
 * of it plus the resolution of the printed stamps (so stamps rounded to 6 decimals pass). At the end,
 * the rate from the whole span.
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
  private maxFrac = 0;

  constructor(col: TimeColumn) {
    this.col = col;
  }

  /** Checks the piece's stamps; `firstLine` is the file line of the piece's first line. */
  check(piece: CsvPiece, firstLine: number): void {
    const tv = piece.time!;
    const rows = piece.rows;
    const k = this.col.factor;
    const lineOf = (i: number) => firstLine + (piece.rowLines ? piece.rowLines[i]! : i);
    let i = 0;
    // The first rows settle the reference step (the probe); they take the careful path.
    for (; i < rows && this.frames <= PROBE; i++) {
      const t = tv[i]! * k;
      if (!Number.isFinite(t)) this.notANumber(lineOf(i), tv[i]!);
      if (this.frames === 0) this.t0 = t;
      this.probeT[this.frames] = t;
      this.probeLine[this.frames] = lineOf(i);
      if (piece.timeFractionDigits > this.maxFrac) this.maxFrac = piece.timeFractionDigits;
      if (this.frames === PROBE) this.settle(PROBE + 1);
      this.tLast = t;
      this.frames++;
    }
    if (i >= rows) return;
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

  /** First and last stamp (s), and the most digits after the decimal mark in the probe rows. */
  finish(): { t0: number; tLast: number; fractionDigits: number } {
    if (this.frames <= PROBE) this.settle(this.frames);
    return { t0: this.t0, tLast: this.tLast, fractionDigits: this.maxFrac };
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
    this.tol = 0.01 * this.dt + Math.min(1.01 * Math.pow(10, -this.maxFrac) * this.col.factor, 0.5 * this.dt);
    for (let i = 1; i < count; i++) this.step(t[i]!, this.probeLine[i]!, t[i - 1]!);
  }

  /** Throws when the step from `prev` to `t` is not positive or not uniform. */
  private step(t: number, line: number, prev: number): void {
    const { file, index, name, factor } = this.col;
    const step = t - prev;
    if (!(step > 0)) {
      throw new InputError(step === 0 ? "CSV_TIME_DUPLICATE" : "CSV_TIME_DECREASING", {
        file, line, column: index + 1, field: name, expected: "time stamps that increase", received: step === 0 ? `a repeated time ${t / factor}` : `${t / factor} after ${prev / factor}`,
      });
    }
    if (Math.abs(step - this.dt) > this.tol) {
      throw new InputError("CSV_TIME_IRREGULAR", {
        file, line, column: index + 1, field: name, expected: `a uniform time step of ${fmt(this.dt / factor)} (within 1 %)`, received: `a step of ${fmt(step / factor)}`,
        hint: "psdgate needs uniformly sampled data; split the record at the gap or resample it",
      });
    }
  }

  private notANumber(line: number, value: number): never {
    const { file, index, name } = this.col;
    throw new InputError("CSV_TIME_NOT_A_NUMBER", { file, line, column: index + 1, field: name, expected: "a finite time stamp", received: String(value) });
  }
}

/**
 * Index of the first row in [from, rows) whose step from the stamp before it is not within `allowed`
 * of `ref` (or not positive), or `rows` when there is none. `prev` is the stamp before row `from`.
 * A module-level loop with nothing after it: V8 keeps one optimised copy for every file.
 */
function firstBadStep(tv: Float64Array, from: number, rows: number, k: number, prev: number, ref: number, allowed: number): number {
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
