import { describe, expect, it } from "vitest";
import { channels, db, dofOf, judgeControl, lower999, nominal, SCALE } from "./mcRecords.js";

/**
 * The power a pass claims with largest-of control (--control-rule largest), below the band, by seeded Monte Carlo
 * on records the test makes (tests/compare/mcRecords.ts: white Gaussian noise shaped by one FFT, never psdgate's
 * synth). README: "Power for `largest` is for a departure on every control channel alike." A shortfall on every
 * channel is shown only when the largest of them is shown below, i.e. all k are: for independent channels P1^k
 * (decisionRule.ts powerAt), the least any correlation gives.
 *
 * The departure is the default requirement's: 1.5 dB beyond the -1 dB band (-2.5 dB) over 5 % of the 58 judged lines
 * in a run of 3 (lines 160, 168, 176 Hz on the flat part), on every channel; elsewhere the profile's level (the
 * centre line's worst case inside the band). At the DOF the rule says a pass needs, at least 95 % must fail.
 * Before the fix the rule took one channel's chance below: a pass needed 470 DOF for k = 3, where 165 of 200 records
 * failed (82.5 %, against the 95.2 % it claimed); now 554 DOF, where 191 of 200 fail (95.5 %, claimed 95.1 %).
 */
const n = 200 * SCALE;

describe("largest-of control: the power below the band that a pass claims (records made by the test)", () => {
  const departure = (f: number) => (f >= 156 && f < 180 ? nominal(f) * db(-2.5) : nominal(f));
  it(
    "3 independent channels 1.5 dB below the band over a run of 3 lines: at least 95 % fail at the DOF a pass needs",
    () => {
      // The DOF a pass needs, from the rule (one record's judgement states it), and the segments that reach it.
      const need = judgeControl(channels(departure, 3, 1), 110, "largest").dof.forPower;
      let K = 2;
      while (dofOf(K) < need) K++;
      let fails = 0;
      for (let r = 0; r < n; r++) {
        if (judgeControl(channels(departure, 3, 900 + r), K, "largest").verdict === "fail") fails++;
      }
      // The rule's own figure at this DOF (the centre lines' looks; side lines and stretches only add power).
      const analytic = judgeControl(channels(departure, 3, 2), K, "largest").rule.power.linesBelow;
      console.log(
        `largest of 3, 1.5 dB below over 3 lines at ${dofOf(K).toFixed(1)} DOF (a pass needs ${need}): ${fails} of ${n} fail; analytic power of the centre looks ${analytic.toFixed(3)}`,
      );
      expect(fails).toBeGreaterThanOrEqual(lower999(n, 0.95));
    },
    300_000 * SCALE,
  );
});
