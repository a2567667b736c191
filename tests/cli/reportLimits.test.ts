import { existsSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { cli, tempDir } from "../helpers.js";

/**
 * An HTML record holds what a page can show: an analysis too fine for one (channels x segment length over
 * MAX_REPORT_SAMPLES, read/analysisLimits.ts) is refused with REPORT_TOO_LARGE before the recording is
 * read, not after minutes and gigabytes (a 0.0013 Hz check of a 1000 s record crashed with "Invalid string length").
 */
describe("--report is bounded before the work", () => {
  it("check and psd --report at a line spacing a page cannot hold: REPORT_TOO_LARGE, exit 2, at once (before the samples are read), nothing written", async () => {
    const d = tempDir();
    for (const args of [
      [
        "check",
        "samples/kb210-run.wav",
        "-p",
        "samples/profiles/kb210-controller.json",
        "-c",
        "1",
        "--resolution",
        "0.0013",
        "--report",
        join(d, "a.html"),
      ],
      [
        "check",
        "samples/kb210-run.wav",
        "-p",
        "samples/profiles/kb210-controller.json",
        "--resolution",
        "0.02",
        "--report-dir",
        join(d, "dir"),
      ],
      ["psd", "samples/kb210-run.wav", "--segment", "262144", "--report", join(d, "b.html")],
    ]) {
      const t0 = Date.now();
      const r = await cli(...args);
      expect(r.code, args.join(" ")).toBe(2);
      expect(r.stderr, args.join(" ")).toMatch(
        /for an HTML record, channels x segment length at most 262144 .*\[REPORT_TOO_LARGE\].*CSV or JSON instead of an HTML record/,
      );
      expect(Date.now() - t0).toBeLessThan(3000);
    }
    expect(existsSync(join(d, "a.html")) || existsSync(join(d, "b.html"))).toBe(false);
  });
});
