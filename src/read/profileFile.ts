import { InputError } from "../errors.js";
import { openRegularFile } from "./regularFile.js";

/** Largest profile file read: a profile is a few breakpoints and bands (kilobytes); 1 MiB is far beyond any real one. */
export const MAX_PROFILE_BYTES = 1 << 20;

/** The text of a profile file: a regular file (never a FIFO or device), at most MAX_PROFILE_BYTES. */
export async function readProfileText(file: string): Promise<string> {
  const { handle, stats } = await openRegularFile(file, "a readable profile file");
  try {
    if (stats.size > MAX_PROFILE_BYTES) {
      throw new InputError("PROFILE_TOO_LARGE", { file, expected: `a profile file of at most ${MAX_PROFILE_BYTES} bytes`, received: `${stats.size} bytes` });
    }
    const buf = Buffer.alloc(Math.min(stats.size, MAX_PROFILE_BYTES) + 1);
    let n = 0;
    for (;;) {
      const { bytesRead } = await handle.read(buf, n, buf.length - n, n);
      if (bytesRead === 0) break;
      n += bytesRead;
      if (n >= buf.length) throw new InputError("PROFILE_TOO_LARGE", { file, expected: `a profile file of at most ${MAX_PROFILE_BYTES} bytes`, received: "a file that grew while it was read" });
    }
    return buf.toString("utf8", 0, n);
  } catch (e) {
    if (e instanceof InputError) throw e;
    throw new InputError("FILE_UNREADABLE", { file, expected: "a readable profile file", received: String((e as NodeJS.ErrnoException).code ?? e) });
  } finally {
    await handle.close();
  }
}
