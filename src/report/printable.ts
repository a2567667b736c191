/**
 * Text that came from a file (a channel name, a profile title, a file name) made safe for a terminal:
 * every control character (C0, DEL, C1), line and paragraph separator and bidirectional override is
 * shown as a visible escape (`\n`, `\x1b`, `\u{202e}`). A title cannot then start a new line that
 * looks like a verdict, or hide text with ESC[8m, or reverse what follows it.
 */
// C0 and C1 controls and DEL (ECMA-48), U+2028/2029, and the bidi embeddings, overrides and isolates (Unicode UAX #9).
const UNSAFE = /[\u0000-\u001f\u007f-\u009f\u2028\u2029\u202a-\u202e\u2066-\u2069\u200e\u200f\u061c]/gu;
const NAMED: Record<string, string> = { "\n": "\\n", "\r": "\\r", "\t": "\\t" };

export function printable(text: string): string {
  return text.replace(
    UNSAFE,
    (c) =>
      NAMED[c] ??
      (c.charCodeAt(0) <= 0xff
        ? `\\x${c.charCodeAt(0).toString(16).padStart(2, "0")}`
        : `\\u{${c.charCodeAt(0).toString(16)}}`),
  );
}
