import { isScalar, parseDocument, visit, YAMLParseError } from "yaml";
import { InputError, type ErrorCode } from "../errors.js";

/**
 * The one strict reader of psdgate's small settings files (profiles, --meta, mix files): YAML (the 1.2
 * core schema, warnings silent) or JSON, as plain data. The same rules for every kind of file:
 * - nesting at most `maxDepth` deep, checked on the text before any parser runs (a 5000-deep JSON or YAML
 *   flow collection would overflow a recursive parser's stack) and on the parsed document;
 * - no custom or language tags (`!!js/function`, `!foo`): refused, not resolved;
 * - numbers are decimal: YAML's hexadecimal, octal and binary integers (`0x14`, `0o17`, `0b1`) are refused
 *   (a mix file's `hours: 0x10` is no more a number of hours than a profile's `hz: 0x14` is a frequency);
 * - aliases capped at 100 (yaml's maxAliasCount), duplicate keys refused (in JSON too: JSON.parse keeps the last).
 * A syntax problem is `codes.syntax` with its line and column; a non-decimal number `codes.invalid`; too
 * deep `codes.tooDeep`.
 */
export interface DocumentCodes {
  syntax: ErrorCode;
  invalid: ErrorCode;
  tooDeep: ErrorCode;
}

/**
 * Deepest nesting of lists and mappings a settings file may have; the formats need 4 at most (groups[i].recordings[j]).
 */
export const MAX_DOCUMENT_DEPTH = 32;

function place(text: string, at: number): { line: number; column: number } {
  const before = text.slice(0, at);
  return { line: before.split("\n").length, column: at - before.lastIndexOf("\n") };
}

function quotedShort(s: string): string {
  return JSON.stringify(s.length > 40 ? `${s.slice(0, 40)}…` : s);
}

/** Depth of [ and { outside quoted strings: exact for JSON, and for YAML's flow collections. */
function checkBracketDepth(text: string, file: string, yaml: boolean, code: ErrorCode, maxDepth: number): void {
  let depth = 0;
  let quote = "";
  for (let i = 0; i < text.length; i++) {
    const c = text[i]!;
    if (quote !== "") {
      if (c === "\\" && quote === '"') i++;
      else if (c === quote) quote = "";
      continue;
    }
    // In YAML a quote opens a string only where a value starts (`it's` in a plain title does not).
    const valueStart = !yaml || i === 0 || /[\s[{,:]/.test(text[i - 1]!);
    if ((c === '"' || (c === "'" && yaml)) && valueStart) quote = c;
    else if (c === "#" && yaml && (i === 0 || /\s/.test(text[i - 1]!))) {
      const nl = text.indexOf("\n", i);
      i = nl < 0 ? text.length : nl;
    } else if (c === "[" || c === "{") {
      if (++depth > maxDepth)
        throw new InputError(code, {
          file,
          ...place(text, i),
          expected: `nesting at most ${maxDepth} deep`,
          received: `more than ${maxDepth} levels`,
        });
    } else if (c === "]" || c === "}") depth = Math.max(0, depth - 1);
  }
}

/** Depth of the parsed document, walked without recursion (YAML block nesting is not bracketed). */
function checkDocumentDepth(doc: unknown, file: string, code: ErrorCode, maxDepth: number): void {
  const stack: [unknown, number][] = [[doc, 0]];
  while (stack.length > 0) {
    const [v, d] = stack.pop()!;
    if (v === null || typeof v !== "object") continue;
    if (d >= maxDepth)
      throw new InputError(code, {
        file,
        expected: `nesting at most ${maxDepth} deep`,
        received: `more than ${maxDepth} levels`,
      });
    for (const x of Object.values(v as object)) stack.push([x, d + 1]);
  }
}

function parseJson(text: string, file: string, code: ErrorCode): unknown {
  let doc: unknown;
  try {
    doc = JSON.parse(text);
  } catch (e) {
    const msg = (e as Error).message;
    // V8 gives either "at position N" or a quoted snippet around an unexpected token.
    let at = /position (\d+)/.exec(msg) ? Number(/position (\d+)/.exec(msg)![1]) : -1;
    const tok = /Unexpected token '(.)', (?:\.\.\.)?"([\s\S]*?)"(?:\.\.\.)? is not valid JSON/.exec(msg);
    if (at < 0 && tok) {
      const i = text.indexOf(tok[2]!);
      if (i >= 0) at = i + tok[2]!.indexOf(tok[1]!);
    }
    if (at < 0 && /Unexpected end/.test(msg)) at = text.length;
    const where = at >= 0 ? place(text, at) : { line: undefined, column: undefined };
    throw new InputError(code, {
      file,
      ...where,
      expected: "valid JSON",
      received: msg.replace(/ in JSON at position \d+.*$/, "").replace(/, (\.\.\.)?"[\s\S]*$/, ""),
    });
  }
  const twice = secondKey(text);
  if (twice >= 0)
    throw new InputError(code, { file, ...place(text, twice), expected: "valid JSON", received: KEY_GIVEN_TWICE });
  return doc;
}

/**
 * Where a key comes a second time in one mapping of a valid JSON text, or -1: JSON.parse keeps the last silently
 * (a profile's second "units" would win), where the YAML reader refuses it. Keys compare as parsed ("\u0061" is "a").
 */
function secondKey(text: string): number {
  const stack: { keys: Set<string> | undefined; expectKey: boolean }[] = [];
  for (let i = 0; i < text.length; i++) {
    const c = text[i]!;
    if (c === "{") stack.push({ keys: new Set(), expectKey: true });
    else if (c === "[") stack.push({ keys: undefined, expectKey: false });
    else if (c === "}" || c === "]") stack.pop();
    else if (c === ",") {
      const top = stack[stack.length - 1];
      if (top?.keys) top.expectKey = true;
    } else if (c === '"') {
      const start = i;
      for (i++; text[i] !== '"'; i++) if (text[i] === "\\") i++;
      const top = stack[stack.length - 1];
      if (top?.keys && top.expectKey) {
        const key = JSON.parse(text.slice(start, i + 1)) as string;
        if (top.keys.has(key)) return start;
        top.keys.add(key);
        top.expectKey = false;
      }
    }
  }
  return -1;
}

/** What a YAML syntax error says of a key given twice in one mapping (a meta table names it in its own words). */
export const KEY_GIVEN_TWICE = "a key given twice in one mapping";

/** The tags a plain YAML value may carry: the core schema's text, number, boolean and null (with or without `!!`). */
const PLAIN_TAGS = new Set(["str", "int", "float", "bool", "null"].map((t) => `tag:yaml.org,2002:${t}`));

function parseYaml(text: string, file: string, codes: DocumentCodes): unknown {
  const doc = parseDocument(text, { logLevel: "silent", prettyErrors: true, uniqueKeys: true });
  const first = doc.errors[0];
  if (first) {
    const pos = first instanceof YAMLParseError ? first.linePos?.[0] : undefined;
    throw new InputError(codes.syntax, {
      file,
      line: pos?.line,
      column: pos?.col,
      expected: "valid YAML",
      received:
        first.code === "DUPLICATE_KEY"
          ? KEY_GIVEN_TWICE
          : first.message.split("\n")[0]!.replace(/ at line \d+, column \d+:?$/, ""),
    });
  }
  const tagWarning = doc.warnings.find((w) => w.code === "TAG_RESOLVE_FAILED");
  if (tagWarning) {
    const pos = tagWarning.linePos?.[0];
    throw new InputError(codes.syntax, {
      file,
      line: pos?.line,
      column: pos?.col,
      expected: "plain YAML values (no custom tags)",
      received: quotedShort(tagWarning.message.split("\n")[0]!.replace(/ at line \d+, column \d+:?$/, "")),
    });
  }
  let bad: { format: string; at: number } | undefined;
  let tagged: { tag: string; at: number } | undefined;
  visit(doc, {
    Scalar(_key, node) {
      // A tag that makes a value other than text, a number, true/false or null (`!!binary`, `!!timestamp`).
      if (isScalar(node) && node.tag !== undefined && !PLAIN_TAGS.has(node.tag) && tagged === undefined)
        tagged = { tag: node.tag, at: node.range?.[0] ?? 0 };
      if (
        isScalar(node) &&
        (node.format === "HEX" || node.format === "OCT" || node.format === "BIN") &&
        bad === undefined
      )
        bad = { format: node.format, at: node.range?.[0] ?? 0 };
    },
  });
  if (tagged) {
    throw new InputError(codes.syntax, {
      file,
      ...place(text, tagged.at),
      expected: "plain YAML values (text, numbers, true/false, null; no tags)",
      received: `a value tagged ${quotedShort(tagged.tag.replace(/^tag:yaml\.org,2002:/, "!!"))}`,
    });
  }
  if (bad) {
    throw new InputError(codes.invalid, {
      file,
      ...place(text, bad.at),
      expected: "a decimal number",
      received: `a ${bad.format === "HEX" ? "hexadecimal" : bad.format === "OCT" ? "octal" : "binary"} number ${quotedShort(text.slice(bad.at).split(/[\s,\]}]/)[0]!)}`,
    });
  }
  try {
    return doc.toJS({ maxAliasCount: 100 });
  } catch (e) {
    throw new InputError(codes.syntax, { file, expected: "valid YAML", received: (e as Error).message.split("\n")[0] });
  }
}

/** A settings file's text as plain data, by the rules above: YAML, or JSON when `json` (default: a .json name). */
export function strictDocument(
  text: string,
  file: string,
  codes: DocumentCodes,
  json = /\.json$/i.test(file),
  maxDepth = MAX_DOCUMENT_DEPTH,
): unknown {
  checkBracketDepth(text, file, !json, codes.tooDeep, maxDepth);
  const doc = json ? parseJson(text, file, codes.syntax) : parseYaml(text, file, codes);
  checkDocumentDepth(doc, file, codes.tooDeep, maxDepth);
  return doc;
}

/** A --meta or mix file: strictDocument with one code for syntax and another for a value or nesting it refuses. */
export function plainDocument(
  body: string,
  file: string,
  code: ErrorCode,
  json = /\.json$/i.test(file),
  invalid: ErrorCode = code,
): unknown {
  return strictDocument(body, file, { syntax: code, invalid, tooDeep: invalid }, json);
}
