import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { batchIndexName } from "../../src/report/batchIndex.js";
import { cli, tempDir } from "../helpers.js";

describe("check --report-dir index page", () => {
  it("check --report-dir DIR on three recordings also writes psdgate-batch.html: one row per recording linking its report, the verdict counts, no script", async () => {
    const d = join(tempDir(), "reports");
    const r = await cli(
      "check",
      "samples/kb210-run.wav",
      "samples/kb210-run-resonance.wav",
      "samples/kb210-run-short.wav",
      "-p",
      "samples/profiles/kb210-controller.json",
      "--report-dir",
      d,
      "--jobs",
      "1",
      "-q",
    );
    expect(r.code).toBe(1);
    const html = readFileSync(join(d, "psdgate-batch.html"), "utf8");
    expect(html).not.toMatch(/<script/);
    expect(html).toContain("1 pass, 1 fail, 1 inconclusive.");
    for (const name of ["kb210-run", "kb210-run-resonance", "kb210-run-short"]) {
      expect(html).toContain(`href="${name}.html"`);
      expect(readFileSync(join(d, `${name}.html`), "utf8")).toContain('id="psdgate-result"');
    }
    expect(html.match(/<tr><td><a /g)!.length).toBe(3);
  });

  it("batchIndexName never takes a report's name", () => {
    expect(batchIndexName(["run.html"])).toBe("psdgate-batch.html");
    expect(batchIndexName(["psdgate-batch.html", "PSDGATE-BATCH-2.html"])).toBe("psdgate-batch-3.html");
  });
});
