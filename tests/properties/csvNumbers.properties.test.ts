import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { CsvBodyParser, type CsvBodySpec } from "../../src/read/csvBody.js";

/**
 * Property: whatever numbers a logger prints, and however the piece mixes plain rows (the tight loop)
 * with rows only the general parser reads, each value is exactly the double Number() gives for its
 * text (the reference: the JavaScript engine's own correctly rounded conversion).
 */
const spec: CsvBodySpec = {
  file: "p.csv",
  columns: 3,
  columnNames: ["t", "a", "b"],
  delimiter: ";",
  decimal: ",",
  timeIndex: -1,
  selectColumns: [0, 1, 2],
};
const specPoint: CsvBodySpec = { ...spec, delimiter: ",", decimal: "." };

const spelling = fc.oneof(
  fc
    .tuple(fc.double({ min: -1e6, max: 1e6, noNaN: true }), fc.integer({ min: 0, max: 12 }))
    .map(([x, k]) => x.toFixed(k)),
  fc.double({ noNaN: true, noDefaultInfinity: true }).map((x) => String(x)),
  fc
    .tuple(fc.double({ min: -1e3, max: 1e3, noNaN: true }), fc.integer({ min: 1, max: 17 }))
    .map(([x, k]) => x.toPrecision(k)),
  fc
    .tuple(fc.constantFrom("", "+", "-"), fc.stringMatching(/^[0-9]{1,18}$/), fc.stringMatching(/^[0-9]{0,18}$/))
    .map(([s, i, f]) => `${s}${i}${f ? `.${f}` : ""}`),
  fc.tuple(fc.constantFrom("", "-"), fc.stringMatching(/^[0-9]{1,9}$/)).map(([s, f]) => `${s}.${f}`),
  // Scientific notation as numpy.savetxt (%.6e), loggers and spreadsheets write it: any mantissa
  // length, e or E, a signed or bare exponent of 1 to 4 digits (zero-padded too).
  fc
    .tuple(fc.double({ noNaN: true, noDefaultInfinity: true }), fc.integer({ min: 0, max: 17 }))
    .map(([x, k]) => x.toExponential(Math.min(k, 16))),
  fc
    .tuple(fc.double({ min: -10, max: 10, noNaN: true }), fc.integer({ min: 0, max: 9 }))
    .map(([x, k]) => x.toExponential(k).replace(/e([+-])(\d)$/, "E$10$2")),
  fc
    .tuple(
      fc.constantFrom("", "+", "-"),
      fc.stringMatching(/^[0-9]{1,8}$/),
      fc.stringMatching(/^[0-9]{0,10}$/),
      fc.constantFrom("e", "E"),
      fc.constantFrom("", "+", "-"),
      fc.stringMatching(/^[0-9]{1,4}$/),
    )
    .map(([s, i, f, e, es, ev]) => `${s}${i}${f ? `.${f}` : ""}${e}${es}${ev}`),
);

describe("CSV numbers: the plain-row loop and the general parser give Number()'s double (fixed, scientific, integer counts, both decimal marks)", () => {
  for (const [label, sp] of [
    ["comma delimiter, decimal point", specPoint],
    ["semicolon delimiter, decimal comma", spec],
  ] as const) {
    it(label, () => {
      fc.assert(
        fc.property(
          fc.array(fc.tuple(spelling, spelling, spelling, fc.constantFrom("\n", "\r\n", " \n")), {
            minLength: 1,
            maxLength: 40,
          }),
          (rows) => {
            const text = rows
              .map(
                ([a, b, c, end]) =>
                  [a, b, c].map((v) => (sp.decimal === "," ? v.replace(".", ",") : v)).join(sp.delimiter) + end,
              )
              .join("");
            const piece = new CsvBodyParser(sp).parse(Buffer.from(text), 0, Buffer.byteLength(text), 1);
            expect(piece.rows).toBe(rows.length);
            rows.forEach(([a, b, c], i) => {
              [a, b, c].forEach((v, col) => expect(Object.is(piece.channels[col]![i], Number(v))).toBe(true));
            });
          },
        ),
        { numRuns: 1000, seed: 20261201 },
      );
    });
  }
});
