import path from "node:path";
import Papa from "papaparse";
import { z } from "zod";
import { InputError, quoted } from "../errors.js";
import { KEY_GIVEN_TWICE, plainDocument } from "./plainDocument.js";
import { readSmallText } from "./regularFile.js";

/** Largest identity file read: a dozen short texts; 64 KiB is far beyond any real one. */
export const MAX_META_BYTES = 64 << 10;

/**
 * The identity of a test run, given with `--meta FILE` (YAML or JSON, psdgate's own keys): who ran
 * what, on which item, axis, fixture and sensor. Every key is optional text; unknown keys are refused
 * so that a misspelt key is not silently dropped from a signed record.
 */
const text = (what: string) =>
  z
    .string({ error: `${what} (text)` })
    .min(1, { message: `${what} (non-empty text)` })
    .max(2000, { message: `${what} of at most 2000 characters` });
const isoDate = z
  .string({ error: "a calibration date YYYY-MM-DD (text)" })
  .regex(/^\d{4}-\d{2}-\d{2}$/, { message: "a calibration date YYYY-MM-DD" })
  .refine(
    (s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s),
    { message: "a calendar date YYYY-MM-DD" },
  );

const MetaSchema = z.strictObject(
  {
    testId: text("a test id").optional(),
    workOrder: text("a work-order number").optional(),
    item: text("the item under test").optional(),
    serialNumber: text("the item's serial number").optional(),
    axis: text("the test axis").optional(),
    fixture: text("the fixture").optional(),
    sensor: text("the sensor (model)").optional(),
    sensorSerial: text("the sensor's serial number").optional(),
    sensorCalibrated: isoDate.optional(),
    operator: text("the operator").optional(),
    location: text("the lab or site").optional(),
    notes: text("notes").optional(),
  },
  { error: "a mapping of test-identity keys" },
);

export type TestMeta = z.infer<typeof MetaSchema>;

/** The keys in the order a report shows them, with their labels. */
export const META_LABELS: readonly (readonly [keyof TestMeta, string])[] = [
  ["testId", "Test id"],
  ["workOrder", "Work order"],
  ["item", "Item under test"],
  ["serialNumber", "Item serial number"],
  ["axis", "Axis"],
  ["fixture", "Fixture"],
  ["sensor", "Sensor"],
  ["sensorSerial", "Sensor serial number"],
  ["sensorCalibrated", "Sensor calibrated on"],
  ["operator", "Operator"],
  ["location", "Lab or site"],
  ["notes", "Notes"],
];

function keyPath(path: readonly PropertyKey[]): string {
  let s = "";
  for (const k of path) s += typeof k === "number" ? `[${k}]` : s === "" ? String(k) : `.${String(k)}`;
  return s === "" ? "(top level)" : s;
}

/** Validate a parsed test-identity document; the first problem names its key. */
export function parseTestMeta(doc: unknown, file: string): TestMeta {
  const r = MetaSchema.safeParse(doc);
  if (!r.success) {
    const issue = r.error.issues[0]!;
    if (issue.code === "unrecognized_keys") {
      throw new InputError("META_INVALID", {
        file,
        keyPath: issue.keys[0]!,
        expected: `one of the keys ${META_LABELS.map(([k]) => k).join(", ")}`,
        received: `unknown key "${issue.keys[0]}"`,
      });
    }
    let v: unknown = doc;
    for (const k of issue.path)
      v = v !== null && typeof v === "object" ? (v as Record<PropertyKey, unknown>)[k] : undefined;
    const received =
      v === undefined
        ? "nothing"
        : typeof v === "number" && !Number.isFinite(v)
          ? String(v)
          : (JSON.stringify(v)?.slice(0, 40) ?? String(v));
    throw new InputError("META_INVALID", {
      file,
      keyPath: keyPath(issue.path),
      expected: issue.message.replace(/^Invalid input: expected /, ""),
      received,
    });
  }
  return r.data;
}

async function readMetaText(file: string): Promise<string> {
  return (
    await readSmallText(file, {
      what: "a readable test-identity file",
      option: "meta",
      maxBytes: MAX_META_BYTES,
      tooLarge: "META_INVALID",
    })
  ).text;
}

/** Read `--meta FILE`: YAML (.yaml, .yml; core schema, no custom tags, aliases capped) or JSON. */
export async function loadTestMeta(file: string): Promise<TestMeta> {
  const body = await readMetaText(file);
  const doc = plainDocument(body, file, "META_SYNTAX", !/\.ya?ml$/i.test(file), "META_INVALID");
  return parseTestMeta(doc, file);
}

/** The meta files psdgate looks for beside a recording (`run1.wav` → `run1.meta.yaml`, `.meta.yml`, `.meta.json`). */
export function besideMetaNames(recording: string): string[] {
  const stem = recording.replace(/\.[^./\\]*$/, "");
  return [".meta.yaml", ".meta.yml", ".meta.json"].map((x) => stem + x);
}

/**
 * One recording's test identity in a batch, key by key: the batch's `--meta`, then its row of the
 * `--meta-table` (loadMetaTable), then a meta file beside it (besideMetaNames). So the lab states once
 * what the batch shares, and per recording what differs.
 */
export async function recordingMeta(
  recording: string,
  shared: TestMeta | undefined,
  row?: MetaTableRow,
): Promise<{ meta: TestMeta | undefined; from: string | undefined; file: string | undefined }> {
  const { existsSync } = await import("node:fs");
  const file = besideMetaNames(recording).find((f) => existsSync(f));
  const base = row ? { ...shared, ...row.meta } : shared;
  const from = [row?.table, file].filter((x): x is string => x !== undefined).join(" and ") || undefined;
  if (file === undefined) return { meta: base, from, file };
  return { meta: { ...base, ...(await loadTestMeta(file)) }, from, file };
}

/** Largest meta table read: thousands of recordings of a dozen short keys. */
export const MAX_META_TABLE_BYTES = 4 << 20;

/** One row of a meta table: the recording as the table names it, its identity, and where the row stands. */
export interface MetaTableRow {
  name: string;
  meta: TestMeta;
  /** `FILE line N` (CSV) or `FILE key NAME` (YAML, JSON): for messages and the batch index. */
  from: string;
  /** The table file itself. */
  table: string;
  line?: number | undefined;
}

/**
 * `check --meta-table FILE`: per recording its test identity, as the other form beside RECORDING.meta.yaml.
 * - CSV (.csv): a header `recording,KEY,KEY...` (KEY one of the --meta keys), then one row per recording;
 *   an empty cell leaves that key unset. Fields quoted as RFC 4180 says.
 * - YAML or JSON: a mapping from each recording to a mapping of --meta keys.
 * A recording is named by its path as given on the command line or by its file name alone.
 */
export async function loadMetaTable(file: string): Promise<MetaTableRow[]> {
  const { text: body } = await readSmallText(file, {
    what: "a readable meta table",
    option: "metaTable",
    maxBytes: MAX_META_TABLE_BYTES,
    tooLarge: "META_INVALID",
  });
  if (/\.csv$/i.test(file)) return csvMetaTable(body, file);
  let doc: unknown;
  try {
    // JSON too goes through the YAML reader, which refuses a key given twice (JSON.parse keeps the last).
    doc = plainDocument(body, file, "META_SYNTAX", false, "META_INVALID");
  } catch (e) {
    if (e instanceof InputError && e.details.received === KEY_GIVEN_TWICE) {
      throw new InputError("META_TABLE_DUPLICATE", {
        file,
        line: e.details.line,
        column: e.details.column,
        expected: "each recording named once",
        received: "a recording named twice",
      });
    }
    throw e;
  }
  if (doc === null || typeof doc !== "object" || Array.isArray(doc)) {
    throw new InputError("META_INVALID", {
      file,
      expected: "a mapping from each recording's file name to its test identity (testId: ..., ...)",
      received: Array.isArray(doc) ? "a list" : (JSON.stringify(doc)?.slice(0, 40) ?? "nothing"),
    });
  }
  return Object.entries(doc as Record<string, unknown>).map(([name, m]) => {
    let meta: TestMeta;
    try {
      meta = parseTestMeta(m, file);
    } catch (e) {
      if (e instanceof InputError)
        throw new InputError(e.code, {
          ...e.details,
          keyPath: e.details.keyPath && e.details.keyPath !== "(top level)" ? `${name}.${e.details.keyPath}` : name,
        });
      throw e;
    }
    return { name, meta, from: `${file} key ${name}`, table: file };
  });
}

function csvMetaTable(body: string, file: string): MetaTableRow[] {
  const keys = META_LABELS.map(([k]) => k as string);
  const rows: { cells: string[]; line: number }[] = [];
  let line = 1;
  let at = 0;
  const text = body.replace(/^\uFEFF/, "");
  Papa.parse<string[]>(text, {
    header: false,
    skipEmptyLines: "greedy",
    step: (r) => {
      const end = r.meta.cursor;
      // The row starts after any blank lines skipped before it.
      let start = at;
      while (start < end && (text[start] === "\n" || text[start] === "\r")) {
        if (text[start] === "\n") line++;
        start++;
      }
      rows.push({ cells: r.data, line });
      for (let i = start; i < end; i++) if (text[i] === "\n") line++;
      at = end;
    },
  });
  const head = rows.shift();
  if (head?.cells[0]?.trim().toLowerCase() !== "recording") {
    throw new InputError("META_INVALID", {
      file,
      line: head?.line ?? 1,
      column: 1,
      expected: `a header starting "recording", then test-identity keys (${keys.join(", ")})`,
      received: JSON.stringify(head?.cells[0] ?? "")?.slice(0, 40),
    });
  }
  const columns = head.cells.map((c) => c.trim());
  columns.slice(1).forEach((c, i) => {
    if (!keys.includes(c) || columns.indexOf(c) !== i + 1) {
      throw new InputError("META_INVALID", {
        file,
        line: head.line,
        column: i + 2,
        expected: `each of the keys ${keys.join(", ")} at most once`,
        received: JSON.stringify(c).slice(0, 40),
      });
    }
  });
  return rows.map(({ cells, line: l }) => {
    const name = cells[0]?.trim() ?? "";
    if (name === "")
      throw new InputError("META_INVALID", {
        file,
        line: l,
        column: 1,
        expected: "the recording's file name",
        received: "an empty field",
      });
    if (cells.length > columns.length)
      throw new InputError("META_INVALID", {
        file,
        line: l,
        column: columns.length + 1,
        expected: `${columns.length} fields as the header has`,
        received: `${cells.length}`,
      });
    const doc: Record<string, string> = {};
    columns.forEach((k, i) => {
      const v = cells[i]?.trim() ?? "";
      if (i > 0 && v !== "") doc[k] = v;
    });
    let meta: TestMeta;
    try {
      meta = parseTestMeta(doc, file);
    } catch (e) {
      if (e instanceof InputError)
        throw new InputError(e.code, {
          ...e.details,
          line: l,
          column: columns.indexOf(e.details.keyPath ?? "") + 1 || undefined,
        });
      throw e;
    }
    return { name, meta, from: `${file} line ${l}`, table: file, line: l };
  });
}

/**
 * Each recording of the batch to its table row. A row that names no recording of the batch, a name that
 * fits two of them, and a recording named by two rows are errors: a test id is never put on the wrong run.
 */
export function matchMetaTable(rows: MetaTableRow[], recordings: string[], file: string): Map<string, MetaTableRow> {
  const { basename, resolve } = path;
  const out = new Map<string, MetaTableRow>();
  for (const row of rows) {
    const byPath = recordings.filter((f) => f === row.name || resolve(f) === resolve(row.name));
    const hits =
      byPath.length > 0 ? byPath : /[\\/]/.test(row.name) ? [] : recordings.filter((f) => basename(f) === row.name);
    const where = { file, line: row.line, keyPath: row.line === undefined ? row.name : undefined };
    if (hits.length === 0) {
      throw new InputError("META_TABLE_UNKNOWN", {
        ...where,
        expected: "a recording of this batch (its path as given, or its file name)",
        received: quoted(row.name),
      });
    }
    if (hits.length > 1) {
      throw new InputError("META_TABLE_AMBIGUOUS", {
        ...where,
        expected: "a name that fits one recording of the batch",
        received: `${quoted(row.name)}, which fits ${hits.length}: ${hits.slice(0, 3).join(", ")}`,
        hint: "name it by its path",
      });
    }
    const before = out.get(hits[0]!);
    if (before !== undefined) {
      throw new InputError("META_TABLE_DUPLICATE", {
        ...where,
        expected: "each recording named once",
        received: `${quoted(hits[0]!)} again (first at ${before.from})`,
      });
    }
    out.set(hits[0]!, row);
  }
  return out;
}
