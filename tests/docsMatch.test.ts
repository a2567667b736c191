import { readdirSync, readFileSync, statSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { cli, tempDir } from "./helpers.js";

/** The docs state what the commands print (issue #20): the samples' verdicts and README's verify example. */
describe("docs match what the commands print", () => {
  it("samples/README.md's expected check verdicts are the verdicts check gives", async () => {
    const table = readFileSync("samples/README.md", "utf8");
    const rows: [string, string, string][] = [
      ["kb210-run.wav", "samples/profiles/kb210-controller.json", "pass"],
      ["kb210-run-resonance.wav", "samples/profiles/kb210-controller.json", "fail"],
      ["kb210-run-short.wav", "samples/profiles/kb210-controller.json", "inconclusive"],
      ["tern7-flight.csv", "samples/profiles/tern7-gimbal.yaml", "inconclusive"],
      ["hx4-dcu-run.wav", "samples/profiles/hx4-avionics.yaml", "pass"],
      ["hx4-dcu-run-tones-low.wav", "samples/profiles/hx4-avionics.yaml", "fail"],
    ];
    for (const [file, profile, verdict] of rows) {
      const line = table.split("\n").find((l) => l.startsWith(`| \`${file}\``))!;
      expect(line.split("|").at(-2)!.trim().startsWith(verdict), `${file}: ${line}`).toBe(true);
      const r = JSON.parse((await cli("check", `samples/${file}`, "-p", profile, "--json")).stdout);
      expect(r.verdict, file).toBe(verdict);
    }
  });

  it("README's verify example states the number count verify prints", async () => {
    const stated = /ok {4}rerun {5}(\d+) numbers and the verdict FAIL/.exec(readFileSync("README.md", "utf8"))![1];
    const report = join(tempDir(), "r.html");
    await cli("check", "samples/kb210-run-resonance.wav", "--profile", "samples/profiles/kb210-controller.json", "--meta", "samples/kb210-run-meta.yaml", "--report", report);
    const v = await cli("verify", report);
    expect(v.stdout).toContain(`ok    rerun     ${stated} numbers and the verdict FAIL reproduced`);
  });
});

/** Text files under a folder (fixtures' data files left out: they hold numbers, not pointers). */
function textFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((f) => {
    const p = join(dir, f);
    if (statSync(p).isDirectory()) return p === join("tests", "fixtures") ? [] : textFiles(p);
    return /\.(ts|mts|mjs|js|md)$/.test(p) ? [p] : [];
  });
}

describe("comments point only inside the repository (issue #23)", () => {
  const files = [...textFiles("src"), ...textFiles("tests"), "README.md", "DEVELOPERS.md"];
  it("no file in src/, tests/, README.md or DEVELOPERS.md names a path outside the repository", () => {
    // Built from parts so that this file does not name them itself.
    const outside = new RegExp(["\\.\\./", "shared", "|", "/", "work/"].join(""));
    const found = files.flatMap((f) => readFileSync(f, "utf8").split("\n").flatMap((l, i) => (outside.test(l) ? [`${f}:${i + 1} ${l.trim()}`] : [])));
    expect(found).toEqual([]);
  });
  it("every docs/REFERENCES.md section a comment names is on the page", () => {
    const page = readFileSync("docs/REFERENCES.md", "utf8");
    const sections = new Set([...page.matchAll(/^## (\d+)\. /gm)].map((m) => m[1]));
    const items = [...page.slice(page.indexOf("## Disagreements found")).matchAll(/^(\d+)\. /gm)].map((m) => m[1]);
    const broken: string[] = [];
    for (const f of files) {
      // A pointer may wrap onto the comment's next line ("docs/REFERENCES.md\n * sec. 8").
      const text = readFileSync(f, "utf8").replace(/\n\s*(\*|\/\/)\s*/g, " ");
      for (const m of text.matchAll(/docs\/REFERENCES\.md,? (sec\. (\d+)|disagreements item (\d+))/g)) {
        if (m[2] !== undefined && !sections.has(m[2])) broken.push(`${f}: sec. ${m[2]}`);
        if (m[3] !== undefined && !items.includes(m[3])) broken.push(`${f}: disagreements item ${m[3]}`);
      }
    }
    expect(broken).toEqual([]);
    expect(files.filter((f) => /\bREFERENCES\.md/.test(readFileSync(f, "utf8"))).length).toBeGreaterThan(30);
  });
});
