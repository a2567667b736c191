import { spawn } from "node:child_process";
import { closeSync, linkSync, readdirSync, readFileSync, statSync, symlinkSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { execFileSync } from "node:child_process";
import { describe, expect, it } from "vitest";
import { InputError } from "../../src/errors.js";
import {
  _liveTemporaryFiles,
  removeTemporaryFilesSync,
  TemporaryOutput,
  unwritable,
  writeAtomic,
} from "../../src/report/writeAtomic.js";
import { tempDir } from "../helpers.js";

const codeOf = (e: unknown) => (e instanceof InputError ? e.code : String(e));
const noTemporaries = (dir: string) => readdirSync(dir).filter((f) => f.endsWith(".tmp"));

describe("writeAtomic (no-clobber publication)", () => {
  it("writeAtomic: of two concurrent writers of one new name exactly one wins, the other gets OUTPUT_EXISTS, and the file holds the winner's bytes (50 rounds)", async () => {
    const dir = tempDir();
    for (let round = 0; round < 50; round++) {
      const target = join(dir, `race-${round}.csv`);
      const r = await Promise.allSettled([
        writeAtomic(target, "A".repeat(5000), { inputs: [], option: "--csv" }),
        writeAtomic(target, "B".repeat(7000), { inputs: [], option: "--csv" }),
      ]);
      const won = r.map((x) => x.status === "fulfilled");
      expect(won.filter(Boolean).length, `round ${round}`).toBe(1);
      const lost = r.find((x) => x.status === "rejected") as PromiseRejectedResult;
      expect(codeOf(lost.reason)).toBe("OUTPUT_EXISTS");
      expect(readFileSync(target, "utf8")).toBe(won[0] ? "A".repeat(5000) : "B".repeat(7000));
    }
    expect(noTemporaries(dir)).toEqual([]);
    expect(_liveTemporaryFiles()).toEqual([]);
  });

  it("writeAtomic: an existing name needs force; with force the content is replaced", async () => {
    const dir = tempDir();
    const t = join(dir, "x.csv");
    writeFileSync(t, "old");
    await expect(writeAtomic(t, "new", { inputs: [], option: "--csv" })).rejects.toMatchObject({
      code: "OUTPUT_EXISTS",
    });
    await writeAtomic(t, "new", { inputs: [], option: "--csv", force: true });
    expect(readFileSync(t, "utf8")).toBe("new");
  });

  it("writeAtomic: a device, a FIFO or a folder is never replaced, even with force", async () => {
    const dir = tempDir();
    const fifo = join(dir, "pipe");
    execFileSync("mkfifo", [fifo]);
    for (const t of ["/dev/null", fifo, dir]) {
      const e = await writeAtomic(t, "x", { inputs: [], option: "--csv", force: true }).catch((x: unknown) => x);
      expect(codeOf(e), t).toBe("OUTPUT_UNWRITABLE");
      expect((e as Error).message).toMatch(/a character device|a FIFO|a folder/);
    }
    expect(statSync("/dev/null").isCharacterDevice()).toBe(true);
    expect(statSync(fifo).isFIFO()).toBe(true);
    expect(noTemporaries(dir)).toEqual([]);
  });

  it("writeAtomic: an input is protected by real path, through a symbolic link and through a hard link", async () => {
    const dir = tempDir();
    const input = join(dir, "list.txt");
    writeFileSync(input, "keep");
    symlinkSync(input, join(dir, "sym.txt"));
    linkSync(input, join(dir, "hard.txt"));
    for (const t of [input, join(dir, "sym.txt"), join(dir, "hard.txt"), join(dir, ".", "list.txt")]) {
      await expect(writeAtomic(t, "x", { inputs: [input], option: "--csv", force: true }), t).rejects.toMatchObject({
        code: "OUTPUT_IS_INPUT",
      });
    }
    expect(readFileSync(input, "utf8")).toBe("keep");
  });

  it("writeAtomic: ENOTDIR, ENAMETOOLONG and ENOENT become OUTPUT_UNWRITABLE with the reason, and leave no temporary file", async () => {
    const dir = tempDir();
    writeFileSync(join(dir, "file"), "");
    const cases: [string, RegExp][] = [
      [join(dir, "file", "out.csv"), /ENOTDIR: a part of the path is not a folder/],
      [join(dir, `${"n".repeat(300)}.csv`), /ENAMETOOLONG: the name is too long/],
      [join(dir, "none", "out.csv"), /ENOENT/],
    ];
    for (const [t, reason] of cases) {
      const e = await writeAtomic(t, "x", { inputs: [], option: "--csv" }).catch((x: unknown) => x);
      expect(codeOf(e)).toBe("OUTPUT_UNWRITABLE");
      expect((e as Error).message).toMatch(reason);
    }
    expect(readdirSync(dir)).toEqual(["file"]);
    expect(_liveTemporaryFiles()).toEqual([]);
  });

  it("unwritable(): ENOSPC, EROFS, EACCES and EDQUOT are OUTPUT_UNWRITABLE naming the reason; other errors pass through", () => {
    for (const [code, words] of [
      ["ENOSPC", "no space left"],
      ["EROFS", "a read-only"],
      ["EACCES", "permission denied"],
      ["EDQUOT", "disk quota"],
    ] as const) {
      const e = unwritable("out.csv", "--csv", Object.assign(new Error(code), { code }));
      expect(e).toBeInstanceOf(InputError);
      expect((e as InputError).code).toBe("OUTPUT_UNWRITABLE");
      expect((e as Error).message).toContain(`out.csv (${code}: ${words}`);
    }
    const other = new RangeError("bug");
    expect(unwritable("out.csv", "--csv", other)).toBe(other);
  });

  it("removeTemporaryFilesSync (the CLI's signal handler): every live temporary file is gone at once, mid-write", async () => {
    const dir = tempDir();
    const outs = await Promise.all(
      ["a.html", "b.html", "c.wav"].map((n) =>
        TemporaryOutput.create(join(dir, n), { inputs: [], option: "--report-dir" }),
      ),
    );
    await Promise.all(outs.map((o) => o.write(Buffer.alloc(1 << 16, 1), 0)));
    expect(readdirSync(dir).filter((f) => f.endsWith(".tmp")).length).toBe(3);
    removeTemporaryFilesSync();
    expect(readdirSync(dir)).toEqual([]);
    expect(_liveTemporaryFiles()).toEqual([]);
    for (const o of outs) closeSync(o.fd);
  });

  it("TemporaryOutput: a write error after the file is open becomes OUTPUT_UNWRITABLE and discard removes the temporary", async () => {
    const dir = tempDir();
    const out = await TemporaryOutput.create(join(dir, "o.wav"), { inputs: [], option: "--out" });
    expect(_liveTemporaryFiles()).toEqual([out.path]);
    closeSync(out.fd);
    await expect(out.write(Buffer.from("x"), 0)).rejects.toMatchObject({ code: "OUTPUT_UNWRITABLE" });
    await out.discard();
    expect(readdirSync(dir)).toEqual([]);
    expect(_liveTemporaryFiles()).toEqual([]);
  });
});

/** Runs the built CLI; resolves with its exit code and stderr. */
function run(args: string[], cwd?: string): Promise<{ code: number | null; stderr: string }> {
  return new Promise((resolve) => {
    const p = spawn(process.execPath, [join(process.cwd(), "bin/psdgate.js"), ...args], {
      cwd,
      stdio: ["ignore", "ignore", "pipe"],
    });
    let stderr = "";
    p.stderr.on("data", (d) => (stderr += d));
    p.on("close", (code) => resolve({ code, stderr }));
  });
}

describe("two processes writing one --report without --force (built CLI)", () => {
  it("exactly one succeeds, the other gets OUTPUT_EXISTS, and the report holds the winner's verdict (4 rounds)", async () => {
    const dir = tempDir();
    const kb = join(process.cwd(), "samples/profiles/kb210-controller.json");
    for (let round = 0; round < 4; round++) {
      const report = join(dir, `r${round}.html`);
      const [pass, fail] = await Promise.all([
        run(["check", join(process.cwd(), "samples/kb210-run.wav"), "--profile", kb, "--report", report, "--quiet"]),
        run([
          "check",
          join(process.cwd(), "samples/kb210-run-resonance.wav"),
          "--profile",
          kb,
          "--report",
          report,
          "--quiet",
        ]),
      ]);
      const lost = [pass, fail].filter((r) => r.stderr.includes("[OUTPUT_EXISTS]"));
      expect(lost.length, `round ${round}: ${pass.stderr} ${fail.stderr}`).toBe(1);
      const html = readFileSync(report, "utf8");
      const winnerPassed = lost[0] === fail;
      expect(html.includes("kb210-run-resonance.wav")).toBe(!winnerPassed);
      expect(pass.code === 0 || lost[0] === pass).toBe(true);
    }
    expect(noTemporaries(dir)).toEqual([]);
  }, 60_000);
});
