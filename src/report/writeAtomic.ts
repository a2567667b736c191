import { randomBytes } from "node:crypto";
import { close, constants, openSync, realpathSync, rmSync, statSync, write, type Stats } from "node:fs";
import { copyFile, link, mkdir, rename, rm, stat } from "node:fs/promises";
import { promisify } from "node:util";
import { basename, dirname, join, resolve } from "node:path";
import { InputError } from "../errors.js";
import { fileKind, fsReason, isFsError } from "../read/regularFile.js";

/**
 * Publishing an output file without ever leaving half of it, clobbering another file, or replacing
 * an input or a device:
 *
 * 1. the content goes to a temporary file in the target's folder (`.name.<random>.tmp`, created
 *    with O_EXCL), which is registered as live until it is gone;
 * 2. without --force, link(2) gives it the target name. link fails with EEXIST if the name exists,
 *    so of two processes racing for one name exactly one wins and the other gets OUTPUT_EXISTS;
 *    the temporary name is then removed. With --force, rename(2) replaces the target atomically;
 * 3. a target that exists and is not a regular file (a device, FIFO, folder, socket) is refused,
 *    --force or not: /dev/null is never replaced by a file;
 * 4. an output that is one of the inputs (same real path, or the same device and inode, as a hard
 *    link is) is refused;
 * 5. every file-system error (ENOSPC, ENOTDIR, ENAMETOOLONG, EACCES, EROFS, …) is OUTPUT_UNWRITABLE
 *    with its reason, and the temporary file is removed. The CLI removes live temporary files on
 *    SIGINT, SIGTERM and SIGHUP too (removeTemporaryFilesSync).
 *
 * On a file system without hard links (link gives EPERM/ENOTSUP), step 2 falls back to an exclusive
 * copy (COPYFILE_EXCL): still no clobbering, but a reader may see the copy while it is being made.
 */
export interface OutputOptions {
  /** Files the output must never replace (recordings, profiles, file lists). `-` is ignored. */
  inputs: string[];
  force?: boolean | undefined;
  /** The option that named the output, for messages (`--csv`, `--report`, …). */
  option: string;
}

const live = new Set<string>();
const writeAt = (fd: number, b: Uint8Array, off: number, len: number, pos: number) =>
  new Promise<number>((resolve, reject) => write(fd, b, off, len, pos, (e, n) => (e ? reject(e) : resolve(n))));
const closeFd = promisify(close);

/** @internal Temporary files that exist now (for tests). */
export function _liveTemporaryFiles(): string[] {
  return [...live];
}

/** Remove every live temporary file, synchronously (for a signal handler or `exit`). */
export function removeTemporaryFilesSync(): void {
  for (const t of live) {
    try {
      rmSync(t, { force: true });
    } catch {
      // Nothing more can be done on the way out.
    }
    live.delete(t);
  }
}

function canonical(p: string): string {
  try {
    return realpathSync(p);
  } catch {
    return resolve(p);
  }
}

function statOrUndefined(p: string): Stats | undefined {
  try {
    return statSync(p);
  } catch {
    return undefined;
  }
}

/** A temporary file name beside `target` (same folder, so link and rename stay on one file system). */
export function temporaryPathFor(target: string): string {
  return join(dirname(target), `.${basename(target)}.${randomBytes(6).toString("hex")}.tmp`);
}

/** OUTPUT_UNWRITABLE with the file-system reason, for any error that has an errno code; others pass through. */
export function unwritable(target: string, option: string, e: unknown): unknown {
  if (e instanceof InputError || !isFsError(e)) return e;
  return new InputError("OUTPUT_UNWRITABLE", {
    option,
    expected: "a writable path",
    received: `${target} (${fsReason(e)})`,
  });
}

/**
 * checkOutputPath for each output a command was given ([option, path], unset ones skipped), and no two of them the
 * same file: `--csv x --report x` would write one and replace it with the other (OPTION_CONFLICT, before any is
 * written).
 */
export function checkOutputPaths(
  outputs: readonly [string, string | undefined][],
  inputs: string[],
  force: boolean | undefined,
): void {
  const given = outputs.filter((o): o is [string, string] => o[1] !== undefined);
  for (const [k, [option, path]] of given.entries()) {
    const same = given.slice(0, k).find(([, p]) => canonical(p) === canonical(path));
    if (same)
      throw new InputError("OPTION_CONFLICT", {
        option,
        expected: `an output path different from ${same[0]}'s`,
        received: path,
      });
    checkOutputPath(path, inputs, force, option);
  }
}

/**
 * Refuse an output that is one of the inputs, that exists and is not a regular file, or (without
 * `force`) that exists at all. Called before the work starts, and again just before publishing.
 */
export function checkOutputPath(target: string, inputs: string[], force: boolean | undefined, option: string): void {
  const t = canonical(target);
  const ts = statOrUndefined(target);
  for (const i of inputs) {
    if (i === "-") continue;
    const is = ts ? statOrUndefined(i) : undefined;
    if (canonical(i) === t || (ts && is && ts.dev === is.dev && ts.ino === is.ino)) {
      throw new InputError("OUTPUT_IS_INPUT", {
        option,
        expected: "an output path different from every input",
        received: i === target ? target : `${target} (the same file as ${i})`,
      });
    }
  }
  if (ts && !ts.isFile()) {
    throw new InputError("OUTPUT_UNWRITABLE", {
      option,
      expected: "a regular file or a new name",
      received: `${target} (${fileKind(ts)}; psdgate never replaces one)`,
    });
  }
  if (ts && !force) {
    throw new InputError("OUTPUT_EXISTS", {
      option,
      expected: "a new file",
      received: `${target} (exists)`,
      hint: "add --force to replace it",
    });
  }
}

/** An output being written: a live temporary file that becomes the target on publish. */
export class TemporaryOutput {
  private done = false;
  private closed = false;
  private constructor(
    readonly target: string,
    readonly path: string,
    readonly fd: number,
    private readonly opts: OutputOptions,
  ) {}

  static async create(target: string, opts: OutputOptions): Promise<TemporaryOutput> {
    checkOutputPath(target, opts.inputs, opts.force, opts.option);
    const tmp = temporaryPathFor(target);
    // Created synchronously: an asynchronous open still running on libuv's thread pool when a signal
    // handler has emptied the registry would create the file just before exit, and leave it behind.
    let fd: number;
    try {
      fd = openSync(tmp, "wx");
    } catch (e) {
      throw unwritable(target, opts.option, e);
    }
    live.add(tmp);
    return new TemporaryOutput(target, tmp, fd, opts);
  }

  /** Write `b` at byte `position`; a file-system error becomes OUTPUT_UNWRITABLE. */
  async write(b: Uint8Array, position: number): Promise<void> {
    try {
      let off = 0;
      while (off < b.length) {
        const bytesWritten = await writeAt(this.fd, b, off, b.length - off, position + off);
        off += bytesWritten;
      }
    } catch (e) {
      throw unwritable(this.target, this.opts.option, e);
    }
  }

  /** Close, then give the temporary file the target's name (link without force, rename with it). */
  async publish(): Promise<void> {
    try {
      await this.close();
      checkOutputPath(this.target, this.opts.inputs, this.opts.force, this.opts.option);
      if (this.opts.force) {
        await rename(this.path, this.target);
      } else {
        try {
          await link(this.path, this.target);
        } catch (e) {
          const code = (e as NodeJS.ErrnoException).code;
          if (code === "EEXIST") {
            throw new InputError("OUTPUT_EXISTS", {
              option: this.opts.option,
              expected: "a new file",
              received: `${this.target} (another process wrote it first)`,
              hint: "add --force to replace it",
            });
          }
          if (code !== "EPERM" && code !== "ENOTSUP" && code !== "EOPNOTSUPP" && code !== "ENOSYS") throw e;
          await copyFile(this.path, this.target, constants.COPYFILE_EXCL).catch((c: NodeJS.ErrnoException) => {
            if (c.code === "EEXIST")
              throw new InputError("OUTPUT_EXISTS", {
                option: this.opts.option,
                expected: "a new file",
                received: `${this.target} (exists)`,
                hint: "add --force to replace it",
              });
            throw c;
          });
        }
        await rm(this.path, { force: true });
      }
      live.delete(this.path);
      this.done = true;
    } catch (e) {
      await this.discard();
      throw unwritable(this.target, this.opts.option, e);
    }
  }

  private async close(): Promise<void> {
    if (this.closed) return;
    this.closed = true;
    await closeFd(this.fd);
  }

  /** Close and remove the temporary file (after an error). */
  async discard(): Promise<void> {
    if (this.done) return;
    this.done = true;
    await this.close().catch(() => undefined);
    await rm(this.path, { force: true }).catch(() => undefined);
    live.delete(this.path);
  }
}

/**
 * Write `content` to `target` atomically and without clobbering (see above): a crash never leaves a
 * half-written output, and a concurrent writer of the same name never has its file replaced.
 */
export async function writeAtomic(target: string, content: string | Uint8Array, opts: OutputOptions): Promise<void> {
  const out = await TemporaryOutput.create(target, opts);
  try {
    await out.write(typeof content === "string" ? Buffer.from(content) : content, 0);
  } catch (e) {
    await out.discard();
    throw e;
  }
  await out.publish();
}

/**
 * A folder and any missing folders above it, made one level at a time (mkdir without `recursive`): Node 20's
 * recursive mkdir never settles for a path under /proc whose parent cannot be made, so a wrong --report-dir
 * hung instead of failing. Throws the file system's error (ENOENT, EACCES, ENOTDIR, ...) for the first level
 * that cannot be made, and ENOTDIR when the path exists and is not a folder.
 */
export async function makeFolders(dir: string): Promise<void> {
  const target = resolve(dir);
  const missing: string[] = [];
  for (let p = target; ; p = dirname(p)) {
    const found = await stat(p).then(
      (st) => st,
      (e: unknown) => {
        if (isFsError(e) && e.code === "ENOENT") return undefined;
        throw e;
      },
    );
    if (found !== undefined) {
      if (p === target && !found.isDirectory())
        throw Object.assign(new Error(`${target} is not a folder`), { code: "ENOTDIR" });
      break;
    }
    missing.push(p);
    if (dirname(p) === p) break;
  }
  for (const m of missing.reverse()) {
    await mkdir(m).catch((e: unknown) => {
      if (!(isFsError(e) && e.code === "EEXIST")) throw e;
    });
  }
}
