import { describe, expect, it } from "vitest";
import { cli } from "../helpers.js";

/**
 * Records written by psdgate 0.1.0 (tests/fixtures/records-0.1.0: `npm run demo` at that version, unedited) still
 * verify: a check record under the earlier wording of its rule, ride and shock records from before the resolved
 * analysis was recorded in them, a respond record. Their recordings are the samples, unchanged since.
 */
describe("records made by psdgate 0.1.0", () => {
  const cases: [string, RegExp][] = [
    ["kb210-run-resonance-report", /verdict FAIL reproduced.*in an earlier wording of the same rule.*rule\.summary/],
    ["marlow-uv3-ride-report", /of the ride result reproduced.*added by a later psdgate than the report's\): analysis/],
    ["brackley-ft2-shock", /numbers reproduced within a relative 1e-9 \(report made by psdgate 0\.1\.0/],
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
});
