import { spawnSync } from "node:child_process";
import { describe, expect, it } from "vitest";

/**
 * The formatter and linter (Biome, biome.json) pass on every file they cover: src/, tests/, scripts/, bench/,
 * bin/ and the root's config files. `npm run format` rewrites the layout; what it reports beyond layout is a
 * lint rule to fix by hand. Run here so that `npm test` and CI hold every change to it.
 */
describe("biome check (format and lint)", () => {
  it("reports nothing", () => {
    const r = spawnSync("npx", ["biome", "check", "--colors=off", "--max-diagnostics=20", "."], { encoding: "utf8" });
    expect(r.status, `${r.stdout}\n${r.stderr}`).toBe(0);
  }, 60_000);
});
