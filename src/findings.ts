/**
 * A finding: a stable code and the numbers it rests on for programs to compare, and the sentence people
 * read, made from the same values. `values` holds each number the text states, under a plain name and
 * in the unit the text gives it (a share shown in percent is kept in percent, its key ending in
 * `Percent`); tests/findings.test.ts holds every code's values to its text.
 */
export interface Finding {
  code: string;
  values: Record<string, number>;
  text: string;
}

export function texts(fs: readonly Finding[]): string[] {
  return fs.map((f) => f.text);
}
