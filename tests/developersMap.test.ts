import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";

/** The rows of DEVELOPERS.md's "Where to find" table: file and the names it must declare. */
function rows(): { concept: string; file: string; names: string[] }[] {
  const md = readFileSync("DEVELOPERS.md", "utf8");
  const at = md.indexOf("## Where to find");
  const section = md.slice(at, md.indexOf("\n## ", at + 1));
  return section
    .split("\n")
    .filter((l) => /^\| .*`/.test(l))
    .map((l) => {
      const cells = l
        .replace(/\\\|/g, "¦")
        .split("|")
        .slice(1, -1)
        .map((c) => c.trim());
      return {
        concept: cells[0]!,
        file: cells[1]!.replace(/`/g, ""),
        names: [...cells[2]!.matchAll(/`([A-Za-z_$][\w$]*)`/g)].map((m) => m[1]!),
      };
    });
}

describe('DEVELOPERS.md\'s "Where to find" points at what is there', () => {
  it("names Welch's density, the chi-square bound, Wk, Miles' equation and the Bonferroni levels", () => {
    const concepts = rows()
      .map((r) => r.concept)
      .join("\n");
    for (const c of [/one-sided density/, /chi-square bound/, /Wk/, /Miles' equation/, /Bonferroni/])
      expect(concepts).toMatch(c);
  });
  it("each file exists and declares each name listed beside it", () => {
    const wrong: string[] = [];
    for (const r of rows()) {
      if (!existsSync(r.file)) {
        wrong.push(`${r.file}: no such file`);
        continue;
      }
      const text = readFileSync(r.file, "utf8");
      for (const n of r.names) {
        if (!new RegExp(`export (async )?(function|const|class|interface|type) ${n}\\b`).test(text))
          wrong.push(`${r.file}: ${n}`);
      }
    }
    expect(wrong).toEqual([]);
    expect(rows().length).toBeGreaterThan(10);
  });
});
