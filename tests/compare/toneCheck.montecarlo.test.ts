import { describe, expect, it } from "vitest";
import { DECISION_RULE, ruleLevels } from "../../src/compare/decisionRule.js";
import { profileLevel } from "../../src/compare/testProfile.js";
import { shapedRecord } from "../shapedRecords.js";
import { addTones, FS, judgeMixed, mixedProfile, TONES } from "./toneRecords.js";
import { lower999, upper999 } from "../binomialBounds.js";

/**
 * The mixed-mode rule's rates, by seeded Monte Carlo on sine-on-random records this test makes itself
 * (tests/shapedRecords.ts for the random part, the test's own cosines for the tones; not psdgate's synth),
 * each beside its analytic rate. Profile: KB-210 with three tones (toneRecords.ts), one exactly between two
 * lines; 2.5 Hz Hann lines, 131072 samples (127 segments, 240.7 DOF), tones 14–24 dB above the background
 * on their lines. PSDGATE_MC_SCALE multiplies the records (CI runs the default, a few seconds).
 */
const SCALE = Math.max(1, Number(process.env.PSDGATE_MC_SCALE ?? 1));
const LENGTH = 1 << 17;
const nominal = (f: number) => (f >= 20 && f <= 2000 ? profileLevel(mixedProfile, f) : 0);
const bandDb = (f: number) => (f <= 1000 ? 1.5 : 3);
const edge = (f: number) => nominal(f) * 10 ** (((Math.floor(f / 50) % 2 ? 1 : -1) * bandDb(f)) / 10);

function run(level: (f: number) => number, toneDb: number, records: number, seed: number) {
  let fail = 0;
  let backgroundFail = 0;
  let toneFail = 0;
  let pass = 0;
  let beyond196 = 0;
  let looks = 0;
  for (let r = 0; r < records; r++) {
    const x = addTones(
      shapedRecord(level, FS, LENGTH, seed + r),
      TONES.map((t, i) => ({ hz: t.hz, peak: t.peak * 10 ** (toneDb / 20), phase: 1.7 * r + i })),
    );
    const c = judgeMixed(x);
    if (c.verdict === "fail") fail++;
    if (c.verdict === "pass") pass++;
    if (c.findings.some((f) => f.code === "LINES_OUTSIDE" || f.code === "RMS_OUTSIDE" || f.code === "OUTER_LIMIT"))
      backgroundFail++;
    if (c.tones!.some((t) => t.shown)) toneFail++;
    // The tone statistic's calibration: |A - A_true| / sd beyond 1.96 should happen 5 % of the time.
    c.tones!.forEach((t, i) => {
      looks++;
      if (Math.abs(t.measuredPeak - TONES[i]!.peak * 10 ** (toneDb / 20)) / t.peakSd > 1.959964) beyond196++;
    });
  }
  console.log(
    `tones at ${toneDb} dB: fail ${fail} (background ${backgroundFail}, tones ${toneFail}), pass ${pass} of ${records}; tone |error| beyond 1.96 sd ${beyond196} of ${looks}`,
  );
  return { fail, backgroundFail, toneFail, pass, beyond196, looks };
}

describe("mixed-mode rule by Monte Carlo (sine-on-random records made by the test, not by synth)", () => {
  it("random at the profile, tones at their peaks: no fail (analytic: below 1e-6), and every record passes at 240.7 DOF", () => {
    const n = 16 * SCALE;
    const mc = run(nominal, 0, n, 70_000);
    expect(mc.fail).toBeLessThanOrEqual(upper999(n, 1e-6));
    expect(mc.pass).toBe(n);
  }, 300_000);

  it("background on the band edges with the tones at their lower limits, one between lines: the background's false-fail rate stays within its share (analytic at most 4 %) and the tones' within theirs (1 %)", () => {
    const n = 32 * SCALE;
    const mc = run(edge, -TONES[0]!.toleranceDb, n, 80_000);
    // The lines' share is 3 % with tones (DECISION_RULE.lines less DECISION_RULE.tones), the RMS's 1 %.
    const lv = ruleLevels(789, false, 1, DECISION_RULE.tones);
    expect(lv.upper.lineTest * 2 * 789).toBeCloseTo(DECISION_RULE.lines - DECISION_RULE.tones, 12);
    expect(mc.backgroundFail).toBeLessThanOrEqual(upper999(n, DECISION_RULE.lines));
    expect(mc.toneFail).toBeLessThanOrEqual(upper999(n, DECISION_RULE.tones));
    expect(mc.fail).toBeLessThanOrEqual(upper999(n, DECISION_RULE.falseFailRate));
    // The tone's standard deviation sqrt(G/T) is right: 5 % of fitted peaks lie beyond 1.96 sd of the truth.
    expect(mc.beyond196).toBeLessThanOrEqual(upper999(mc.looks, 0.05));
    expect(mc.beyond196).toBeGreaterThanOrEqual(lower999(mc.looks, 0.05));
  }, 300_000);
});
