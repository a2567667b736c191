import { describe, expect, it } from "vitest";
import { InputError } from "../../src/errors.js";
import { parsePsdTable } from "../../src/read/psdTable.js";

const good =
  "frequency_hz,a_psd [g2/Hz],a_lower [g2/Hz],a_upper [g2/Hz],b_psd [(m/s2)2/Hz],b_lower [(m/s2)2/Hz],b_upper [(m/s2)2/Hz]\n0,1,0.5,2,3,2,4\n2,0.1,0.05,0.2,0.3,0.2,0.4\n4,0.2,0.1,0.4,0.6,0.5,0.7\n";

function code(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    if (e instanceof InputError) return `${e.code} ${e.message}`;
    throw e;
  }
  return "no error";
}

describe("parsePsdTable", () => {
  it("reads the psd --csv layout: frequencies, each channel's PSD and unit", () => {
    const t = parsePsdTable(good, "t.csv");
    expect(Array.from(t.frequencyHz)).toEqual([0, 2, 4]);
    expect(t.channels.map((c) => [c.name, c.units])).toEqual([
      ["a", "g"],
      ["b", "m/s2"],
    ]);
    expect(Array.from(t.channels[1]!.psd)).toEqual([3, 0.3, 0.6]);
    expect(t.sha256).toMatch(/^[0-9a-f]{64}$/);
  });
  it("names file, line and column of a bad number, a bad header and uneven spacing", () => {
    expect(code(() => parsePsdTable(good.replace("0.1,0.05", "x,0.05"), "t.csv"))).toMatch(
      /^PSD_TABLE_NUMBER t\.csv:3:2 \(a_psd \[g2\/Hz\]\): expected a density/,
    );
    expect(code(() => parsePsdTable("hz,level\n1,2\n", "t.csv"))).toMatch(
      /^PSD_TABLE_HEADER t\.csv:1:1: expected a header starting frequency_hz/,
    );
    expect(code(() => parsePsdTable(good.replace("\n4,", "\n5,"), "t.csv"))).toMatch(
      /^PSD_TABLE_SPACING t\.csv:4:1: expected equally spaced lines/,
    );
    expect(code(() => parsePsdTable("frequency_hz,a_psd [mV2/Hz]\n0,1\n1,1\n", "t.csv"))).toMatch(
      /^PSD_TABLE_HEADER t\.csv:1:2: expected a unit/,
    );
  });
});
