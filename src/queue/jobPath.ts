import { realpath } from "node:fs/promises";
import { isAbsolute, relative, resolve, sep } from "node:path";
import { InputError } from "../errors.js";

const inside = (root: string, p: string) => {
  const r = relative(root, p);
  return r === "" || (!r.startsWith(`..${sep}`) && r !== ".." && !isAbsolute(r));
};

/**
 * Where a job's path leads under the worker's root, or an InputError: the path must be relative, must
 * not climb out with `..`, and its real path (symbolic links followed) must still lie under the root's
 * real path. So a queued job cannot make a worker read a file outside the folder it was given.
 */
export async function resolveJobPath(root: string, jobPath: string, what: "recording" | "profile"): Promise<string> {
  const refuse = (received: string) =>
    new InputError("JOB_PATH_REFUSED", {
      file: jobPath,
      expected: `a ${what} path relative to the worker's root and inside it`,
      received,
    });
  if (jobPath === "" || isAbsolute(jobPath) || /^[a-zA-Z]:/.test(jobPath) || jobPath.includes("\0"))
    throw refuse("an absolute path");
  const realRoot = await realpath(root);
  const joined = resolve(realRoot, jobPath);
  if (!inside(realRoot, joined)) throw refuse("a path that leaves the root");
  let real: string;
  try {
    real = await realpath(joined);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputError("FILE_UNREADABLE", {
      file: jobPath,
      expected: `a readable ${what} under the worker's root`,
      received: code === "ENOENT" ? "no such file" : String(code),
    });
  }
  if (!inside(realRoot, real)) throw refuse("a link that leads out of the root");
  return real;
}

/** The path of `file` relative to `root` with forward slashes, for a job; refuses a file outside the root. */
export async function jobPathOf(root: string, file: string, option: string): Promise<string> {
  let realRoot: string;
  let real: string;
  try {
    realRoot = await realpath(root);
  } catch {
    throw new InputError("FILE_UNREADABLE", { option: "--root", expected: "a folder that exists", received: root });
  }
  try {
    real = await realpath(file);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputError("FILE_UNREADABLE", {
      file,
      expected: "a readable file",
      received: code === "ENOENT" ? "no such file" : String(code),
    });
  }
  if (!inside(realRoot, real) || real === realRoot) {
    throw new InputError("JOB_PATH_REFUSED", {
      file,
      option,
      expected: `a file inside the root ${root}`,
      received: "a file outside it",
    });
  }
  return relative(realRoot, real).split(sep).join("/");
}
