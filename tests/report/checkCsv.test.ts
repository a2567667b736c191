import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { cli, tempDir } from "../helpers.js";

describe("check --csv", () => {
  it("check --csv OUT writes every judged line with its limits, status and shown flag, matching --json", async () => {
    const d = tempDir();
    const out = join(d, "lines.csv");
    const args = ["check", "samples/kb210-run-resonance.wav", "-p", "samples/profiles/kb210-controller.json"];
    expect((await cli(...args, "--csv", out)).code).toBe(1);
    const rows = readFileSync(out, "utf8")
      .trim()
      .split("\n")
      .map((l) => l.split(","));
    expect(rows[0]).toEqual([
      "spectrum",
      "role",
      "frequency_hz",
      "measured [g2/Hz]",
      "required [g2/Hz]",
      "deviation_db",
      "upper_limit [g2/Hz]",
      "lower_limit [g2/Hz]",
      "upper_db",
      "lower_db",
      "status",
      "shown",
    ]);
    const j = JSON.parse((await cli(...args, "--json")).stdout).channels[0].lines;
    expect(rows.length - 1).toBe(j.frequencyHz.length);
    rows.slice(1).forEach((r, i) => {
      expect(Number(r[2])).toBe(j.frequencyHz[i]);
      expect(Number(r[3])).toBe(j.measured[i]);
      expect(r[10]).toBe(j.status[i]);
      expect(r[11] === "shown").toBe(j.shown[i]);
      // upper limit = required x 10^(upperDb/10)
      expect(Number(r[6])).toBeCloseTo(Number(r[4]) * 10 ** (Number(r[8]) / 10), 12);
    });
    expect(rows.slice(1).filter((r) => r[11] === "shown").length).toBe(66);
  });
});
