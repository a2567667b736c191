import { createHash } from "node:crypto";

/**
 * The machine-readable result inside an HTML report. It sits in a <template> element: the HTML parser
 * keeps a template's content as an inert fragment that is never rendered, never runs and loads
 * nothing, so it needs no exception in the report's Content-Security-Policy (which forbids scripts
 * outright); a <script type="application/json"> data block would not run either, but a page with no
 * <script> element at all is simpler to audit. The JSON text is HTML-escaped (& < >) inside it.
 *
 * Two SHA-256 digests tie the parts together: `page.sha256` inside the JSON covers the whole page with
 * the template's content left out, and the template's `data-sha256` covers the JSON text (UTF-8).
 * An edit to the page or to the result is found; a forger who recomputes both is not (this is an
 * integrity check, not a signature): `psdgate verify` therefore also re-runs the analysis and renders the
 * page again from it (verify/renderedPage.ts).
 */
export const RESULT_FORMAT = "psdgate-report/1";
const OPEN = '<template id="psdgate-result"';
const EMPTY = `${OPEN}></template>`;

export function sha256Hex(text: string): string {
  return createHash("sha256").update(text, "utf8").digest("hex");
}

/** The placeholder a page carries where its result goes. */
export const RESULT_PLACEHOLDER = EMPTY;

function escapeText(s: string): string {
  return s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;");
}
function unescapeText(s: string): string {
  return s.replace(/&lt;/g, "<").replace(/&gt;/g, ">").replace(/&amp;/g, "&");
}

/** Put `result` into a page that contains RESULT_PLACEHOLDER once. */
export function embedResult(pageWithPlaceholder: string, result: Record<string, unknown>): string {
  const doc = { format: RESULT_FORMAT, ...result, page: { sha256: sha256Hex(pageWithPlaceholder) } };
  const json = JSON.stringify(doc);
  return pageWithPlaceholder.replace(EMPTY, `${OPEN} data-sha256="${sha256Hex(json)}">${escapeText(json)}</template>`);
}

export interface ExtractedResult {
  /** The parsed result, when the block was found and its JSON parsed. */
  doc?: Record<string, unknown> | undefined;
  /** The block was found. */
  found: boolean;
  /** The JSON text matches the block's digest. */
  resultIntact: boolean;
  /** The page around the block matches the digest recorded in the result. */
  pageIntact: boolean;
}

/** Read the result back out of a report and check both digests. */
export function extractResult(html: string): ExtractedResult {
  const m = /<template id="psdgate-result" data-sha256="([0-9a-f]{64})">([\s\S]*?)<\/template>/.exec(html);
  if (!m) return { found: false, resultIntact: false, pageIntact: false };
  const json = unescapeText(m[2]!);
  const resultIntact = sha256Hex(json) === m[1];
  let doc: Record<string, unknown> | undefined;
  try {
    doc = JSON.parse(json) as Record<string, unknown>;
  } catch {
    return { found: true, resultIntact: false, pageIntact: false };
  }
  const page = html.slice(0, m.index) + EMPTY + html.slice(m.index + m[0].length);
  const pageIntact = sha256Hex(page) === (doc.page as { sha256?: string } | undefined)?.sha256;
  return { doc, found: true, resultIntact, pageIntact };
}
