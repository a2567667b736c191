import { readdirSync, readFileSync, statSync } from "node:fs";
import { join, relative, resolve } from "node:path";
import ts from "typescript";
import { describe, expect, it } from "vitest";

/**
 * No function in src/ is longer than MAX_LINES (issue #23: a function of a few hundred lines hides its parts).
 * Measured with the TypeScript compiler's own parse: every function declaration, method, constructor,
 * accessor, function expression and arrow function with a body, from its first token (its doc comment left
 * out) to its closing brace, nested functions counted within their parent as well as on their own.
 */
const MAX_LINES = 120;

const SRC = resolve("src");

function files(dir: string): string[] {
  return readdirSync(dir).flatMap((f) => {
    const p = join(dir, f);
    return statSync(p).isDirectory() ? files(p) : p.endsWith(".ts") && !p.endsWith(".d.ts") ? [p] : [];
  });
}

interface FunctionLength {
  /** "src/dir/file.ts name": the function's own name, else the name it is bound to, else "<parent> (anonymous)". */
  key: string;
  lines: number;
  line: number;
}

/** Every function with a body in one source text, with its length in lines. */
function functionLengths(file: string, text: string): FunctionLength[] {
  const sf = ts.createSourceFile(file, text, ts.ScriptTarget.Latest, true);
  const out: FunctionLength[] = [];
  const nameOf = (n: ts.SignatureDeclaration, parent: string): string => {
    if (n.name !== undefined) return n.name.getText(sf);
    if (ts.isConstructorDeclaration(n)) return "constructor";
    const p = n.parent;
    if (p !== undefined && (ts.isVariableDeclaration(p) || ts.isPropertyAssignment(p) || ts.isPropertyDeclaration(p)))
      return p.name.getText(sf);
    return `${parent || "(top level)"} (anonymous)`;
  };
  const visit = (n: ts.Node, parent: string): void => {
    let inside = parent;
    if (ts.isFunctionLike(n) && "body" in n && n.body !== undefined) {
      const start = sf.getLineAndCharacterOfPosition(n.getStart(sf)).line;
      const end = sf.getLineAndCharacterOfPosition(n.getEnd()).line;
      inside = nameOf(n, parent);
      out.push({ key: `${file} ${inside}`, lines: end - start + 1, line: start + 1 });
    }
    ts.forEachChild(n, (c) => visit(c, inside));
  };
  visit(sf, "");
  return out;
}

describe("function length", () => {
  const all = files(SRC).flatMap((f) => functionLengths(relative(resolve("."), f), readFileSync(f, "utf8")));

  it("the measure counts a function from its first token to its closing brace, its doc comment left out", () => {
    const text =
      "/** doc\n * more */\nexport function a(): void {\n  const b = () => {\n    return 1;\n  };\n  b();\n}\n";
    expect(functionLengths("x.ts", text).map((f) => [f.key, f.lines, f.line])).toEqual([
      ["x.ts a", 6, 3],
      ["x.ts b", 3, 4],
    ]);
  });

  it(`no function in src/ is over ${MAX_LINES} lines`, () => {
    expect(all.length).toBeGreaterThan(500);
    const over = all.filter((f) => f.lines > MAX_LINES).map((f) => `${f.key} (line ${f.line}): ${f.lines} lines`);
    expect(over, `over ${MAX_LINES} lines: split them`).toEqual([]);
  });
});
