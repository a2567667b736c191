import { RESULT_PLACEHOLDER } from "../report/embeddedResult.js";
import type { TestMeta } from "../read/testMeta.js";
import type { ReportContext } from "../report/reportPage.js";

/**
 * The page a record's re-run renders, against the page it holds. The digests tie a page to its embedded result,
 * but a forger who edits the page's words and figures and recomputes both digests passes them; the re-run then
 * reproduces the embedded result, not the page. Every report page is a pure function of its typed result, the
 * version, the time it was made and its identity (`--meta`, the options given), all recorded in the result: so
 * verify renders the page again from the re-run with the same function the command used and compares the two,
 * the embedded result left out of both (it is compared number by number, within the tolerance, instead).
 */

/** The page with its embedded result left out: what the page digest covers. */
export function pageAround(html: string): string {
  return html.replace(
    /<template id="psdgate-result" data-sha256="[0-9a-f]{64}">[\s\S]*?<\/template>/,
    RESULT_PLACEHOLDER,
  );
}

/** What a record carries to render its page again: when it was made, its identity and its options as given. */
export function recordedContext(doc: {
  created?: string;
  meta?: TestMeta | null;
  given?: string[];
  rerun?: Record<string, unknown> | null;
}): Omit<ReportContext, "version" | "when"> & { when: Date } {
  return {
    when: new Date(doc.created ?? NaN),
    meta: doc.meta ?? undefined,
    given: doc.given ?? [],
    rerun: doc.rerun ?? undefined,
  };
}

/**
 * A re-run's typed result with each input's path as the record names it: verify may have found an input
 * elsewhere (beside the report, or given), and the page shows the path it was made from. Every string property
 * named `file` that holds a path found is replaced, in place.
 */
export function asRecorded<T>(value: T, paths: ReadonlyMap<string, string>): T {
  const seen = new Set<object>();
  const walk = (o: unknown): void => {
    if (o === null || typeof o !== "object" || seen.has(o) || ArrayBuffer.isView(o)) return;
    seen.add(o);
    for (const [k, v] of Object.entries(o)) {
      if (k === "file" && typeof v === "string" && paths.has(v)) (o as Record<string, unknown>)[k] = paths.get(v);
      else walk(v);
    }
  };
  walk(value);
  return value;
}

/** The words of one line of a page, its tags left out, cut to `n` characters. */
function words(line: string | undefined, n = 100): string {
  const t = (line ?? "")
    .replace(/<[^>]*>/g, " ")
    .replace(/&lt;/g, "<")
    .replace(/&gt;/g, ">")
    .replace(/&quot;/g, '"')
    .replace(/&#39;/g, "'")
    .replace(/&amp;/g, "&")
    .replace(/\s+/g, " ")
    .trim();
  return t.length > n ? `${t.slice(0, n - 1)}…` : t;
}

/** The page held against the page rendered: ok, or the first line that differs, in words. */
export function comparePages(held: string, rendered: string): { ok: boolean; text: string } {
  const a = pageAround(held).split("\n");
  const b = pageAround(rendered).split("\n");
  if (a.length === b.length && a.every((l, i) => l === b[i]))
    return { ok: true, text: "the page is the one its re-run renders, word for word and figure for figure" };
  let i = 0;
  while (i < a.length && i < b.length && a[i] === b[i]) i++;
  const shows = words(a[i]);
  const renders = words(b[i]);
  if (shows === renders) {
    const raw = (a[i] ?? "").trim();
    return {
      ok: false,
      text: `the page differs from the one its re-run renders in its markup at line ${i + 1}: "${raw.length > 100 ? `${raw.slice(0, 99)}…` : raw}"`,
    };
  }
  return {
    ok: false,
    text: `the page differs from the one its re-run renders, from line ${i + 1}: the page shows "${shows}", the re-run renders "${renders}"`,
  };
}
