import { readdirSync, readFileSync, statSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { DECISION_RULE } from "../src/compare/decisionRule.js";
import { RULE_LEVELS, RULE_SUMMARY, SINGLE_LINES_SHARE } from "../src/report/ruleText.js";
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
    await cli(
      "check",
      "samples/kb210-run-resonance.wav",
      "--profile",
      "samples/profiles/kb210-controller.json",
      "--meta",
      "samples/kb210-run-meta.yaml",
      "--report",
      report,
    );
    const v = await cli("verify", report);
    expect(v.stdout).toContain(`ok    rerun     ${stated} numbers and the verdict FAIL reproduced`);
  });
});

/** The decision rule's levels are worded from DECISION_RULE (report/ruleText.ts); the docs state the same levels. */
describe("the rule's wording matches DECISION_RULE", () => {
  const pct = (x: number) => `${Number((100 * x).toPrecision(3))} %`;
  const flat = (t: string) => t.replace(/\s+/g, " ");

  it(`the levels sentence states the true split: single lines ${pct(SINGLE_LINES_SHARE)}, stretches ${pct(DECISION_RULE.lines * DECISION_RULE.stretchShare)}, RMS ${pct(DECISION_RULE.rms)}`, () => {
    expect(SINGLE_LINES_SHARE).toBeCloseTo(DECISION_RULE.lines * (1 - DECISION_RULE.stretchShare), 15);
    expect(RULE_LEVELS).toContain(
      `the single-line tests get ${pct(SINGLE_LINES_SHARE)} and the stretches ${pct(DECISION_RULE.lines * DECISION_RULE.stretchShare)}`,
    );
    expect(RULE_LEVELS).toContain(`the RMS ${pct(DECISION_RULE.rms)}`);
    expect(RULE_LEVELS).toContain(
      `take ${pct(DECISION_RULE.outer)} and sine tones ${pct(DECISION_RULE.tones)} from the lines' ${pct(DECISION_RULE.lines)}`,
    );
    expect(RULE_SUMMARY).toContain(RULE_LEVELS);
  });

  it("README states the rule summary check prints and the levels sentence, and its per-test level is the single lines' share", () => {
    const readme = readFileSync("README.md", "utf8");
    expect(readme).toContain(`RULE: ${RULE_SUMMARY}\n`);
    expect(readme.split(RULE_LEVELS).length - 1).toBe(2);
    expect(readme).toContain(
      `each single-line test is at ${pct(SINGLE_LINES_SHARE)} divided by twice the number of lines (Bonferroni)`,
    );
    expect(readme).toContain(`the stretches sharing ${pct(DECISION_RULE.lines * DECISION_RULE.stretchShare)}`);
  });

  it("DEVELOPERS.md's list of the tests states the same levels", () => {
    const dev = flat(readFileSync("DEVELOPERS.md", "utf8"));
    expect(dev).toContain(
      `- ${pct(SINGLE_LINES_SHARE)} over the 2m single-line tests (a = ${Number(SINGLE_LINES_SHARE.toPrecision(3))} / 2m;`,
    );
    expect(dev).toContain(
      `- ${pct(DECISION_RULE.lines * DECISION_RULE.stretchShare)} over stretches of 4, 16 and 64 neighbouring lines`,
    );
    expect(dev).toContain(`- ${pct(DECISION_RULE.rms)} for the RMS over the range`);
    expect(dev).toContain(`- ${pct(DECISION_RULE.outer)} (taken from the lines' share) for outer limits`);
  });

  it("check --help states the levels", async () => {
    expect(flat((await cli("check", "--help")).stdout)).toContain(RULE_LEVELS);
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
    const found = files.flatMap((f) =>
      readFileSync(f, "utf8")
        .split("\n")
        .flatMap((l, i) => (outside.test(l) ? [`${f}:${i + 1} ${l.trim()}`] : [])),
    );
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
