import { z } from "zod";
import { InputError } from "../errors.js";
import { plainDocument } from "./plainDocument.js";
import { readSmallText } from "./regularFile.js";

/** Largest identity file read: a dozen short texts; 64 KiB is far beyond any real one. */
export const MAX_META_BYTES = 64 << 10;

/**
 * The identity of a test run, given with `--meta FILE` (YAML or JSON, psdgate's own keys): who ran
 * what, on which item, axis, fixture and sensor. Every key is optional text; unknown keys are refused
 * so that a misspelt key is not silently dropped from a signed record.
 */
const text = (what: string) => z.string({ error: `${what} (text)` }).min(1, { message: `${what} (non-empty text)` }).max(2000, { message: `${what} of at most 2000 characters` });
const isoDate = z.string({ error: "a calibration date YYYY-MM-DD (text)" }).regex(/^\d{4}-\d{2}-\d{2}$/, { message: "a calibration date YYYY-MM-DD" })
  .refine((s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s), { message: "a calendar date YYYY-MM-DD" });

const MetaSchema = z.strictObject({
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
}, { error: "a mapping of test-identity keys" });

export type TestMeta = z.infer<typeof MetaSchema>;

/** The keys in the order a report shows them, with their labels. */
export const META_LABELS: readonly (readonly [keyof TestMeta, string])[] = [
  ["testId", "Test id"], ["workOrder", "Work order"], ["item", "Item under test"], ["serialNumber", "Item serial number"],
  ["axis", "Axis"], ["fixture", "Fixture"], ["sensor", "Sensor"], ["sensorSerial", "Sensor serial number"],
  ["sensorCalibrated", "Sensor calibrated on"], ["operator", "Operator"], ["location", "Lab or site"], ["notes", "Notes"],
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
      throw new InputError("META_INVALID", { file, keyPath: issue.keys[0]!, expected: `one of the keys ${META_LABELS.map(([k]) => k).join(", ")}`, received: `unknown key "${issue.keys[0]}"` });
    }
    let v: unknown = doc;
    for (const k of issue.path) v = v !== null && typeof v === "object" ? (v as Record<PropertyKey, unknown>)[k] : undefined;
    const received = v === undefined ? "nothing" : JSON.stringify(v)?.slice(0, 40) ?? String(v);
    throw new InputError("META_INVALID", { file, keyPath: keyPath(issue.path), expected: issue.message.replace(/^Invalid input: expected /, ""), received });
  }
  return r.data;
}

async function readMetaText(file: string): Promise<string> {
  return (await readSmallText(file, { what: "a readable test-identity file", option: "meta", maxBytes: MAX_META_BYTES, tooLarge: "META_INVALID" })).text;
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
 * One recording's test identity in a batch: a meta file beside it (besideMetaNames) overrides the batch's
 * `--meta` key by key, so the lab states once what the batch shares and beside each recording what differs.
 */
export async function recordingMeta(recording: string, shared: TestMeta | undefined): Promise<{ meta: TestMeta | undefined; from: string | undefined }> {
  const { existsSync } = await import("node:fs");
  const file = besideMetaNames(recording).find((f) => existsSync(f));
  if (file === undefined) return { meta: shared, from: undefined };
  return { meta: { ...shared, ...(await loadTestMeta(file)) }, from: file };
}
