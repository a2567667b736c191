import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { shockRecording } from "../../src/analyses/shockRecording.js";
import { gaussian, tempDir } from "../helpers.js";

/** 4 s at 10 kHz of 0.05 g noise on gravity (1 g), `pulse` added: a CSV with a time column. */
function record(pulse: (i: number) => number, seed: number): string {
  const fs = 10000;
  const x = gaussian(4 * fs, seed, 0.05);
  let text = "time,z [g]\n";
  for (let i = 0; i < x.length; i++) text += `${(i / fs).toFixed(4)},${(1 + x[i]! + pulse(i)).toFixed(5)}\n`;
  const f = join(tempDir(), "drop.csv");
  writeFileSync(f, text);
  return f;
}

describe("shockRecording: BASELINE_DRIFT", () => {
  it("a 50 g, 11 ms half-sine on a steady baseline is a shock, not drift (its area moved its second's mean by 0.35 g, 116 % of the 0.3 g threshold)", async () => {
    // Half-sine area 2 A T / pi = 0.350 g s: closed form.
    const m = 110;
    const f = record((i) => (i >= 20000 && i < 20000 + m ? 50 * Math.sin((Math.PI * (i - 20000)) / m) : 0), 11);
    const r = await shockRecording(f, { fnHz: [10, 100, 1000], q: 10 });
    expect(r.channels[0]!.events[0]!.peak).toBeGreaterThan(49);
    expect(r.doubts.map((d) => d.code)).not.toContain("BASELINE_DRIFT");
  });

  it("a sensor that tilts by 0.5 g at 1.5 s is still drift, with a shock elsewhere", async () => {
    const m = 110;
    const f = record(
      (i) => (i >= 15000 ? 0.5 : 0) + (i >= 30000 && i < 30000 + m ? 50 * Math.sin((Math.PI * (i - 30000)) / m) : 0),
      12,
    );
    const r = await shockRecording(f, { fnHz: [10, 100, 1000], q: 10 });
    expect(r.doubts.map((d) => d.code)).toContain("BASELINE_DRIFT");
  });
});
