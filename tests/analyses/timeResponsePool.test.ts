import { spawnSync } from "node:child_process";
import { describe, expect, it } from "vitest";
import { responseThreads } from "../../src/analyses/timeResponsePool.js";

// Worker files exist only in dist/: the pool is exercised through the built CLI (npm test builds it first).
function respond(threads: number): { code: number | null; out: string; err: string } {
  const r = spawnSync(
    "node",
    [
      "bin/psdgate.js",
      "respond",
      "samples/brackley-ft2-warehouse.csv",
      "--channel",
      "z",
      "--fn",
      "5:160:6",
      "--q",
      "10",
      "--json",
    ],
    {
      encoding: "utf8",
      env: { ...process.env, PSDGATE_RESPONSE_THREADS: String(threads) },
    },
  );
  return { code: r.status, out: r.stdout, err: r.stderr };
}

describe("time-domain responses on worker threads", () => {
  it("three threads give the same result as one, to the bit (shares of the grid, same arithmetic per natural frequency)", () => {
    const one = respond(0);
    const three = respond(3);
    expect(one.code).toBe(0);
    expect(three.code).toBe(0);
    expect(JSON.parse(three.out).fatigueDamage).toHaveLength(31);
    expect(three.out).toBe(one.out);
  });
  it("thread count: the environment's override, else none for small work, else at most one per 4 natural frequencies", () => {
    expect(responseThreads(60, 1e9, { PSDGATE_RESPONSE_THREADS: "2" })).toBe(2);
    expect(responseThreads(60, 1000, {})).toBe(0);
    expect(responseThreads(4, 1e9, {})).toBeLessThanOrEqual(1);
  });
});
