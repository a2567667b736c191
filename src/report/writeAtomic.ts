import { randomBytes } from "node:crypto";
import { existsSync, realpathSync } from "node:fs";
import { rename, rm, writeFile } from "node:fs/promises";
import { basename, dirname, join, resolve } from "node:path";
import { InputError } from "../errors.js";

function canonical(p: string): string {
  try {
    return realpathSync(p);
  } catch {
    return resolve(p);
  }
}

/** A temporary file beside `target` (same folder, so the final rename is atomic). */
export function temporaryPathFor(target: string): string {
  return join(dirname(target), `.${basename(target)}.${randomBytes(4).toString("hex")}.tmp`);
}

/** Refuse an output that is one of the inputs (by real path) or, without `force`, an existing file. */
export function checkOutputPath(target: string, inputs: string[], force: boolean | undefined, option: string): void {
  const t = canonical(target);
  if (inputs.some((i) => canonical(i) === t)) {
    throw new InputError("OUTPUT_IS_INPUT", { option, expected: "an output path different from every input", received: target });
  }
  if (existsSync(target) && !force) {
    throw new InputError("OUTPUT_EXISTS", { option, expected: "a new file", received: `${target} (exists)`, hint: "add --force to replace it" });
  }
}

/**
 * Write `content` to `target` atomically: a temporary file in the same folder, then rename, so a crash
 * never leaves a half-written output. Refuses to write onto any input, and onto an existing file
 * unless `force`.
 */
export async function writeAtomic(target: string, content: string, opts: { inputs: string[]; force?: boolean | undefined; option: string }): Promise<void> {
  checkOutputPath(target, opts.inputs, opts.force, opts.option);
  const tmp = temporaryPathFor(target);
  try {
    await writeFile(tmp, content, { flag: "wx" });
    await rename(tmp, target);
  } catch (e) {
    await rm(tmp, { force: true });
    const code = (e as NodeJS.ErrnoException).code;
    if (code === "ENOENT" || code === "EACCES" || code === "EISDIR" || code === "EROFS") {
      throw new InputError("OUTPUT_UNWRITABLE", { option: opts.option, expected: "a writable path", received: `${target} (${code})` });
    }
    throw e;
  }
}
