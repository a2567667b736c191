import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { openTimeHistory } from "../../src/read/openTimeHistory.js";
import { tempDir } from "../helpers.js";
import { asRf64, wavBytes } from "../wavBytes.js";

const dir = tempDir();

describe("openTimeHistory: a recording is a WAV by its signature, whatever its name", () => {
  const riff = wavBytes({ bits: 16, channels: 2, samples: [1, -2, 300, -400, 5000, -6000] });
  for (const [name, bytes] of [
    ["run.dat", riff],
    ["run.rf64", asRf64(riff)],
    ["run.bw64", asRf64(riff, "BW64")],
  ] as const) {
    it(`${name} (${bytes.toString("latin1", 0, 4)}) is read as a WAV`, async () => {
      const p = join(dir, name);
      writeFileSync(p, bytes);
      const src = await openTimeHistory(p);
      expect(src.info.format).toBe("wav");
      expect(src.info.frames).toBe(3);
    });
  }
});
