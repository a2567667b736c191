import { readdirSync, readFileSync, statSync } from "node:fs";
import { join, relative, resolve, dirname } from "node:path";
import { describe, expect, it } from "vitest";

/**
 * The layering DEVELOPERS.md describes ("Layout"), checked over the import graph of src/ (every static
 * import, export-from and dynamic import with a relative path, type-only ones included):
 * - the root of src/ holds the public index and the base modules only;
 * - a layer imports only from itself, earlier layers and the base modules (so report/ reads the analyses'
 *   result types downward, and nothing below the analyses knows them);
 * - cli/ and queue/ are the edges: nothing else imports them, index.ts included;
 * - no module is on a circle of imports;
 * - node:fs only in read/ (the one way in for files), the two output writers, cli/ and queue/.
 */
const LAYERS = [
  "read",
  "condition",
  "estimate",
  "weight",
  "compare",
  "synth",
  "pass",
  "analyses",
  "report",
  "verify",
] as const;
const BASE = new Set(["errors.ts", "units.ts", "version.ts", "findings.ts", "threadEnd.ts", "types"]);
const ROOT_FILES = new Set([...BASE, "index.ts"].filter((f) => f.endsWith(".ts")));
const EDGES = new Set(["cli", "queue"]);
const SRC = resolve("src");

function files(dir: string): string[] {
  return readdirSync(dir).flatMap((f) => {
    const p = join(dir, f);
    return statSync(p).isDirectory() ? files(p) : p.endsWith(".ts") ? [p] : [];
  });
}

type Place =
  | { kind: "layer"; rank: number; name: string }
  | { kind: "base" }
  | { kind: "index" }
  | { kind: "edge" }
  | { kind: "unknown"; name: string };

function placeOf(file: string): Place {
  const rel = relative(SRC, file).split("/");
  const top = rel[0]!;
  if (rel.length === 1)
    return top === "index.ts" ? { kind: "index" } : BASE.has(top) ? { kind: "base" } : { kind: "unknown", name: top };
  if (BASE.has(top)) return { kind: "base" };
  if (EDGES.has(top)) return { kind: "edge" };
  const rank = (LAYERS as readonly string[]).indexOf(top);
  return rank >= 0 ? { kind: "layer", rank, name: top } : { kind: "unknown", name: top };
}

interface Edge {
  from: string;
  to: string;
}

function edges(): Edge[] {
  const out: Edge[] = [];
  for (const f of files(SRC)) {
    const text = readFileSync(f, "utf8");
    const re = /(?:import|export)\s+(?:type\s+)?[^"';]*?from\s+["'](\.[^"']+)["']|import\(\s*["'](\.[^"']+)["']\s*\)/g;
    for (const m of text.matchAll(re)) {
      const spec = m[1] ?? m[2]!;
      out.push({ from: f, to: resolve(dirname(f), spec.replace(/\.js$/, ".ts")) });
    }
  }
  return out;
}

/** Strongly connected components of more than one module (Tarjan 1972), each as sorted relative paths. */
function circles(all: Edge[]): string[][] {
  const next = new Map<string, string[]>();
  for (const e of all) next.set(e.from, [...(next.get(e.from) ?? []), e.to]);
  const index = new Map<string, number>();
  const low = new Map<string, number>();
  const stack: string[] = [];
  const on = new Set<string>();
  const found: string[][] = [];
  let n = 0;
  const visit = (v: string): void => {
    index.set(v, n);
    low.set(v, n++);
    stack.push(v);
    on.add(v);
    for (const w of next.get(v) ?? []) {
      if (!index.has(w)) {
        visit(w);
        low.set(v, Math.min(low.get(v)!, low.get(w)!));
      } else if (on.has(w)) low.set(v, Math.min(low.get(v)!, index.get(w)!));
    }
    if (low.get(v) === index.get(v)) {
      const part: string[] = [];
      let w: string;
      do {
        w = stack.pop()!;
        on.delete(w);
        part.push(relative(SRC, w));
      } while (w !== v);
      if (part.length > 1 || (next.get(v) ?? []).includes(v)) found.push(part.sort());
    }
  };
  for (const v of files(SRC)) if (!index.has(v)) visit(v);
  return found;
}

describe("layering of src/ (DEVELOPERS.md, Layout)", () => {
  const all = edges();
  it("finds the imports (sanity: more than 100 edges)", () => {
    expect(all.length).toBeGreaterThan(100);
  });
  it("the root of src/ holds the index and the base modules only (at most 6 files); every folder is a known layer, base or edge", () => {
    const root = readdirSync(SRC).filter((f) => statSync(join(SRC, f)).isFile());
    expect(root.filter((f) => !ROOT_FILES.has(f))).toEqual([]);
    expect(root.length).toBeLessThanOrEqual(6);
    expect(
      files(SRC)
        .map(placeOf)
        .filter((p) => p.kind === "unknown"),
    ).toEqual([]);
  });
  it("a layer imports only from itself, earlier layers and the base modules; the base modules import only each other", () => {
    const bad: string[] = [];
    for (const e of all) {
      const a = placeOf(e.from);
      const b = placeOf(e.to);
      const name = `${relative(SRC, e.from)} -> ${relative(SRC, e.to)}`;
      if (a.kind === "base" && b.kind !== "base") bad.push(name);
      if (a.kind !== "layer") continue;
      if (b.kind === "edge" || b.kind === "index" || (b.kind === "layer" && b.rank > a.rank)) bad.push(name);
    }
    expect(bad).toEqual([]);
  });
  it("only the edges (cli/, queue/) import the edges, and index.ts (the library) does not", () => {
    const bad = all
      .filter((e) => placeOf(e.to).kind === "edge" && placeOf(e.from).kind !== "edge")
      .map((e) => relative(SRC, e.from));
    expect(bad).toEqual([]);
  });
  it("no module is on a circle of imports", () => {
    expect(circles(all)).toEqual([]);
  });
  it("node:fs only in read/ (the one way in for files), the report writers, cli/ and queue/", () => {
    const writers = new Set(["report/writeAtomic.ts", "report/timeHistoryWriter.ts"]);
    const bad = files(SRC).filter((f) => {
      const rel = relative(SRC, f);
      // version.ts reads the package's own package.json once at load: the one base module allowed to.
      if (
        rel.startsWith("read/") ||
        rel.startsWith("cli/") ||
        rel.startsWith("queue/") ||
        writers.has(rel) ||
        rel === "version.ts"
      )
        return false;
      return /from\s+["']node:fs(\/promises)?["']|import\(\s*["']node:fs(\/promises)?["']\s*\)|require\(\s*["'](node:)?fs/.test(
        readFileSync(f, "utf8"),
      );
    });
    expect(bad.map((f) => relative(SRC, f))).toEqual([]);
  });
});
