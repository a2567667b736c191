import { readFileSync } from "node:fs";
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
