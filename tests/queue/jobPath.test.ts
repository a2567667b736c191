import { mkdirSync, symlinkSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { InputError } from "../../src/errors.js";
import { jobPathOf, resolveJobPath } from "../../src/queue/jobPath.js";
import { tempDir } from "../helpers.js";

const base = tempDir();
const root = join(base, "root");
mkdirSync(join(root, "runs"), { recursive: true });
writeFileSync(join(root, "runs", "a.csv"), "x");
writeFileSync(join(base, "secret.txt"), "no");
symlinkSync(join(base, "secret.txt"), join(root, "runs", "out.csv"));
symlinkSync(join(root, "runs", "a.csv"), join(root, "runs", "in.csv"));

async function code(p: Promise<unknown>): Promise<string> {
  try {
    await p;
    return "none";
  } catch (e) {
    return e instanceof InputError ? `${e.code}: ${e.message}` : `other: ${e}`;
  }
}

describe("resolveJobPath", () => {
  it("resolveJobPath(root, 'runs/a.csv') is the file's real path under the root", async () => {
    expect(await resolveJobPath(root, "runs/a.csv", "recording")).toMatch(/root\/runs\/a\.csv$/);
    expect(await resolveJobPath(root, "runs/in.csv", "recording")).toMatch(/root\/runs\/a\.csv$/);
  });
  it("refuses an absolute path, a climb out with '..' and a link that leads out, with JOB_PATH_REFUSED", async () => {
    expect(await code(resolveJobPath(root, join(root, "runs", "a.csv"), "recording"))).toMatch(
      /^JOB_PATH_REFUSED: .*received an absolute path/,
    );
    expect(await code(resolveJobPath(root, "../secret.txt", "recording"))).toMatch(
      /^JOB_PATH_REFUSED: .*leaves the root/,
    );
    expect(await code(resolveJobPath(root, "runs/../../secret.txt", "recording"))).toMatch(/^JOB_PATH_REFUSED/);
    expect(await code(resolveJobPath(root, "runs/out.csv", "recording"))).toMatch(
      /^JOB_PATH_REFUSED: runs\/out\.csv: .*link that leads out/,
    );
  });
  it("a missing file is FILE_UNREADABLE named by the job's path", async () => {
    expect(await code(resolveJobPath(root, "runs/gone.csv", "recording"))).toMatch(
      /^FILE_UNREADABLE: runs\/gone\.csv: .*no such file/,
    );
  });
});

describe("jobPathOf", () => {
  it("jobPathOf(root, file) is the path relative to the root with forward slashes; a file outside is refused", async () => {
    expect(await jobPathOf(root, join(root, "runs", "a.csv"), "--root")).toBe("runs/a.csv");
    expect(await code(jobPathOf(root, join(base, "secret.txt"), "--root"))).toMatch(
      /^JOB_PATH_REFUSED: .*inside the root/,
    );
    expect(await code(jobPathOf(join(base, "nope"), join(root, "runs", "a.csv"), "--root"))).toMatch(
      /^FILE_UNREADABLE: .*--root/,
    );
  });
});
