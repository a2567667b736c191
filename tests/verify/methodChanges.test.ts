import { readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { changesSince, compareVersions } from "../../src/verify/methodChanges.js";
import { VERSION } from "../../src/version.js";
import { cli, forge, tempDir } from "../helpers.js";

describe("verify names the method changes since an older record's version", () => {
  it("compareVersions orders dotted numbers", () => {
    expect(compareVersions("0.2.0", "0.3.0")).toBe(-1);
    expect(compareVersions("0.10.0", "0.9.9")).toBe(1);
    expect(compareVersions("0.3", "0.3.0")).toBe(0);
    expect(compareVersions("test", "0.3.0")).toBe(0);
  });
  it("lists the changes after the record's version that can move its kind, and none for a record of this version", () => {
    const t = changesSince("0.2.0", "0.3.0", "transfer");
    expect(t).toContain("|H1| confidence bounds");
    expect(t).toContain("re-run it with psdgate 0.2.0");
    expect(changesSince("0.2.0", "0.3.0", "check")).not.toContain("|H1|");
    expect(changesSince("0.3.0", "0.3.0", "transfer")).toBe("");
  });
  it("a transfer record that says it was made by 0.2.0 and whose bounds differ: FAIL, with the bounds' change named", async () => {
    const d = tempDir();
    const f = join(d, "tr.html");
    const made = await cli("transfer", "samples/quarry-bend-bracket.csv", "--in", "base", "--report", f, "-q");
    expect(made.code, made.stderr).toBe(0);
    expect((await cli("verify", f)).code).toBe(0);
    // As 0.2.0 wrote it: its version, and a lower bound computed with the normal quantile (here: 3 % lower).
    writeFileSync(
      f,
      forge(
        readFileSync(f, "utf8").replaceAll(`psdgate ${VERSION}`, "psdgate 0.2.0"),
        (p) => p,
        (doc) => {
          const r = doc.result as { tool: { version: string }; outputs: { h1: { magnitudeLower: number[] } }[] };
          r.tool.version = "0.2.0";
          r.outputs[0]!.h1.magnitudeLower[30] = r.outputs[0]!.h1.magnitudeLower[30]! * 0.97;
        },
      ),
    );
    const v = await cli("verify", f);
    expect(v.code).toBe(1);
    expect(v.stdout).toMatch(/FAIL\s+rerun\s+1 value\(s\) differ.*made by psdgate 0\.2\.0.*\|H1\| confidence bounds/);
  });
});
