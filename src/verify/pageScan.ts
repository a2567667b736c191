/**
 * What a report page shows, read by parsing its tags the way an HTML parser splits them (WHATWG HTML,
 * 13.2.5 tokenization: tag open, attribute names case-insensitive, values double-, single- or unquoted,
 * comments, raw-text elements), not by a regular expression over one attribute order. `verify` uses it to
 * read the verdict the page shows and to refuse what psdgate never writes into a page: a script, an
 * event handler, a style attribute, an element that fetches or embeds, a style element psdgate did not write.
 */
export interface ScannedTag {
  name: string;
  attrs: Map<string, string>;
  /** Offset of the `<` in the page. */
  at: number;
  /** Offset just past the `>`. */
  end: number;
}

export interface ScannedPage {
  tags: ScannedTag[];
  /** The raw text of every <style> element, in order. */
  styles: string[];
  /** Set when the page cannot be split as psdgate writes pages (an unclosed tag, comment or raw-text element). */
  malformed?: string | undefined;
}

const RAW_TEXT = new Set([
  "style",
  "script",
  "textarea",
  "title",
  "xmp",
  "iframe",
  "noembed",
  "noframes",
  "noscript",
  "plaintext",
]);

function parseAttrs(src: string): Map<string, string> {
  const attrs = new Map<string, string>();
  let i = 0;
  while (i < src.length) {
    while (i < src.length && /[\s/]/.test(src[i]!)) i++;
    if (i >= src.length) break;
    let name = "";
    // The first character may be "=" (HTML: attribute name starts with it); a name then runs to space, /, > or =.
    do name += src[i++];
    while (i < src.length && !/[\s/=>]/.test(src[i]!));
    while (i < src.length && /\s/.test(src[i]!)) i++;
    let value = "";
    if (src[i] === "=") {
      i++;
      while (i < src.length && /\s/.test(src[i]!)) i++;
      const q = src[i];
      if (q === '"' || q === "'") {
        const close = src.indexOf(q, i + 1);
        value = src.slice(i + 1, close < 0 ? src.length : close);
        i = close < 0 ? src.length : close + 1;
      } else {
        const s = i;
        while (i < src.length && !/\s/.test(src[i]!)) i++;
        value = src.slice(s, i);
      }
    }
    const key = name.toLowerCase();
    if (!attrs.has(key)) attrs.set(key, decodeEntities(value));
  }
  return attrs;
}

const NAMED: Record<string, string> = { amp: "&", lt: "<", gt: ">", quot: '"', apos: "'", nbsp: "\u00a0" };

/** The entities psdgate writes, and numeric references: enough to compare an attribute's or a text's value. */
export function decodeEntities(s: string): string {
  return s.replace(/&(#x[0-9a-f]+|#\d+|[a-z]+);/gi, (m, e: string) => {
    if (e[0] === "#") {
      const cp = e[1] === "x" || e[1] === "X" ? parseInt(e.slice(2), 16) : parseInt(e.slice(1), 10);
      return cp > 0 && cp <= 0x10ffff ? String.fromCodePoint(cp) : "\ufffd";
    }
    return NAMED[e.toLowerCase()] ?? m;
  });
}

/** Split a page into its start tags (with attributes) and the text of its style elements. */
export function scanPage(html: string): ScannedPage {
  const tags: ScannedTag[] = [];
  const styles: string[] = [];
  let i = 0;
  for (;;) {
    const lt = html.indexOf("<", i);
    if (lt < 0) break;
    if (html.startsWith("<!--", lt)) {
      const close = html.indexOf("-->", lt + 4);
      if (close < 0) return { tags, styles, malformed: "a comment that is not closed" };
      i = close + 3;
      continue;
    }
    if (html[lt + 1] === "!" || html[lt + 1] === "?") {
      const close = html.indexOf(">", lt);
      if (close < 0) return { tags, styles, malformed: "a declaration that is not closed" };
      i = close + 1;
      continue;
    }
    const isEnd = html[lt + 1] === "/";
    const nameStart = lt + (isEnd ? 2 : 1);
    if (!/[a-z]/i.test(html[nameStart] ?? "")) {
      i = lt + 1;
      continue;
    }
    // A tag ends at the first ">" outside a quoted attribute value.
    let j = nameStart;
    let quote = "";
    for (; j < html.length; j++) {
      const c = html[j]!;
      if (quote) {
        if (c === quote) quote = "";
      } else if (c === '"' || c === "'") {
        // Quotes open a value only right after "=" (HTML), possibly after spaces.
        let k = j - 1;
        while (k > nameStart && /\s/.test(html[k]!)) k--;
        if (html[k] === "=") quote = c;
      } else if (c === ">") break;
    }
    if (j >= html.length) return { tags, styles, malformed: "a tag that is not closed" };
    const inner = html.slice(nameStart, j);
    const name = /^[^\s/>]+/.exec(inner)![0].toLowerCase();
    i = j + 1;
    if (isEnd) continue;
    tags.push({ name, attrs: parseAttrs(inner.slice(name.length)), at: lt, end: j + 1 });
    if (RAW_TEXT.has(name) || name === "template") {
      if (name === "template") continue;
      const re = new RegExp(`</${name}[\\s/>]`, "ig");
      re.lastIndex = i;
      const m = re.exec(html);
      if (!m) return { tags, styles, malformed: `a <${name}> element that is not closed` };
      if (name === "style") styles.push(html.slice(i, m.index));
      i = m.index;
    }
  }
  return { tags, styles };
}

/** Start tags and attributes psdgate never writes into a report page. */
const FORBIDDEN_TAGS = new Set([
  "details",
  "dialog",
  "slot",
  "marquee",
  "script",
  "link",
  "iframe",
  "frame",
  "frameset",
  "object",
  "embed",
  "base",
  "img",
  "image",
  "input",
  "form",
  "button",
  "video",
  "audio",
  "source",
  "track",
  "portal",
  "noscript",
  "foreignobject",
  "use",
  "a",
  "textarea",
  "select",
  "animate",
  "set",
  "animatemotion",
  "animatetransform",
]);

/** A relative link to a file in the same folder (encoded as encodeURI writes it), as a batch index writes. */
function isSiblingFile(href: string | undefined): boolean {
  return href !== undefined && /^[^:/\\?#]+\.html$/i.test(href) && !href.startsWith(".");
}

/** The first thing in a page that psdgate never writes, in words, or undefined. */
export function foreignContent(page: ScannedPage, opts: { links?: boolean } = {}): string | undefined {
  if (page.malformed) return page.malformed;
  // One template, the result's: content inside any other template is never rendered (a banner could hide there).
  const templates = page.tags.filter((t) => t.name === "template");
  if (templates.length !== 1 || templates[0]!.attrs.get("id") !== "psdgate-result")
    return `${templates.length} <template> elements (psdgate writes one, its result)`;
  for (const t of page.tags) {
    // Attributes that hide an element without any style: hidden, a popover (hidden until shown).
    if (t.attrs.has("hidden") || t.attrs.has("popover"))
      return `a ${t.attrs.has("hidden") ? "hidden" : "popover"} attribute on <${t.name}>`;
    // A batch index links its reports: <a href> to a file beside it (no scheme, no absolute or parent path), nothing
    // else.
    if (
      opts.links === true &&
      t.name === "a" &&
      isSiblingFile(t.attrs.get("href")) &&
      [...t.attrs.keys()].every((k) => k === "href")
    )
      continue;
    if (FORBIDDEN_TAGS.has(t.name)) return `a <${t.name}> element`;
    if (
      t.name === "meta" &&
      t.attrs.has("http-equiv") &&
      t.attrs.get("http-equiv")!.toLowerCase() !== "content-security-policy"
    )
      return `a <meta http-equiv="${t.attrs.get("http-equiv")}"> element`;
    for (const k of t.attrs.keys()) {
      if (k.startsWith("on")) return `an event handler (${k}) on <${t.name}>`;
      if (k === "style") return `a style attribute on <${t.name}>`;
      if (k === "href" || k === "xlink:href" || k === "src" || k === "srcset" || k === "action" || k === "formaction")
        return `a ${k} attribute on <${t.name}>`;
    }
  }
  return undefined;
}

export interface ShownVerdict {
  /** How many elements carry id="verdict". */
  count: number;
  /** The banner's data-verdict, its verdict class (pass, fail, inconclusive, none) and its word. */
  dataVerdict?: string | undefined;
  classVerdict?: string | undefined;
  word?: string | undefined;
}

const VERDICT_CLASSES = ["pass", "fail", "inconclusive", "none"];

/** The verdict banner as the page shows it: every element with id="verdict", and the one's attributes and word. */
export function shownVerdict(html: string, page: ScannedPage = scanPage(html)): ShownVerdict {
  const banners = page.tags.filter((t) => t.attrs.get("id") === "verdict");
  if (banners.length !== 1) return { count: banners.length };
  const b = banners[0]!;
  const classes = (b.attrs.get("class") ?? "").split(/\s+/).filter((c) => VERDICT_CLASSES.includes(c));
  const after = page.tags.filter((t) => t.at > b.at);
  const word = after.find((t) => t.name === "span" && (t.attrs.get("class") ?? "").split(/\s+/).includes("word"));
  const wordText = word ? decodeEntities(html.slice(word.end, html.indexOf("<", word.end))).trim() : undefined;
  return {
    count: 1,
    dataVerdict: b.attrs.get("data-verdict"),
    classVerdict: classes.length === 1 ? classes[0] : classes.join(" "),
    word: wordText,
  };
}
