import { constants, type Stats } from "node:fs";
import { open, type FileHandle } from "node:fs/promises";
import { InputError } from "../errors.js";

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
export async function openRegularFile(file: string, what: string, option?: string): Promise<{ handle: FileHandle; stats: Stats }> {
  let handle: FileHandle;
  try {
    handle = await open(file, constants.O_RDONLY | (constants.O_NONBLOCK ?? 0));
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputError("FILE_UNREADABLE", { file, option, expected: what, received: code === "ENOENT" ? "no such file" : code === "EISDIR" ? "a folder" : fsReason(e) });
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
