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
  it("a dead stretch the blocks leave out (the run's last stretches) or too short to move its block is doubted too", () => {
    // 68 stretches: 8 blocks of 8 use the first 64; the last 4 s, dead, lie outside every block.
    const tail = Array.from({ length: 68 }, (_, i) => (i >= 65 ? 0 : 1 + 0.05 * Math.sin(i * 1.7)));
    expect(levelSwing(tail, 1).excessDb).toBeLessThan(0);
    const f = levelGate(tail, 1, 1, 0, 20);
    expect(f.map((x) => x.code)).toEqual(["LEVEL_SWING"]);
    expect(findingTexts(f)[0]).toContain("65-68 s holds no signal at all (mean square 0)");
    // one dead second inside a block of 8 lowers that block by 0.58 dB only, inside a 1 dB tolerance
    const one = Array.from({ length: 64 }, (_, i) => (i === 20 ? 0 : 1 + 0.05 * Math.sin(i * 1.7)));
    expect(levelSwing(one, 1).excessDb).toBeLessThan(0);
    expect(findingTexts(levelGate(one, 1, 1, 0, 20))[0]).toContain("20-21 s holds no signal at all");
  });
});
