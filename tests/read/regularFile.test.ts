import { execFileSync } from "node:child_process";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { assertRegularFile, fsReason } from "../../src/read/regularFile.js";
import { tempDir } from "../helpers.js";

describe("openRegularFile", () => {
  it("assertRegularFile(): a FIFO is refused at once (never blocks), naming what it is", async () => {
    const fifo = join(tempDir(), "pipe.csv");
    execFileSync("mkfifo", [fifo]);
    const t0 = Date.now();
    await expect(assertRegularFile(fifo, "a readable file")).rejects.toMatchObject({
      code: "FILE_UNREADABLE",
      message: expect.stringContaining("received a FIFO (named pipe)"),
    });
    expect(Date.now() - t0).toBeLessThan(2000);
  });
  it("assertRegularFile(): /dev/zero is a character device and a folder is a folder, not an empty file", async () => {
    await expect(assertRegularFile("/dev/zero", "a readable file")).rejects.toThrow(
      /received a character device \[FILE_UNREADABLE\]/,
    );
    await expect(assertRegularFile(tempDir(), "a readable file")).rejects.toThrow(
      /received a folder \[FILE_UNREADABLE\]/,
    );
    await expect(assertRegularFile("/no/such/file", "a readable file")).rejects.toThrow(/received no such file/);
  });
  it("fsReason(): an errno code in words", () => {
    expect(fsReason({ code: "ENOSPC" })).toBe("ENOSPC: no space left on the device");
    expect(fsReason({ code: "EWHATEVER" })).toBe("EWHATEVER");
  });
});
