import { describe, expect, it } from "vitest";
import { cli } from "../helpers.js";

/**
 * Records written by psdgate 0.1.0 (tests/fixtures/records-0.1.0: `npm run demo` at that version, unedited) still
 * verify: a check record under the earlier wording of its rule and a respond record reproduce; the shock record's
 * numbers were made with the plain mean as its baseline and the ride record's with the mirrored filter start, so both
 * differ now and name the method changes since (src/verify/methodChanges.ts). Their recordings are the samples, unchanged since.
 */
describe("records made by psdgate 0.1.0", () => {
  const cases: [string, RegExp][] = [
    ["kb210-run-resonance-report", /verdict FAIL reproduced.*in an earlier wording of the same rule.*rule\.summary/],
    ["quarry-bend-respond", /of the respond result reproduced/],
  ];
  for (const [name, line] of cases) {
    it(`${name}: REPRODUCED, exit 0`, async () => {
      const r = await cli("verify", `tests/fixtures/records-0.1.0/${name}.html`);
      expect(r.stdout).toMatch(line);
      expect(r.stdout).toContain("REPRODUCED");
      expect(r.code).toBe(0);
    }, 60_000);
  }
  // The shock record's baseline now leaves out the stretches that hold its shocks (BaselineStretches): its mean moves
  // from 1.00122 g (the shocks' area over the record included) to 1.00010 g, and its spectra by about 0.1 %. An
  // earlier version's numbers: DIFFERS, with the recorded value beside the re-run's.
  it("brackley-ft2-shock: DIFFERS on the baseline the shocks no longer move, exit 1", async () => {
    const r = await cli("verify", "tests/fixtures/records-0.1.0/brackley-ft2-shock.html");
    expect(r.stdout).toMatch(/ok\s+result\s+embedded result intact/);
    expect(r.stdout).toContain("channels[0].mean: recorded 1.0012221033333333, re-run 1.00009819830508");
    expect(r.stdout).toContain("DIFFERS");
    expect(r.stdout).toContain("the baseline removed (the mean without the 0.1 s stretches that reach the threshold)");
    expect(r.code).toBe(1);
  }, 60_000);
  // The ride record's weighting filters now settle on a past predicted from the record's start (Burg), not on the start
  // mirrored about its mean: its figures move by about 1e-8 relative (z's stationarity statistic 932 -> 931), beyond
  // verify's 1e-9. DIFFERS, and the rerun line names the change (0.4.0).
  it("marlow-uv3-ride-report: DIFFERS by the weighting filters' start, named among the changes since, exit 1", async () => {
    const r = await cli("verify", "tests/fixtures/records-0.1.0/marlow-uv3-ride-report.html");
    expect(r.stdout).toMatch(/ok\s+result\s+embedded result intact/);
    expect(r.stdout).toMatch(/FAIL\s+rerun\s+\d+ value\(s\) differ/);
    expect(r.stdout).toContain("the weighting filters' start (settled on a past predicted from the record's start");
    expect(r.stdout).toContain("DIFFERS");
    expect(r.code).toBe(1);
  }, 60_000);
});
