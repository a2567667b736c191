import { createHash } from "node:crypto";
import { readFileSync, writeFileSync } from "node:fs";
import { join, resolve } from "node:path";
import { pathToFileURL } from "node:url";
import { spawnSync } from "node:child_process";
import { describe, expect, it } from "vitest";
import { InputError } from "../../src/errors.js";
import { CsvBodyParser, type CsvBodySpec } from "../../src/read/csvBody.js";
import { HASH_ON_READER_BYTES_PER_VALUE } from "../../src/read/csvBodyPass.js";
import { seeded, tempDir } from "../helpers.js";

const spec: CsvBodySpec = {
  file: "body.csv",
  columns: 3,
  columnNames: ["t", "a", "b"],
  delimiter: ",",
  decimal: ".",
  timeIndex: 0,
  selectColumns: [1, 2],
};

/** Lines in many spellings: most plain (the tight loop), some that only the general path reads. */
function mixedBody(rows: number, seed: number): { text: string; a: number[]; b: number[]; t: number[] } {
  const u = seeded(seed);
  const lines: string[] = [];
  const a: number[] = [];
  const b: number[] = [];
  const t: number[] = [];
  for (let i = 0; i < rows; i++) {
    const x = (u() - 0.5) * 10 ** Math.floor(u() * 10 - 4);
    const y = (u() - 0.5) * 100;
    const k = Math.floor(u() * 12);
    // Spellings: plain fixed, +sign, 15 and 16 digits, exponent, leading/trailing spaces, CRLF, no integer part.
    const xs = [
      x.toFixed(6),
      `+${Math.abs(x).toFixed(3)}`,
      x.toPrecision(15),
      x.toPrecision(16),
      x.toExponential(5),
      ` ${x.toFixed(2)}`,
      x.toFixed(0),
      `${x < 0 ? "-" : ""}.${Math.abs(x).toFixed(4).split(".")[1]}`,
    ][k % 8]!;
    const ys = k === 9 ? `${y.toFixed(4)} ` : y.toFixed(9);
    const ts = (i * 0.001).toFixed(3);
    if (k === 10) lines.push("# a comment between rows");
    if (k === 11) lines.push("");
    lines.push(`${ts},${xs},${ys}${k === 3 ? "\r" : ""}`);
    a.push(Number(xs));
    b.push(Number(ys));
    t.push(Number(ts));
  }
  return { text: lines.join("\n") + "\n", a, b, t };
}

describe("CsvBodyParser: the plain-row loop and the general path", () => {
  it("every value is the double Number() gives for its text, across plain and irregular lines", () => {
    const body = mixedBody(20000, 7);
    const buf = Buffer.from(body.text);
    const piece = new CsvBodyParser(spec).parse(buf, 0, buf.length, 1);
    expect(piece.rows).toBe(20000);
    for (let i = 0; i < piece.rows; i++) {
      expect(Object.is(piece.channels[0]![i], body.a[i])).toBe(true);
      expect(Object.is(piece.channels[1]![i], body.b[i])).toBe(true);
      expect(piece.time![i]).toBe(body.t[i]);
    }
    // Rows after comments and blank lines know their own lines.
    const lines = body.text.split("\n");
    for (let i = 0; i < piece.rows; i += 997) {
      const line = piece.rowLines ? piece.rowLines[i]! : i;
      expect(lines[line]!.startsWith(body.t[i]!.toFixed(3))).toBe(true);
    }
    expect(piece.timeMinPlace).toBe(-3);
    expect(piece.timeMaxMant).toBe(19999);
  });

  it("scientific stamps: the resolution is the place of the last digit from digits and exponent (1.000020E+01: 1e-5), on both paths", () => {
    const text = '1.000000E+01,1,2\n1.000020E+01,1.5e-3,2E2\n1.000040E+01,"3",4\n';
    const piece = new CsvBodyParser(spec).parse(Buffer.from(text), 0, text.length, 1);
    expect(piece.rows).toBe(3);
    expect(piece.timeMinPlace).toBe(-5);
    expect(piece.timeMaxMant).toBe(1000040);
    expect(Array.from(piece.time!)).toEqual([10, 10.0002, 10.0004]);
    expect(Array.from(piece.channels[0]!)).toEqual([1, 0.0015, 3]);
  });

  it("columns grow when rows are shorter than the first guess (four bytes a field)", () => {
    const text = "0,1,2\n".repeat(5000);
    const piece = new CsvBodyParser(spec).parse(Buffer.from(text), 0, text.length, 1);
    expect(piece.rows).toBe(5000);
    expect(piece.channels[1]![4999]).toBe(2);
  });

  it("a bad cell after many plain rows is named by its own line and column", () => {
    const text = "0,1,2\n".repeat(300) + "0,1,x2\n";
    let e: unknown;
    try {
      new CsvBodyParser(spec).parse(Buffer.from(text), 0, text.length, 2);
    } catch (x) {
      e = x;
    }
    expect(e).toBeInstanceOf(InputError);
    expect((e as InputError).details).toMatchObject({ line: 302, column: 3 });
  });

  it("-0 stays negative zero, as Number('-0.0') does", () => {
    const text = "0,-0.000,0\n";
    const piece = new CsvBodyParser(spec).parse(Buffer.from(text), 0, text.length, 1);
    expect(Object.is(piece.channels[0]![0], -0)).toBe(true);
  });
});

// The worker runs built code (dist/read/csvParseWorker.js); under vitest the source reader would parse in
// its own thread, so these tests import the built reader.

describe("CSV read on the parse worker (built code)", () => {
  const dir = tempDir();
  for (const [name, tail] of [
    ["ends with a newline", "\n"],
    ["last line without newline", ""],
    ["CRLF", "\r\n"],
  ] as const) {
    it(`the worker's SHA-256 is the file's (${name}) and the columns equal this thread's`, async () => {
      const body = mixedBody(60000, 3);
      const text =
        "# rig 4, run 17\nt,a,b\n" +
        body.text
          .replace(/\n$/, "")
          .split("\n")
          .join(tail === "\r\n" ? "\r\n" : "\n") +
        tail;
      const file = join(dir, `w${name.length}.csv`);
      writeFileSync(file, text);
      const read = async (parseWorkers: number) => {
        const { openCsvTimeHistory } = (await import(
          resolve("dist/read/csvTimeHistory.js")
        )) as typeof import("../../src/read/csvTimeHistory.js");
        const src = await openCsvTimeHistory(file, { parseWorkers });
        const cols: number[][] = [[], []];
        const s = await src.read([0, 1], (ch, n) => ch.forEach((c, i) => cols[i]!.push(...c.subarray(0, n))));
        return { s, cols };
      };
      const inWorker = await read(1);
      const here = await read(0);
      // Reference: Node's crypto (OpenSSL SHA-256) over the whole file at once.
      const sha = createHash("sha256").update(readFileSync(file)).digest("hex");
      expect(inWorker.s.sha256).toBe(sha);
      expect(here.s.sha256).toBe(sha);
      expect(inWorker.s.frames).toBe(60000);
      expect(inWorker.cols).toEqual(here.cols);
    });
  }
  for (const [name, spell, wide] of [
    ["integer counts", (x: number) => String(Math.round(x * 1000)), false],
    ["%.17e", (x: number) => x.toExponential(17), true],
  ] as const) {
    it(`the SHA-256 on either thread (${name}: ${wide ? "many" : "few"} bytes a value, so the ${wide ? "reader" : "worker"} hashes)`, async () => {
      // csvParseWorker.ts hashes on the reader's thread when the first piece has more than
      // HASH_ON_READER_BYTES_PER_VALUE file bytes a selected value, else on the worker: both give the file's hash.
      const u = seeded(11);
      const rows = Array.from({ length: 80000 }, (_, i) => `${i},${spell(u() - 0.5)},${spell(u() - 0.5)}`);
      const text = "# rig 2\nt [ms],a,b\n" + rows.join("\n") + "\n";
      const file = join(dir, `hash-${wide ? "wide" : "narrow"}.csv`);
      writeFileSync(file, text);
      const perValue = Buffer.byteLength(text) / (rows.length * 2);
      expect(wide ? perValue > HASH_ON_READER_BYTES_PER_VALUE : perValue < HASH_ON_READER_BYTES_PER_VALUE).toBe(true);
      const { openCsvTimeHistory } = (await import(
        resolve("dist/read/csvTimeHistory.js")
      )) as typeof import("../../src/read/csvTimeHistory.js");
      const read = async (parseWorkers: number) => {
        const src = await openCsvTimeHistory(file, { parseWorkers });
        const cols: number[][] = [[], []];
        const s = await src.read([0, 1], (ch, n) => ch.forEach((c, i) => cols[i]!.push(...c.subarray(0, n))));
        return { s, cols };
      };
      const [w, h] = [await read(1), await read(0)];
      expect(w.s.sha256).toBe(createHash("sha256").update(readFileSync(file)).digest("hex"));
      expect(h.s.sha256).toBe(w.s.sha256);
      expect(w.cols).toEqual(h.cols);
    });
  }
  it("a comment line of nearly 1 MB, a bad cell far in, a line too long: the worker's hash, columns and messages are this thread's", async () => {
    // The reader hashes the worker's shared read buffers (csvParseWorker.ts), which come round many times here; a
    // read that ends no line (the line too long) makes no piece, and its bytes wait in the worker.
    const body = mixedBody(60000, 3);
    const lines = body.text.split("\n");
    lines.splice(20000, 0, "# " + "x".repeat(1_040_000));
    const file = join(dir, "long-comment.csv");
    writeFileSync(file, "t,a,b\n" + lines.join("\n"));
    const { openCsvTimeHistory } = (await import(
      resolve("dist/read/csvTimeHistory.js")
    )) as typeof import("../../src/read/csvTimeHistory.js");
    const read = async (parseWorkers: number) => {
      const src = await openCsvTimeHistory(file, { parseWorkers });
      const cols: number[][] = [[], []];
      const s = await src.read([0, 1], (ch, n) => ch.forEach((c, i) => cols[i]!.push(...c.subarray(0, n))));
      return { s, cols };
    };
    const inWorker = await read(1);
    const here = await read(0);
    expect(inWorker.s.sha256).toBe(createHash("sha256").update(readFileSync(file)).digest("hex"));
    expect(here.s.sha256).toBe(inWorker.s.sha256);
    expect(inWorker.cols).toEqual(here.cols);
    lines[50000] = "x,1,2";
    writeFileSync(file, "t,a,b\n" + lines.join("\n"));
    const message = async (parseWorkers: number) => {
      const src = await openCsvTimeHistory(file, { parseWorkers });
      return src
        .read([0, 1], () => undefined)
        .then(
          () => "read",
          (e: Error) => e.message,
        );
    };
    const [w, h] = [await message(1), await message(0)];
    expect(w).toMatch(/long-comment\.csv:50002:1 .*CSV_NOT_A_NUMBER/);
    expect(w).toBe(h);
    lines[50000] = "# " + "y".repeat(1_100_000);
    writeFileSync(file, "t,a,b\n" + lines.join("\n"));
    const [w2, h2] = [await message(1), await message(0)];
    expect(w2).toMatch(/long-comment\.csv:50002.*CSV_LINE_TOO_LONG/);
    expect(w2).toBe(h2);
  });
  it("a source that is opened but never read does not keep the process alive (its worker waits unref'd)", () => {
    const file = join(dir, "never-read.csv");
    writeFileSync(file, "t [s],a\n0,1\n0.5,2\n1,3\n");
    const script = `const m = await import(${JSON.stringify(pathToFileURL(resolve("dist/read/csvTimeHistory.js")).href)}); await m.openCsvTimeHistory(${JSON.stringify(file)}, { parseWorkers: 1 }); console.log("opened");`;
    const r = spawnSync("node", ["--input-type=module", "-e", script], { encoding: "utf8", timeout: 10000 });
    expect(r.stdout.trim()).toBe("opened");
    expect(r.status).toBe(0);
  });
  it("close() ends the waiting worker; a read after it parses in this thread", async () => {
    const file = join(dir, "closed.csv");
    writeFileSync(file, "t [s],a\n0,1\n0.5,2\n1,3\n");
    const { openCsvTimeHistory } = (await import(
      resolve("dist/read/csvTimeHistory.js")
    )) as typeof import("../../src/read/csvTimeHistory.js");
    const src = await openCsvTimeHistory(file, { parseWorkers: 1 });
    await src.close!();
    const got: number[] = [];
    const s = await src.read([0], (ch, n) => got.push(...ch[0]!.subarray(0, n)));
    expect(got).toEqual([1, 2, 3]);
    expect(s.sampleRateHz).toBe(2);
  });
});
