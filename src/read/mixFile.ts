import { createHash } from "node:crypto";
import { dirname, isAbsolute, join } from "node:path";
import { z } from "zod";
import { InputError } from "../errors.js";
import { plainDocument } from "./plainDocument.js";
import { readSmallText } from "./regularFile.js";

/**
 * A service-life mix for `psdgate derive --mix FILE` (YAML or JSON, psdgate's own keys): groups of field
 * recordings, each group standing for so many hours of the service life.
 *
 *   title: Brennick TX-4 van, shelf z      # optional: the derived profile's title
 *   groups:
 *     - name: highway
 *       hours: 1800                          # service hours this group stands for
 *       recordings: [tx4-highway.wav]        # paths relative to the mix file
 *     - name: gravel
 *       hours: 200
 *       recordings:
 *         - file: tx4-gravel.wav
 *           from: 2                          # optional window, s from the first sample
 *           to: 28
 *
 * The life is the sum of the groups' hours. Inside a group, the recordings share its hours in proportion
 * to their analysed durations. Unknown keys are refused, so a misspelt key is never silently dropped.
 */

export const MAX_MIX_BYTES = 256 << 10;

const name = z
  .string({ error: "a group name (text)" })
  .min(1, { message: "a non-empty group name" })
  .max(200, { message: "a group name of at most 200 characters" });
const seconds = (what: string) =>
  z
    .number({ error: `${what} (a number of seconds)` })
    .refine((v) => v >= 0 && Number.isFinite(v), { message: `${what}, a number of seconds >= 0` });
const Recording = z.union(
  [
    z.string({ error: "a recording path" }).min(1, { message: "a recording path" }),
    z.strictObject(
      {
        file: z.string({ error: "a recording path (text)" }).min(1),
        from: seconds("a start time").optional(),
        to: seconds("an end time").optional(),
      },
      { error: "a path, or a mapping with file (and optional from, to)" },
    ),
  ],
  { error: "a path, or a mapping with file (and optional from, to)" },
);

const MixSchema = z.strictObject(
  {
    title: z.string({ error: "a title (text)" }).min(1).max(200).optional(),
    groups: z
      .array(
        z.strictObject(
          {
            name,
            hours: z
              .number({ error: "service hours (a number above 0)" })
              .refine((v) => v > 0 && Number.isFinite(v), { message: "service hours above 0" }),
            recordings: z
              .array(Recording, { error: "a list of recordings" })
              .min(1, { message: "at least one recording" }),
          },
          { error: "a group: name, hours and recordings" },
        ),
        { error: "a list of groups" },
      )
      .min(1, { message: "at least one group" }),
  },
  { error: "a mapping with groups (and an optional title)" },
);

export interface MixRecording {
  /** Path as resolved against the mix file's folder. */
  file: string;
  fromS?: number | undefined;
  toS?: number | undefined;
}

export interface MixGroup {
  name: string;
  hours: number;
  recordings: MixRecording[];
}

export interface ServiceMix {
  file: string;
  sha256: string;
  title: string | undefined;
  groups: MixGroup[];
}

function keyPath(path: readonly PropertyKey[]): string {
  let s = "";
  for (const k of path) s += typeof k === "number" ? `[${k}]` : s === "" ? String(k) : `.${String(k)}`;
  return s === "" ? "(top level)" : s;
}

/** Validate a parsed mix document; the first problem names its key path. Paths are resolved against `baseDir`. */
export function parseServiceMix(doc: unknown, file: string, sha256: string, baseDir = dirname(file)): ServiceMix {
  const r = MixSchema.safeParse(doc);
  if (!r.success) {
    // An unknown key first: a misspelt key (hour for hours) also leaves the right one missing, and the misspelling is
    // the news.
    const issue = r.error.issues.find((i) => i.code === "unrecognized_keys") ?? r.error.issues[0]!;
    if (issue.code === "unrecognized_keys") {
      throw new InputError("MIX_INVALID", {
        file,
        keyPath: keyPath([...issue.path, issue.keys[0]!]),
        expected: "the keys title, groups (name, hours, recordings: file, from, to)",
        received: `unknown key "${issue.keys[0]}"`,
      });
    }
    let v: unknown = doc;
    for (const k of issue.path)
      v = v !== null && typeof v === "object" ? (v as Record<PropertyKey, unknown>)[k] : undefined;
    const received = v === undefined ? "nothing" : (JSON.stringify(v)?.slice(0, 40) ?? String(v));
    throw new InputError("MIX_INVALID", {
      file,
      keyPath: keyPath(issue.path),
      expected: issue.message.replace(/^Invalid input: expected /, ""),
      received,
    });
  }
  const names = new Set<string>();
  const groups = r.data.groups.map((g, gi) => {
    if (names.has(g.name))
      throw new InputError("MIX_INVALID", {
        file,
        keyPath: `groups[${gi}].name`,
        expected: "a name no other group has",
        received: JSON.stringify(g.name),
      });
    names.add(g.name);
    return {
      name: g.name,
      hours: g.hours,
      recordings: g.recordings.map((x, ri) => {
        const o = typeof x === "string" ? { file: x } : x;
        if (typeof x !== "string" && x.from !== undefined && x.to !== undefined && !(x.to > x.from)) {
          throw new InputError("MIX_INVALID", {
            file,
            keyPath: `groups[${gi}].recordings[${ri}].to`,
            expected: `an end after from (${x.from} s)`,
            received: String(x.to),
          });
        }
        return {
          file: isAbsolute(o.file) ? o.file : join(baseDir, o.file),
          fromS: "from" in o ? o.from : undefined,
          toS: "to" in o ? o.to : undefined,
        };
      }),
    };
  });
  return { file, sha256, title: r.data.title, groups };
}

/** Read a mix file: YAML (.yaml, .yml; core schema, no custom tags, aliases capped) or JSON. */
export async function loadServiceMix(file: string): Promise<ServiceMix> {
  const { text: body, bytes } = await readSmallText(file, {
    what: "a readable mix file",
    option: "mix",
    maxBytes: MAX_MIX_BYTES,
    tooLarge: "MIX_INVALID",
  });
  const sha = createHash("sha256").update(bytes).digest("hex");
  const doc = plainDocument(body, file, "MIX_SYNTAX", /\.json$/i.test(file), "MIX_INVALID");
  return parseServiceMix(doc, file, sha);
}
