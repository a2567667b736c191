/**
 * One field of a CSV file psdgate writes, safe for any reader:
 * - quoted per RFC 4180 (sec. 2, rules 6 and 7) when it holds a comma, a double quote, CR or LF,
 *   with each double quote doubled: `ax, left` → `"ax, left"`;
 * - guarded against formula injection: a text field that starts with `=`, `+`, `-`, `@`, a tab or
 *   CR would be run as a formula by a spreadsheet, so it gets a leading apostrophe, which spreadsheets
 *   show as text (OWASP "CSV Injection", common practice): `=SUM(A1)` → `'=SUM(A1)`.
 * Numbers are written as they are (a negative number is not a formula).
 */
export function csvField(text: string): string {
  const guarded = /^[=+\-@\t\r]/.test(text) ? `'${text}` : text;
  return /[",\r\n]/.test(guarded) ? `"${guarded.replace(/"/g, '""')}"` : guarded;
}
