import { readdirSync, readFileSync, statSync } from "node:fs";
import { join, relative, resolve, dirname } from "node:path";
import { describe, expect, it } from "vitest";

/**
 * The layering DEVELOPERS.md describes, checked over the import graph of src/ (every static import,
 * export-from and dynamic import with a relative path). A stage imports only from earlier stages and the
 * shared base modules; the wiring modules at the top of src/ may use any stage; only the CLI uses the CLI;
 * the stages before report/ never import the wiring modules, and report/ only their types. queue/ (the
 * job-queue worker) counts as an edge with cli/.
 */
const STAGES = ["read", "condition", "estimate", "weight", "compare", "synth", "report"] as const;
const BASE = new Set(["errors.ts", "units.ts", "version.ts", "findings.ts", "threadEnd.ts", "types"]);
const SRC = resolve("src");

function files(dir: string): string[] {
  return readdirSync(dir).flatMap((f) => {
    const p = join(dir, f);
    return statSync(p).isDirectory() ? files(p) : p.endsWith(".ts") ? [p] : [];
  });
}

type Place = { kind: "stage"; rank: number; name: string } | { kind: "base" } | { kind: "wiring" } | { kind: "cli" } | { kind: "other"; name: string };

function placeOf(file: string): Place {
  const rel = relative(SRC, file).split("/");
  if (rel.length === 1) return BASE.has(rel[0]!) ? { kind: "base" } : { kind: "wiring" };
  const top = rel[0]!;
  if (BASE.has(top)) return { kind: "base" };
  // queue/ is an edge like cli/ (pg-boss, threads, files), but for the jobs-as-data pieces the library
  // exports: the Job value and its dispatcher, which sit at the wiring level.
  if (top === "queue" && ["job.ts", "runJob.ts", "jobPath.ts"].includes(rel[1]!)) return { kind: "wiring" };
  if (top === "cli" || top === "queue") return { kind: "cli" };
  const rank = (STAGES as readonly string[]).indexOf(top);
  return rank >= 0 ? { kind: "stage", rank, name: top } : { kind: "other", name: top };
}

interface Edge { from: string; to: string; typeOnly: boolean }

function edges(): Edge[] {
  const out: Edge[] = [];
  for (const f of files(SRC)) {
    const text = readFileSync(f, "utf8");
    const re = /(import|export)\s+(type\s+)?[^"';]*?from\s+["'](\.[^"']+)["']|import\(\s*["'](\.[^"']+)["']\s*\)/g;
    for (const m of text.matchAll(re)) {
      const spec = m[3] ?? m[4]!;
      const target = resolve(dirname(f), spec.replace(/\.js$/, ".ts"));
      out.push({ from: f, to: target, typeOnly: m[2] !== undefined });
    }
  }
  return out;
}

describe("layering of src/ (DEVELOPERS.md, Layout)", () => {
  const all = edges();
  it("finds the imports (sanity: more than 100 edges)", () => {
    expect(all.length).toBeGreaterThan(100);
  });
  it("a stage imports only from itself, earlier stages and the base modules; never the CLI; the wiring modules only as types, and only from report/", () => {
    const bad: string[] = [];
    for (const e of all) {
      const a = placeOf(e.from);
      const b = placeOf(e.to);
      if (a.kind !== "stage" && a.kind !== "other") continue;
      const name = `${relative(SRC, e.from)} -> ${relative(SRC, e.to)}`;
      if (b.kind === "cli") bad.push(name);
      else if (b.kind === "wiring" && !(e.typeOnly && a.kind === "stage" && a.name === "report")) bad.push(name);
      else if (a.kind === "stage" && b.kind === "stage" && b.rank > a.rank) bad.push(name);
    }
    expect(bad).toEqual([]);
  });
  it("only the CLI imports the CLI, and index.ts (the library) does not", () => {
    const bad = all.filter((e) => placeOf(e.to).kind === "cli" && placeOf(e.from).kind !== "cli").map((e) => relative(SRC, e.from));
    expect(bad).toEqual([]);
  });
  it("node:fs only in read/ (the one way in for files), the report writers, cli/ and queue/: never in the wiring modules or the stages between", () => {
    const writers = new Set(["report/writeAtomic.ts", "report/timeHistoryWriter.ts"]);
    const bad = files(SRC).filter((f) => {
      const rel = relative(SRC, f);
      // version.ts reads the package's own package.json once at load: the one base module allowed to.
      if (rel.startsWith("read/") || rel.startsWith("cli/") || rel.startsWith("queue/") || writers.has(rel) || rel === "version.ts") return false;
      return /from\s+["']node:fs(\/promises)?["']|import\(\s*["']node:fs(\/promises)?["']\s*\)|require\(\s*["'](node:)?fs/.test(readFileSync(f, "utf8"));
    });
    expect(bad.map((f) => relative(SRC, f))).toEqual([]);
  });
});
