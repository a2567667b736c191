import { createHash } from "node:crypto";
import { constants, existsSync, type Stats } from "node:fs";
import { open, type FileHandle } from "node:fs/promises";
import { InputError, type ErrorCode } from "../errors.js";

/** What a path is, in words, for messages: "a FIFO (named pipe)", "a character device", … */
export function fileKind(st: Stats): string {
  if (st.isFile()) return "a regular file";
  if (st.isDirectory()) return "a folder";
  if (st.isFIFO()) return "a FIFO (named pipe)";
  if (st.isCharacterDevice()) return "a character device";
  if (st.isBlockDevice()) return "a block device";
  if (st.isSocket()) return "a socket";
  if (st.isSymbolicLink()) return "a symbolic link";
  return "not a regular file";
}

/** File-system error codes in words, for the "received" part of a message. */
const REASONS: Record<string, string> = {
  ENOENT: "no such file or folder",
  ENOTDIR: "a part of the path is not a folder",
  EISDIR: "a folder",
  EACCES: "permission denied",
  EPERM: "operation not permitted",
  EROFS: "a read-only file system",
  ENOSPC: "no space left on the device",
  EDQUOT: "disk quota exceeded",
  ENAMETOOLONG: "the name is too long",
  ELOOP: "too many symbolic links",
  EMFILE: "too many open files",
  ENFILE: "too many open files",
  EIO: "an input/output error",
  EFBIG: "the file is too large",
  EXDEV: "on another file system",
  EBUSY: "busy",
  ETXTBSY: "busy",
  EINVAL: "an invalid name",
  EEXIST: "exists",
};

/** `ENOSPC: no space left on the device`, or the error's own message when it has no code. */
export function fsReason(e: unknown): string {
  const code = (e as NodeJS.ErrnoException)?.code;
  if (typeof code === "string") return REASONS[code] ? `${code}: ${REASONS[code]}` : code;
  return String((e as Error)?.message ?? e);
}

/** Whether `e` is an error from the file system (it carries an errno code such as `ENOSPC`). */
export function isFsError(e: unknown): e is NodeJS.ErrnoException {
  const code = (e as NodeJS.ErrnoException)?.code;
  return typeof code === "string" && /^E[A-Z0-9]+$/.test(code);
}

/**
 * Open `file` for reading only if it is a regular file. The open uses O_NONBLOCK, so a FIFO cannot
 * block it (open(2) on a FIFO for reading waits for a writer otherwise), and the type is taken from
 * the opened descriptor (fstat), so a file swapped in between cannot slip past. A FIFO, device,
 * folder or socket is FILE_UNREADABLE naming what it is: /dev/zero is a character device, not an
 * empty file.
 */
export async function openRegularFile(
  file: string,
  what: string,
  option?: string,
): Promise<{ handle: FileHandle; stats: Stats }> {
  let handle: FileHandle;
  try {
    handle = await open(file, constants.O_RDONLY | (constants.O_NONBLOCK ?? 0));
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputError("FILE_UNREADABLE", {
      file,
      option,
      expected: what,
      received: code === "ENOENT" ? "no such file" : code === "EISDIR" ? "a folder" : fsReason(e),
    });
  }
  let stats: Stats;
  try {
    stats = await handle.stat();
  } catch (e) {
    await handle.close().catch(() => undefined);
    throw new InputError("FILE_UNREADABLE", { file, option, expected: what, received: fsReason(e) });
  }
  if (!stats.isFile()) {
    await handle.close().catch(() => undefined);
    throw new InputError("FILE_UNREADABLE", { file, option, expected: what, received: fileKind(stats) });
  }
  return { handle, stats };
}

/** Check that `file` is a readable regular file (see openRegularFile), then close it. */
export async function assertRegularFile(file: string, what: string, option?: string): Promise<Stats> {
  const { handle, stats } = await openRegularFile(file, what, option);
  await handle.close();
  return stats;
}

/** Size of each piece a streaming read takes (1 MiB: few system calls, flat memory). */
const PIECE = 1 << 20;

export interface SmallTextOptions {
  /** What the file should be, in words, for messages ("a readable profile file"). */
  what: string;
  /** The option that named it, for messages. */
  option?: string | undefined;
  /** Largest size read; a larger file is `tooLarge` before any of it is read. */
  maxBytes: number;
  /** The code of a file over maxBytes (or one that grows past it while it is read). */
  tooLarge: ErrorCode;
}

/**
 * The whole text (UTF-8) of a small settings file: a regular file only (openRegularFile), at most
 * `maxBytes`, read through the opened descriptor so that a file that grows while it is read is refused too.
 * Returns the bytes as well, for a digest of exactly what was parsed.
 */
export async function readSmallText(file: string, o: SmallTextOptions): Promise<{ text: string; bytes: Buffer }> {
  const { handle, stats } = await openRegularFile(file, o.what, o.option);
  const tooLarge = (received: string) =>
    new InputError(o.tooLarge, {
      file,
      option: o.option,
      expected: `${o.what.replace(/^a readable /, "a ")} of at most ${o.maxBytes} bytes`,
      received,
    });
  try {
    if (stats.size > o.maxBytes) throw tooLarge(`${stats.size} bytes`);
    const buf = Buffer.alloc(Math.min(stats.size, o.maxBytes) + 1);
    let n = 0;
    for (;;) {
      const { bytesRead } = await handle.read(buf, n, buf.length - n, n);
      if (bytesRead === 0) break;
      n += bytesRead;
      if (n >= buf.length) throw tooLarge("a file that grew while it was read");
    }
    const bytes = buf.subarray(0, n);
    return { text: bytes.toString("utf8"), bytes };
  } catch (e) {
    if (e instanceof InputError) throw e;
    throw new InputError("FILE_UNREADABLE", { file, option: o.option, expected: o.what, received: fsReason(e) });
  } finally {
    await handle.close().catch(() => undefined);
  }
}

/**
 * SHA-256 (hex) of a regular file, read in 1 MiB pieces through one descriptor: memory stays flat for a
 * file of any size, and a FIFO, device or folder is FILE_UNREADABLE at once (openRegularFile);
 * a regular file that is swapped or grows while it is read is hashed as read: the caller compares the digest.
 */
export async function sha256OfFile(
  file: string,
  what: string,
  option?: string,
): Promise<{ sha256: string; bytes: number }> {
  const { handle } = await openRegularFile(file, what, option);
  const h = createHash("sha256");
  const buf = Buffer.allocUnsafe(PIECE);
  let total = 0;
  try {
    for (;;) {
      const { bytesRead } = await handle.read(buf, 0, PIECE, null);
      if (bytesRead === 0) break;
      h.update(buf.subarray(0, bytesRead));
      total += bytesRead;
    }
  } catch (e) {
    throw new InputError("FILE_UNREADABLE", { file, option, expected: what, received: fsReason(e) });
  } finally {
    await handle.close().catch(() => undefined);
  }
  return { sha256: h.digest("hex"), bytes: total };
}

/** The first `bytes` bytes of a regular file (fewer if it is shorter), to tell what kind of file it is. */
export async function readHead(file: string, bytes: number, what: string, option?: string): Promise<Buffer> {
  const { handle } = await openRegularFile(file, what, option);
  try {
    const b = Buffer.alloc(bytes);
    const { bytesRead } = await handle.read(b, 0, bytes, 0);
    return b.subarray(0, bytesRead);
  } catch (e) {
    throw new InputError("FILE_UNREADABLE", { file, option, expected: what, received: fsReason(e) });
  } finally {
    await handle.close().catch(() => undefined);
  }
}

/** Whether anything is at `path` (a file, a folder, a device, a FIFO): where to look, not whether to read it. */
export function pathExists(path: string): boolean {
  return existsSync(path);
}
