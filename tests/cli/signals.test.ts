import { spawn } from "node:child_process";
import { readdirSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { tempDir } from "../helpers.js";

// The built CLI is run as a child and sent a signal while it writes: it must exit 128 + signal number
// (common practice, as a shell reports it) and leave neither a temporary file nor a half output.
const bin = join(process.cwd(), "bin/psdgate.js");
const kb = join(process.cwd(), "samples/profiles/kb210-controller.json");

function interrupt(args: string[], cwd: string, signal: NodeJS.Signals, when: () => boolean): Promise<number | null> {
  return new Promise((resolve, reject) => {
    const p = spawn(process.execPath, [bin, ...args], { cwd, stdio: "ignore" });
    let tries = 0;
    const poll = setInterval(() => {
      // Bounded: about 20 s at most.
      if (++tries > 2000) {
        clearInterval(poll);
        p.kill("SIGKILL");
        reject(new Error("the temporary file never appeared"));
      } else if (when()) {
        clearInterval(poll);
        p.kill(signal);
      }
    }, 10);
    p.on("exit", (code) => {
      clearInterval(poll);
      resolve(code);
    });
  });
}

describe("signals during a write (built CLI)", () => {
  for (const [signal, code] of [
    ["SIGTERM", 143],
    ["SIGINT", 130],
  ] as const) {
    it(`synth interrupted by ${signal} while its output is a temporary file: exit ${code}, no .tmp, no output`, async () => {
      const dir = tempDir();
      const tmp = () => readdirSync(dir).some((f) => f.endsWith(".tmp"));
      const exit = await interrupt(
        ["synth", "--profile", kb, "--duration", "3000", "--rate", "5120", "--channels", "4", "--out", "long.wav"],
        dir,
        signal,
        tmp,
      );
      expect(exit).toBe(code);
      expect(readdirSync(dir)).toEqual([]);
    }, 30_000);
  }
});
