import { execFileSync } from "node:child_process";
import { copyFileSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { fileSha256 } from "../../src/queue/enqueue.js";
import { embedResult, RESULT_PLACEHOLDER } from "../../src/report/embeddedResult.js";
import { readHead, readSmallText, sha256OfFile } from "../../src/read/regularFile.js";
import { cli, tempDir } from "../helpers.js";

/**
 * One way in for files (src/read/regularFile.ts): every input a command opens is a regular file or is
 * FILE_UNREADABLE at once, exit 2, saying what it is. A FIFO would block an open or a read for ever, a
 * device such as /dev/zero never ends, a folder is not a file.
 */
let dir: string;
let fifo: string;
let folder: string;
let report: string;
beforeAll(async () => {
  dir = tempDir();
  fifo = join(dir, "pipe.wav");
  execFileSync("mkfifo", [fifo]);
  folder = join(dir, "folder.wav");
  mkdirSync(folder);
  copyFileSync("samples/kb210-run-resonance.wav", join(dir, "run.wav"));
  copyFileSync("samples/profiles/kb210-controller.json", join(dir, "profile.json"));
  report = join(dir, "report.html");
  const r = await cli("check", join(dir, "run.wav"), "-p", join(dir, "profile.json"), "--report", report);
  expect(r.code).toBe(1);
});

async function refusedAtOnce(args: string[], what: RegExp): Promise<void> {
  const t0 = Date.now();
  const r = await cli(...args);
  const ms = Date.now() - t0;
  expect(r.code, `${args.join(" ")}\n${r.stdout}${r.stderr}`).toBe(2);
  expect(r.stderr, args.join(" ")).toMatch(what);
  expect(r.stderr, args.join(" ")).toMatch(/\[FILE_UNREADABLE\]/);
  expect(r.stderr.trim().split("\n").length, args.join(" ")).toBe(1);
  expect(ms, args.join(" ")).toBeLessThan(1000);
}

describe("every input is a regular file, or FILE_UNREADABLE within a second", () => {
  it("verify: the report, --recording and --profile as a FIFO, a device or a folder", async () => {
    for (const [bad, word] of [
      [fifo, /a FIFO/],
      ["/dev/zero", /a character device/],
      [folder, /a folder/],
    ] as const) {
      await refusedAtOnce(["verify", bad], word);
      await refusedAtOnce(["verify", report, "--recording", bad], word);
      await refusedAtOnce(["verify", report, "--profile", bad], word);
    }
  }, 30_000);

  it("verify: a recorded input path that is /dev/zero (no file of its name beside the report) is refused, not read", async () => {
    const html = readFileSync(report, "utf8");
    const m = /<template id="psdgate-result" data-sha256="[0-9a-f]{64}">([\s\S]*?)<\/template>/.exec(html)!;
    const doc = JSON.parse(m[1]!.replace(/&lt;/g, "<").replace(/&gt;/g, ">").replace(/&amp;/g, "&")) as {
      result: { input: { file: string } };
      format?: string;
      page?: unknown;
    };
    delete doc.format;
    delete doc.page;
    doc.result.input.file = "/dev/zero";
    const d = tempDir();
    copyFileSync(join(dir, "profile.json"), join(d, "profile.json"));
    writeFileSync(
      join(d, "r.html"),
      embedResult(
        html.slice(0, m.index) + RESULT_PLACEHOLDER + html.slice(m.index + m[0].length),
        doc as unknown as Record<string, unknown>,
      ),
    );
    await refusedAtOnce(["verify", join(d, "r.html")], /\/dev\/zero.*a character device/);
  }, 30_000);

  it("respond: SOURCE and --against as a FIFO, a device or a folder", async () => {
    for (const [bad, word] of [
      [fifo, /a FIFO/],
      [join(dir, "pipe2.csv"), /a FIFO/],
      ["/dev/zero", /a character device/],
      [folder, /a folder/],
    ] as const) {
      if (bad.endsWith("pipe2.csv")) execFileSync("mkfifo", [bad]);
      await refusedAtOnce(["respond", bad, "--fn", "10:1000:10", "--q", "10"], word);
      await refusedAtOnce(
        ["respond", "samples/profiles/kb210-controller.json", "--fn", "10:1000:10", "--q", "10", "--against", bad],
        word,
      );
    }
  }, 30_000);

  it("check --profile, --meta and derive --mix as a FIFO or a device", async () => {
    const pf = join(dir, "p.json");
    execFileSync("mkfifo", [pf]);
    const mf = join(dir, "m.yaml");
    execFileSync("mkfifo", [mf]);
    await refusedAtOnce(["check", join(dir, "run.wav"), "-p", pf], /a FIFO/);
    await refusedAtOnce(["check", join(dir, "run.wav"), "-p", join(dir, "profile.json"), "--meta", mf], /a FIFO/);
    await refusedAtOnce(["derive", "--mix", mf, "--test-duration", "1h", "--out", join(dir, "o.yaml")], /a FIFO/);
    await refusedAtOnce(["check", join(dir, "run.wav"), "-p", "/dev/zero"], /a character device/);
  }, 30_000);

  it("queue add's hash (fileSha256), readSmallText, readHead and sha256OfFile refuse a FIFO, a device and a folder; sha256OfFile streams", async () => {
    for (const [bad, word] of [
      [fifo, /a FIFO/],
      ["/dev/zero", /a character device/],
      [folder, /a folder/],
    ] as const) {
      await expect(fileSha256(bad, "shown.wav")).rejects.toThrow(word);
      await expect(fileSha256(bad, "shown.wav")).rejects.toThrow(/^shown\.wav/);
      await expect(
        readSmallText(bad, { what: "a readable file", maxBytes: 10, tooLarge: "INPUT_TOO_LARGE" }),
      ).rejects.toThrow(word);
      await expect(readHead(bad, 10, "a readable file")).rejects.toThrow(word);
      await expect(sha256OfFile(bad, "a readable file")).rejects.toThrow(word);
    }
    // 3 MiB + 5 bytes: several 1 MiB pieces and a short one, the same digest as hashing all at once (node:crypto).
    const big = join(dir, "big.bin");
    const bytes = Buffer.alloc(3 * (1 << 20) + 5);
    for (let i = 0; i < bytes.length; i++) bytes[i] = (i * 2654435761) >>> 24;
    writeFileSync(big, bytes);
    const want = (await import("node:crypto")).createHash("sha256").update(bytes).digest("hex");
    expect(await sha256OfFile(big, "a readable file")).toEqual({ sha256: want, bytes: bytes.length });
    await expect(
      readSmallText(big, { what: "a readable table", maxBytes: 1 << 20, tooLarge: "INPUT_TOO_LARGE" }),
    ).rejects.toThrow(/expected a table of at most 1048576 bytes, received 3145733 bytes \[INPUT_TOO_LARGE\]/);
  });
});
