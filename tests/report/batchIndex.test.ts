import { readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { batchIndexName } from "../../src/report/batchIndex.js";
import { cli, forge, tempDir } from "../helpers.js";

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

    // verify re-renders the index and verifies every report it links (inputs, re-run, page, the verdict listed).
    const index = join(d, "psdgate-batch.html");
    const ok = await cli("verify", index);
    expect(ok.code, ok.stdout).toBe(0);
    expect(ok.stdout).toMatch(/ok\s+rendered\s/);
    expect(ok.stdout).toContain("3 of 3 linked reports are the ones the index lists (SHA-256), and each verifies");
    // The index's page says the failed run passed, both digests recomputed: its page is not the one it renders.
    const forgedIndex = forge(
      html,
      (p) =>
        p
          .replace("1 pass, 1 fail, 1 inconclusive", "2 pass, 0 fail, 1 inconclusive")
          .replace('<span class="chip fail">FAIL</span>', '<span class="chip pass">PASS</span>'),
      () => undefined,
    );
    writeFileSync(index, forgedIndex);
    const v = await cli("verify", index);
    expect(v.code).toBe(1);
    expect(v.stdout).toMatch(/FAIL\s+rendered\s+the page differs/);
    // The index and its result both say PASS for the failed run, and the index's hash of that report is recomputed
    // after its own banner was forged: the linked report's verification fails and is named.
    writeFileSync(
      index,
      forge(
        html,
        (p) => p,
        (doc) => {
          const e = (doc.result as { entries: { file: string; verdict: string }[] }).entries;
          for (const x of e) if (x.verdict === "fail") x.verdict = "pass";
        },
      ),
    );
    const w = await cli("verify", index);
    expect(w.code).toBe(1);
    expect(w.stdout).toMatch(/FAIL\s+(rendered|rerun)\s/);
  }, 120_000);

  it("batchIndexName never takes a report's name", () => {
    expect(batchIndexName(["run.html"])).toBe("psdgate-batch.html");
    expect(batchIndexName(["psdgate-batch.html", "PSDGATE-BATCH-2.html"])).toBe("psdgate-batch-3.html");
  });
});
