import { describe, expect, it } from "vitest";
import { levelGate, levelSwing } from "../../src/compare/levelGate.js";
import { findingTexts } from "../../src/report/findingTexts.js";

describe("level gate: a block with no signal at all", () => {
  // 64 stretch mean squares near 1, the last 8 (one block of 8) exactly 0: a logger dropout. The other blocks sit at
  // +0.58 dB (10 log10(8/7)), inside a 1 dB tolerance; the dead block is at -Infinity dB. Its delta-method se is 0/0, and a
  // NaN excess let the run through (the block at 1e-30 instead of 0 was doubted by some 300 dB).
  const values = Array.from({ length: 64 }, (_, i) => (i >= 56 ? 0 : 1 + 0.05 * Math.sin(i * 1.7)));
  it("is doubted outright, its level -Infinity dB", () => {
    const s = levelSwing(values, 1);
    expect(s.tested).toBe(true);
    expect(s.worst).toBe(7);
    expect(s.levelDb[7]).toBe(-Infinity);
    expect(s.excessDb).toBe(Infinity);
    const f = levelGate(values, 1, 1, 0, 20);
    expect(f.map((x) => x.code)).toEqual(["LEVEL_SWING"]);
    expect(findingTexts(f)[0]).toContain("56-64 s holds no signal at all (mean square 0)");
  });
  it("a run that is silent throughout is not a level swing (nothing to compare a block with)", () => {
    expect(levelSwing(new Array(64).fill(0), 1).excessDb).not.toBeGreaterThan(0);
  });
});
