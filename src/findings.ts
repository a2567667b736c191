/** A finding: a stable code for programs to compare, and the sentence people read, made from the same values. */
export interface Finding {
  code: string;
  text: string;
}

export function texts(fs: readonly Finding[]): string[] {
  return fs.map((f) => f.text);
}
