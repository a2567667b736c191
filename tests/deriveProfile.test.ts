import { describe, expect, it } from "vitest";
import { deriveProfile, plainInputs } from "../src/deriveProfile.js";
import { tempDir } from "./helpers.js";
import { flat, writeFieldRecord } from "./fieldRecords.js";

describe("deriveProfile", () => {
  it("flat field PSD: derived level vs closed-form compression", async () => {
    const dir = tempDir();
    const files = [1, 2, 3].map((s) => writeFieldRecord(dir, `r${s}.wav`, flat(0.01), 100 + s));
    const t0 = Date.now();
    const r = await deriveProfile({ ...plainInputs(files, 100 * 3600), testDurationS: 3600, fromHz: 10, toHz: 500, version: "test", created: new Date(0) });
    console.log(Date.now() - t0, "ms");
    console.log(r.document.points, r.fit, r.compression);
    console.log([...r.testFatigue].map((d, i) => (d / r.fieldFatigue[i]!).toFixed(3)).join(" "));
    console.log([...r.extremeRatio].map((d) => d.toFixed(3)).join(" "));
  });
});
