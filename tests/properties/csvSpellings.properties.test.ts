import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { CsvBodyParser, type CsvBodySpec, type CsvPiece } from "../../src/read/csvBody.js";
import { civilFromDays, daysFromCivil, parseDateTimeText } from "../../src/read/dateTimeStamp.js";

/**
 * Property: every CSV spelling a logger or script writes is read to the same double as the reference,
 * whichever path reads the row (the plain-row loop, or the general line parser) and wherever the pieces are cut:
 * - a number: Number() of its text (decimal comma turned into a point), the engine's correctly rounded
 *   conversion, which the parser has matched bit for bit since it was written (csvNumbers.properties.test.ts);
 * - an ISO 8601 stamp: parseDateTimeText, the general parser's own reading of a stamp, in seconds from the
 *   first stamp's day; with its resolution (the place of the last digit) and zone alike.
 * Spellings: fixed decimals, scientific (C's %.Ne, e or E, signed or bare exponents, numpy.savetxt), C's %g at
 * any precision, integer counts, decimal comma with ';', tab-delimited, ISO stamps (T or space, any fraction
 * digits, no zone, Z or an offset), LF or CRLF line ends.
 */

/** C's %.Ne: the exponent with at least two digits. */
const sci = (v: number, d: number) => v.toExponential(d).replace(/e([+-])(\d)$/, "e$10$2");
/** C's %.Pg: P significant digits, trailing zeros dropped, e-notation below 1e-4 or from 10^P. */
function cg(v: number, p: number): string {
  if (v === 0) return "0";
  const x = Number(v.toExponential(p - 1).split("e")[1]);
  if (x < -4 || x >= p) return sci(v, p - 1).replace(/\.?0+e/, "e");
  const f = v.toFixed(p - 1 - x);
  return f.includes(".") ? f.replace(/\.?0+$/, "") : f;
}

const magnitude = fc
  .tuple(fc.double({ min: -10, max: 10, noNaN: true }), fc.integer({ min: -12, max: 9 }))
  .map(([m, e]) => m * 10 ** e);
const number = fc.oneof(
  fc.tuple(magnitude, fc.integer({ min: 0, max: 12 })).map(([x, k]) => x.toFixed(k)),
  fc
    .tuple(magnitude, fc.integer({ min: 0, max: 16 }), fc.boolean())
    .map(([x, d, big]) => (big ? sci(x, d).toUpperCase() : sci(x, d))),
  fc
    .tuple(fc.double({ noNaN: true, noDefaultInfinity: true }), fc.integer({ min: 0, max: 16 }))
    .map(([x, d]) => x.toExponential(d)),
  fc.tuple(magnitude, fc.integer({ min: 1, max: 17 })).map(([x, p]) => cg(x, p)),
  fc
    .tuple(fc.double({ noNaN: true, noDefaultInfinity: true }), fc.integer({ min: 1, max: 17 }))
    .map(([x, p]) => cg(x, p)),
  fc.integer({ min: -8388608, max: 8388607 }).map(String),
  fc
    .tuple(fc.constantFrom("", "+", "-"), fc.stringMatching(/^[0-9]{1,18}$/), fc.stringMatching(/^[0-9]{0,18}$/))
    .map(([s, i, f]) => `${s}${i}${f ? `.${f}` : ""}`),
);

const pad = (n: number, w: number) => String(n).padStart(w, "0");
/** Stamps of one file: one zone form for all rows (a change of form is an error, tested elsewhere). */
const stampRow = (zone: string) =>
  fc
    .tuple(
      fc.integer({ min: 1971, max: 2099 }),
      fc.integer({ min: 1, max: 12 }),
      fc.integer({ min: 1, max: 28 }),
      fc.integer({ min: 0, max: 23 }),
      fc.integer({ min: 0, max: 59 }),
      fc.integer({ min: 0, max: 59 }),
      fc.stringMatching(/^[0-9]{0,9}$/),
      fc.constantFrom("T", " "),
    )
    .map(
      ([y, mo, d, h, mi, s, frac, sep]) =>
        `${y}-${pad(mo, 2)}-${pad(d, 2)}${sep}${pad(h, 2)}:${pad(mi, 2)}:${pad(s, 2)}${frac ? `.${frac}` : ""}${zone}`,
    );

type Dialect = "point" | "comma" | "tab";
const DIALECTS: Record<Dialect, { delimiter: CsvBodySpec["delimiter"]; decimal: "." | "," }> = {
  point: { delimiter: ",", decimal: "." },
  comma: { delimiter: ";", decimal: "," },
  tab: { delimiter: "\t", decimal: "." },
};

/** Parse `text` in pieces cut after the given lines, as the body pass does (one parser, pieces in order). */
function parseInPieces(
  spec: CsvBodySpec,
  text: string,
  cuts: number[],
): { rows: number; cols: number[][]; minPlace: number; maxMant: number } {
  const buf = Buffer.from(text, "latin1");
  const parser = new CsvBodyParser(spec);
  const lineEnds: number[] = [];
  for (let i = 0; i < buf.length; i++) if (buf[i] === 10) lineEnds.push(i + 1);
  const bounds = [...new Set(cuts.map((c) => lineEnds[c % lineEnds.length]!))].sort((a, b) => a - b);
  if (bounds[bounds.length - 1] !== buf.length) bounds.push(buf.length);
  const cols: number[][] = [[], [], []];
  let rows = 0;
  let minPlace = 99;
  let maxMant = 0;
  let s = 0;
  for (const e of bounds) {
    const piece: CsvPiece = parser.parse(buf, s, e, 1);
    rows += piece.rows;
    cols[0]!.push(...piece.time!);
    piece.channels.forEach((c, i) => cols[i + 1]!.push(...c));
    minPlace = Math.min(minPlace, piece.timeMinPlace);
    maxMant = Math.max(maxMant, piece.timeMaxMant);
    s = e;
  }
  return { rows, cols, minPlace, maxMant };
}

const same = (a: number[], b: number[]) => a.length === b.length && a.every((x, i) => Object.is(x, b[i]));

describe("CSV spellings: every value is the reference double, on either path and across piece cuts", () => {
  for (const dialect of ["point", "comma", "tab"] as Dialect[]) {
    it(`numbers (fixed, scientific, %g, counts), ${dialect === "point" ? "',' and decimal point" : dialect === "comma" ? "';' and decimal comma" : "tab-delimited"}`, () => {
      const d = DIALECTS[dialect];
      const spec: CsvBodySpec = {
        file: "p.csv",
        columns: 3,
        columnNames: ["t", "a", "b"],
        ...d,
        timeIndex: 0,
        selectColumns: [1, 2],
      };
      fc.assert(
        fc.property(
          fc.array(fc.tuple(number, number, number), { minLength: 1, maxLength: 30 }),
          fc.constantFrom("\n", "\r\n"),
          fc.array(fc.nat(), { maxLength: 3 }),
          (rows, end, cuts) => {
            const cells = rows.map((r) => r.map((v) => (d.decimal === "," ? v.replace(".", ",") : v)));
            const text = cells.map((r) => r.join(d.delimiter) + end).join("");
            const plain = parseInPieces(spec, text, cuts);
            // The same rows with a space before each line's end: the general parser reads every one.
            const general = parseInPieces(spec, cells.map((r) => r.join(d.delimiter) + " " + end).join(""), []);
            expect(plain.rows).toBe(rows.length);
            for (let c = 0; c < 3; c++) {
              const want = rows.map((r) => Number(r[c]));
              expect(same(plain.cols[c]!, want), `column ${c}`).toBe(true);
              expect(same(general.cols[c]!, want), `column ${c}, general path`).toBe(true);
            }
            expect(plain.minPlace).toBe(general.minPlace);
            expect(plain.maxMant).toBe(general.maxMant);
          },
        ),
        { numRuns: 400, seed: 20261202 },
      );
    });
  }

  for (const dialect of ["point", "comma", "tab"] as Dialect[]) {
    it(`ISO 8601 stamps in the time column (no zone, Z, offsets), ${dialect}`, () => {
      const d = DIALECTS[dialect];
      fc.assert(
        fc.property(
          fc
            .constantFrom("", "Z", "+02:00", "-0530")
            .chain((zone) => fc.array(fc.tuple(stampRow(zone), number, number), { minLength: 1, maxLength: 30 })),
          fc.constantFrom("\n", "\r\n"),
          fc.array(fc.nat(), { maxLength: 3 }),
          (rows, end, cuts) => {
            const base = parseDateTimeText(rows[0]![0])!.days;
            expect(base).toBe(
              daysFromCivil(
                Number(rows[0]![0].slice(0, 4)),
                Number(rows[0]![0].slice(5, 7)),
                Number(rows[0]![0].slice(8, 10)),
              ),
            );
            const spec: CsvBodySpec = {
              file: "p.csv",
              columns: 3,
              columnNames: ["t", "a", "b"],
              ...d,
              timeIndex: 0,
              selectColumns: [1, 2],
              timeDateTime: { baseDays: base },
            };
            const cells = rows.map(([t, a, b]) => [
              t,
              ...[a, b].map((v) => (d.decimal === "," ? v.replace(".", ",") : v)),
            ]);
            const plain = parseInPieces(spec, cells.map((r) => r.join(d.delimiter) + end).join(""), cuts);
            const general = parseInPieces(spec, cells.map((r) => r.join(d.delimiter) + " " + end).join(""), []);
            expect(plain.rows).toBe(rows.length);
            const stamps = rows.map(([t]) => parseDateTimeText(t, base)!.value);
            expect(same(plain.cols[0]!, stamps), "stamps").toBe(true);
            expect(same(general.cols[0]!, stamps), "stamps, general path").toBe(true);
            for (let c = 1; c < 3; c++) {
              const want = rows.map((r) => Number(r[c]));
              expect(same(plain.cols[c]!, want), `column ${c}`).toBe(true);
              expect(same(general.cols[c]!, want), `column ${c}, general path`).toBe(true);
            }
            const digits = Math.max(...rows.map(([t]) => parseDateTimeText(t, base)!.fractionDigits));
            expect(plain.minPlace).toBe(-digits);
            expect(general.minPlace).toBe(-digits);
            expect(plain.maxMant).toBe(general.maxMant);
          },
        ),
        { numRuns: 150, seed: 20261202 },
      );
    });
  }

  it("ISO stamps of a running clock (many rows share their date and minute): the value from the stamp's own fields, bit for bit", () => {
    // scanDateTime keeps the last `YYYY-MM-DDThh:mm` prefix and reuses it; this holds every stamp to a reference
    // computed here from the text's fields alone (same formula, no cache), across minute, hour, day and month
    // boundaries, and checks that a bad seconds field after a reused prefix still sends the row to the general
    // parser, which names it.
    const toText = (us: number, frac: number, sep: string, zone: string) => {
      const sec = Math.floor(us / 1e6);
      const day = Math.floor(sec / 86400);
      const [y, mo, d] = civilFromDays(day);
      const sod = sec - day * 86400;
      const f = frac > 0 ? "." + pad(us % 1e6, 6).slice(0, frac) : "";
      return `${y}-${pad(mo, 2)}-${pad(d, 2)}${sep}${pad(Math.floor(sod / 3600), 2)}:${pad(Math.floor(sod / 60) % 60, 2)}:${pad(sod % 60, 2)}${f}${zone}`;
    };
    const reference = (t: string, base: number) => {
      const m = /^(\d{4})-(\d\d)-(\d\d)[T ](\d\d):(\d\d):(\d\d)(?:\.(\d+))?(Z|[+-]\d\d:\d\d)?$/.exec(t)!;
      const off =
        m[8] && m[8] !== "Z"
          ? (m[8][0] === "+" ? 1 : -1) * (Number(m[8].slice(1, 3)) * 3600 + Number(m[8].slice(4, 6)) * 60)
          : 0;
      const whole =
        (daysFromCivil(Number(m[1]), Number(m[2]), Number(m[3])) - base) * 86400 +
        Number(m[4]) * 3600 +
        Number(m[5]) * 60 +
        Number(m[6]) -
        off;
      return m[7] ? whole + Number(m[7]) / 10 ** m[7].length : whole;
    };
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: 4e9 }),
        // Steps of up to 40 s (most rows share a minute), whole hours and days (the minute stays, the rest moves), or up to 27 h.
        fc.oneof(
          fc.integer({ min: 1, max: 4e7 }),
          fc.integer({ min: 1, max: 48 }).map((h) => h * 3.6e9),
          fc.integer({ min: 1, max: 1e11 }),
        ),
        fc.integer({ min: 0, max: 6 }),
        fc.constantFrom("T", " "),
        fc.constantFrom("", "Z", "+02:00"),
        fc.array(fc.nat(), { maxLength: 3 }),
        (startS, stepUs, frac, sep, zone, cuts) => {
          const t0 = (1.7e9 + startS) * 1e6 - 3e7; // about 30 s before a minute boundary of some day from 2023 on
          const stamps = Array.from({ length: 40 }, (_, i) => toText(t0 + i * stepUs, frac, sep, zone));
          const base = daysFromCivil(
            Number(stamps[0]!.slice(0, 4)),
            Number(stamps[0]!.slice(5, 7)),
            Number(stamps[0]!.slice(8, 10)),
          );
          const spec: CsvBodySpec = {
            file: "p.csv",
            columns: 3,
            columnNames: ["t", "a", "b"],
            delimiter: ",",
            decimal: ".",
            timeIndex: 0,
            selectColumns: [1, 2],
            timeDateTime: { baseDays: base },
          };
          const plain = parseInPieces(spec, stamps.map((t, i) => `${t},${i},-${i}.5\n`).join(""), cuts);
          expect(plain.rows).toBe(stamps.length);
          expect(
            same(
              plain.cols[0]!,
              stamps.map((t) => reference(t, base)),
            ),
            "stamps",
          ).toBe(true);
          // The same prefix as the row before, then seconds 60: an error on its line, after the prefix was reused.
          const bad = stamps[1]!.slice(0, 17) + "60" + stamps[1]!.slice(19);
          const text = `${stamps[0]},1,2\n${stamps[1]},1,2\n${bad},1,2\n`;
          expect(() => new CsvBodyParser(spec).parse(Buffer.from(text), 0, text.length, 2)).toThrow(/CSV_TIME_FORMAT/);
        },
      ),
      { numRuns: 200, seed: 20261202 },
    );
  });

  it("a stamp whose zone form differs from the rows before is an error on the plain path too", () => {
    const spec: CsvBodySpec = {
      file: "p.csv",
      columns: 2,
      columnNames: ["t", "a"],
      delimiter: ",",
      decimal: ".",
      timeIndex: 0,
      selectColumns: [1],
      timeDateTime: { baseDays: daysFromCivil(2026, 3, 9) },
    };
    const text = "2026-03-09T08:15:00.000,1\n2026-03-09T08:15:00.001,2\n2026-03-09T08:15:00.002Z,3\n";
    expect(() => new CsvBodyParser(spec).parse(Buffer.from(text), 0, text.length, 2)).toThrow(
      /line 4.*CSV_TIME_FORMAT|CSV_TIME_FORMAT.*line 4|time zone/,
    );
  });
});
