import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { InputError } from "../../src/errors.js";
import { openCsvTimeHistory, type CsvReadOptions } from "../../src/read/csvTimeHistory.js";
import { seeded, tempDir } from "../helpers.js";

const dir = tempDir();
let counter = 0;
function csv(text: string | Buffer, ext = "csv"): string {
  const p = join(dir, `c${counter++}.${ext}`);
  writeFileSync(p, text);
  return p;
}

/**
 * Most files here are a few rows at toy rates (1-10 Hz): they say --time-unit s, or the plausibility
 * rule (a rate below 20 Hz from a time column without a unit) would refuse them. A test of the rule
 * itself passes `timeUnit: undefined`.
 */
async function readCsv(p: string, opts: CsvReadOptions = {}) {
  const src = await openCsvTimeHistory(p, "timeUnit" in opts ? opts : { timeUnit: "s", ...opts });
  const out: number[][] = src.info.channels.map(() => []);
  const s = await src.read(
    src.info.channels.map((_, i) => i),
    (ch, n) => ch.forEach((c, i) => out[i]!.push(...c.subarray(0, n))),
  );
  return { info: src.info, channels: out, summary: s };
}

async function failure(p: string, opts: CsvReadOptions = {}): Promise<InputError> {
  const e = await readCsv(p, opts).then(
    () => undefined,
    (x: unknown) => x,
  );
  expect(e).toBeInstanceOf(InputError);
  return e as InputError;
}

describe("openCsvTimeHistory: dialects", () => {
  it("comma, header with time column and units: channels, declared units, rate from the time column", async () => {
    const r = await readCsv(csv("time [s],accel [g],a_z (m/s^2)\n0,1,2\n0.001,3,4\n0.002,5,6\n"));
    expect(r.info.channels.map((c) => [c.name, c.declaredUnit])).toEqual([
      ["accel", "g"],
      ["a_z", "m/s2"],
    ]);
    expect(r.channels).toEqual([
      [1, 3, 5],
      [2, 4, 6],
    ]);
    expect(r.summary.sampleRateHz).toBe(1000);
  });
  it("semicolon with decimal commas (European export): t;ax / 0,5;1,25 (papaparse guesses ',' here)", async () => {
    const r = await readCsv(csv("t;ax\n0,5;1,25\n1,0;-2,5\n1,5;3\n"));
    expect(r.info.layout).toContain("';' delimiter, decimal ','");
    expect(r.channels[0]).toEqual([1.25, -2.5, 3]);
    expect(r.summary.sampleRateHz).toBe(2);
  });
  it("tab and whitespace delimiters, no header, --rate", async () => {
    expect((await readCsv(csv("1\t2\n3\t4\n"), { sampleRateHz: 10 })).channels).toEqual([
      [1, 3],
      [2, 4],
    ]);
    const w = await readCsv(csv("  1   2\n 3 4\n"), { sampleRateHz: 10 });
    expect(w.info.layout).toContain("whitespace");
    expect(w.channels).toEqual([
      [1, 3],
      [2, 4],
    ]);
  });
  it("comments, blank lines, CRLF and a UTF-8 BOM", async () => {
    const text = "\ufeff# logger LX-9 export\r\ntime,ax\r\n\r\n0,1\r\n# pause marker\r\n0.5,2\r\n1,3";
    const r = await readCsv(csv(text));
    expect(r.channels[0]).toEqual([1, 2, 3]);
    expect(r.summary.sampleRateHz).toBe(2);
  });
  it("a bracketed suffix without a letter is part of the name, not a unit: 'ax (2)'", async () => {
    const r = await readCsv(csv("time [s],ax (2),ay [mg]\n0,1,2\n1,3,4\n"));
    expect(r.info.channels.map((c) => [c.name, c.declaredUnitText])).toEqual([
      ["ax (2)", undefined],
      ["ay", "mg"],
    ]);
  });
  it("a time column in milliseconds declared by the header, and time_ms", async () => {
    expect(
      (await readCsv(csv("time [ms],ax\n0,1\n0.5,2\n1.0,3\n"), { timeUnit: undefined })).summary.sampleRateHz,
    ).toBe(2000);
    expect((await readCsv(csv("time_ms,ax\n0,1\n2,2\n4,3\n"), { timeUnit: undefined })).summary.sampleRateHz).toBe(500);
  });
  it("printed time stamps rounded to 6 decimals at 25.6 kHz are accepted and give 25600 Hz", async () => {
    let s = "t,ax\n";
    for (let i = 0; i < 3000; i++) s += `${(i / 25600).toFixed(6)},${i % 7}\n`;
    expect((await readCsv(csv(s))).summary.sampleRateHz).toBe(25600);
  });
  it("--time-column by name or position; --no-time-column with --rate leaves the time column out (neither time nor a channel)", async () => {
    expect(
      (await readCsv(csv("a,stamp,b\n1,0,2\n3,0.1,4\n"), { timeColumn: "stamp" })).info.channels.map((c) => c.name),
    ).toEqual(["a", "b"]);
    expect((await readCsv(csv("a,stamp,b\n1,0,2\n3,0.1,4\n"), { timeColumn: 2 })).summary.sampleRateHz).toBe(10);
    expect(
      (await readCsv(csv("time,b\n1,0\n3,0\n"), { timeColumn: false, sampleRateHz: 5 })).info.channels.map(
        (c) => c.name,
      ),
    ).toEqual(["b"]);
  });
  it("NaN and Inf cells are read as non-finite samples (flagged downstream), not as errors", async () => {
    const r = await readCsv(csv("t,ax\n0,1\n1,NaN\n2,-inf\n"));
    expect(r.channels[0]).toEqual([1, NaN, -Infinity]);
  });
});

describe("openCsvTimeHistory: fast path and papaparse path agree bit for bit", () => {
  it("random numbers in many spellings, plain (fast path) vs quoted (papaparse + Number)", async () => {
    const u = seeded(42);
    const plain: string[] = ["t,a,b"];
    const quoted: string[] = ['"t","a","b"'];
    const spell = (x: number, k: number) =>
      [
        x.toFixed(6),
        x.toPrecision(17),
        x.toExponential(9),
        String(x),
        x.toFixed(0),
        `${x < 0 ? "-" : "+"}${Math.abs(x).toFixed(3)}`,
        (x * 1e-30).toPrecision(15),
        "1234567890123456789",
      ][k % 8]!;
    for (let i = 0; i < 5000; i++) {
      const a = spell((u() - 0.5) * 10 ** Math.floor(u() * 12 - 6), i);
      const b = spell((u() - 0.5) * 1000, i + 3);
      plain.push(`${i},${a},${b}`);
      quoted.push(`"${i}","${a}",${b}`);
    }
    const fast = await readCsv(csv(plain.join("\n")));
    const slow = await readCsv(csv(quoted.join("\n")));
    expect(fast.channels[0]!.length).toBe(5000);
    expect(Object.is(fast.channels[0]![1], slow.channels[0]![1])).toBe(true);
    expect(fast.channels).toEqual(slow.channels);
    for (let i = 0; i < 5000; i++) expect(fast.channels[0]![i]).toBe(Number(plain[i + 1]!.split(",")[1]));
  });
  it("rows across 64 KB chunk boundaries", async () => {
    let s = "time,x\n";
    for (let i = 0; i < 30000; i++) s += `${i},${(i * 0.001).toFixed(3)}\n`;
    const r = await readCsv(csv(s));
    expect(r.channels[0]!.length).toBe(30000);
    expect(r.channels[0]![29999]).toBe(29.999);
  });
});

describe("openCsvTimeHistory: errors name file, line and column", () => {
  const cases: [string, string | Buffer, string, number | undefined, number | undefined, CsvReadOptions?][] = [
    ["empty file", "", "CSV_EMPTY", undefined, undefined],
    ["header only", "time,ax\n", "CSV_NO_DATA", 1, undefined],
    ["only comments", "# nothing\n\n", "CSV_NO_DATA", undefined, undefined],
    ["one sample", "time,ax\n0,1\n", "CSV_TOO_SHORT", undefined, undefined],
    ["a text cell mid-file", "time,ax,ay\n0,1,2\n0.1,1,2\n0.2,1,oops\n0.3,1,2\n", "CSV_NOT_A_NUMBER", 4, 3],
    ["an empty cell", "time,ax,ay\n0,1,2\n0.1,,2\n", "CSV_EMPTY_CELL", 3, 2],
    ["too few fields", "time,ax,ay\n0,1,2\n0.1,1\n", "CSV_TOO_FEW_FIELDS", 3, 3],
    ["too many fields", "time,ax,ay\n0,1,2\n0.1,1,2,3\n", "CSV_TOO_MANY_FIELDS", 3, 4],
    ["1.2.3", "time,ax\n0,1\n0.1,1.2.3\n", "CSV_NOT_A_NUMBER", 3, 2],
    ["duplicate time stamp", "time,ax\n0,1\n0.1,1\n0.1,1\n0.3,1\n", "CSV_TIME_DUPLICATE", 4, 1],
    ["decreasing time stamp", "time,ax\n0,1\n0.1,1\n0.2,1\n0.15,1\n", "CSV_TIME_DECREASING", 5, 1],
    ["a gap in time", "time,ax\n0,1\n0.1,1\n0.2,1\n0.3,1\n0.5,1\n0.6,1\n", "CSV_TIME_IRREGULAR", 6, 1],
    ["jitter beyond 1 %", "time,ax\n0.000,1\n0.100,1\n0.200,1\n0.305,1\n0.400,1\n", "CSV_TIME_IRREGULAR", 5, 1],
    ["no time column and no rate", "ax,ay\n1,2\n3,4\n", "CSV_NO_RATE", undefined, undefined],
    ["UTF-16 file", Buffer.from("\ufefft,a\n0,1\n", "utf16le"), "CSV_ENCODING", 1, undefined],
    ["binary file named .csv", Buffer.from([1, 2, 3, 0, 255, 254, 10, 0, 0]), "CSV_BINARY", 1, undefined],
    ["both decimal marks", "t;a\n0,5;1.5\n1,0;2\n", "CSV_DECIMAL_AMBIGUOUS", 2, undefined],
    [
      "decimal commas with comma delimiter declared",
      "t,a\n0,1\n",
      "OPTION_CONFLICT",
      undefined,
      undefined,
      { decimal: ",", delimiter: "," },
    ],
    [
      "a time column that does not exist",
      "t,a\n0,1\n1,2\n",
      "TIME_COLUMN_NOT_FOUND",
      undefined,
      undefined,
      { timeColumn: "clock" },
    ],
    ["time unit unknown", "time [furlong],a\n0,1\n1,2\n", "CSV_TIME_UNIT", 1, 1],
    ["duplicate column names", "t,a,a\n0,1,2\n1,2,3\n", "CSV_DUPLICATE_COLUMN", 1, 3],
    ["only a time column", "time\n0\n1\n", "CSV_NO_CHANNELS", undefined, undefined],
  ];
  for (const [name, text, code, line, column, opts] of cases) {
    it(`${name}: ${code}${line ? ` at line ${line}` : ""}${column ? `, column ${column}` : ""}`, async () => {
      const p = csv(text);
      const e = await failure(p, opts);
      expect(e.code).toBe(code);
      expect(e.details.line).toBe(line);
      expect(e.details.column).toBe(column);
      expect(e.message.startsWith(p) || e.message.startsWith("option")).toBe(true);
      expect(e.message).toMatch(/expected .*\[/);
    });
  }
  it("a decimal comma quoted in a comma file gets a hint that names the layout and the export that reads", async () => {
    const e = await failure(csv('t,a\n0,"1,5"\n1,2\n'));
    expect(e.code).toBe("CSV_NOT_A_NUMBER");
    expect(e.message).toContain("decimal commas inside quoted fields of a comma-separated file are not read");
  });
  it("a header followed by a line longer than the sniffed head is named as that line, not as a header only", async () => {
    const e = await failure(csv("# rig 2\ntime,ax\n" + "x".repeat(200000)));
    expect(e.code).toBe("CSV_LINE_TOO_LONG");
    expect(e.details.line).toBe(3);
  });
  it("a very long line is refused, not buffered without end", async () => {
    const e = await failure(csv("t,a\n0,1\n1," + "9".repeat(2 << 20) + "\n"));
    expect(e.code).toBe("CSV_LINE_TOO_LONG");
  });
});
