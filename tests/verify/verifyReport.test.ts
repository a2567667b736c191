import { describe, expect, it } from "vitest";
import { EARLIER_WORDINGS } from "../../src/verify/earlierWordings.js";
import { compareResults } from "../../src/verify/verifyReport.js";

describe("compareResults", () => {
  it("compareResults(recorded, now, 1e-9) passes numbers within the relative tolerance and names each difference by its JSON path", () => {
    const a = {
      verdict: "fail",
      input: { file: "a/x.wav", sha256: "ab" },
      lines: [1, 2, 3e-5],
      rms: { measured: 9.171 },
    };
    expect(
      compareResults(a, { ...a, input: { file: "b/x.wav", sha256: "ab" }, lines: [1, 2 * (1 + 5e-10), 3e-5] }, 1e-9)
        .diffs,
    ).toEqual([]);
    const d = compareResults(a, { ...a, verdict: "pass", lines: [1, 2.0001, 3e-5], rms: { measured: 9.2 } }, 1e-9);
    expect(d.diffs).toEqual([
      'verdict: recorded "fail", re-run "pass"',
      "lines[1]: recorded 2, re-run 2.0001",
      "rms.measured: recorded 9.171, re-run 9.2",
    ]);
    expect(compareResults({ x: [1, 2] }, { x: [1] }, 1e-9).diffs).toEqual(["x: recorded 2 values, re-run 1"]);
  });
  it("a re-run's -Infinity or NaN matches the null JSON recorded for it (a dead stretch's level, LEVEL_SWING); a finite number does not", () => {
    const recorded = JSON.parse(JSON.stringify({ levelDb: -Infinity, ratio: NaN, rms: 1 }));
    expect(compareResults(recorded, { levelDb: -Infinity, ratio: NaN, rms: 1 }, 1e-9).diffs).toEqual([]);
    expect(compareResults(recorded, { levelDb: -3, ratio: NaN, rms: 1 }, 1e-9).diffs).toEqual([
      "levelDb: recorded null, re-run -3",
    ]);
  });
  it("a field only the re-run has (added by a later version) is listed, not a difference; a recorded field the re-run lacks is one", () => {
    const older = { rms: 1, findings: [{ code: "PASS", text: "t" }] };
    const now = {
      rms: 1,
      analysis: { welch: { segmentLength: 4096 } },
      findings: [{ code: "PASS", values: { lines: 3 }, text: "t" }],
    };
    const c = compareResults(older, now, 1e-9);
    expect(c.diffs).toEqual([]);
    expect(c.added).toEqual(["findings[0].values", "analysis"]);
    expect(compareResults(now, older, 1e-9).diffs).toEqual([
      'analysis: recorded {"welch":{"segmentLength":4096}}, re-run undefined',
      'findings[0].values: recorded {"lines":3}, re-run undefined',
    ]);
  });
  it("a field the re-run has and the record lacks is a difference, except a field a later psdgate added, and that only for a report of another version", () => {
    const now = { verdict: "fail", rule: { summary: "s" }, channels: [{ lines: [1, 2] }], analysis: { a: 1 } };
    const stripped = { analysis: { a: 1 } };
    expect(compareResults(stripped, now, 1e-9).diffs).toEqual([
      'verdict: not in the report, re-run "fail"',
      'rule: not in the report, re-run {"summary":"s"}',
      'channels: not in the report, re-run [{"lines":[1,2]}]',
    ]);
    const noAnalysis = { verdict: "fail", rule: { summary: "s" }, channels: [{ lines: [1, 2] }] };
    expect(compareResults(noAnalysis, now, 1e-9, "", undefined, { olderReport: true }).diffs).toEqual([]);
    expect(compareResults(noAnalysis, now, 1e-9, "", undefined, { olderReport: false }).diffs).toEqual([
      'analysis: not in the report, re-run {"a":1}',
    ]);
  });
});

describe("a record in an earlier wording of a rule", () => {
  it("verifies: the field is listed as reworded, not a difference; any other text still differs", () => {
    const now = { rule: { summary: "the rule as worded now", falseFailBound: 0.05 } };
    const older = { rule: { summary: EARLIER_WORDINGS["rule.summary"]![0]!, falseFailBound: 0.05 } };
    const c = compareResults(older, now, 1e-9);
    expect(c.diffs).toEqual([]);
    expect(c.reworded).toEqual(["rule.summary"]);
    const edited = compareResults({ rule: { summary: "any other text", falseFailBound: 0.05 } }, now, 1e-9);
    expect(edited.diffs).toEqual(['rule.summary: recorded "any other text", re-run "the rule as worded now"']);
    // An earlier wording is accepted only where it was written.
    expect(compareResults({ note: EARLIER_WORDINGS["rule.summary"]![0]! }, { note: "x" }, 1e-9).diffs.length).toBe(1);
  });
});
