import { existsSync } from "node:fs";
import { fsReason, openRegularFile } from "../read/regularFile.js";
import { InputError } from "../errors.js";

/**
 * Expand the command's file arguments: globs (quoted, so the shell left them), `-` for a list on stdin, and
 * --files-from.
 */
export async function expandFiles(
  args: string[],
  filesFrom: string | undefined,
  readStdin: () => Promise<string>,
): Promise<string[]> {
  const out: string[] = [];
  const fromList = (text: string) =>
    text
      .split(/\r?\n/)
      .map((l) => l.trim())
      .filter((l) => l !== "" && !l.startsWith("#"));
  if (filesFrom !== undefined) {
    let text: string;
    if (filesFrom === "-") text = await readStdin();
    else {
      // A regular file only: a FIFO as the list would block for ever (read/regularFile.ts).
      const { handle } = await openRegularFile(filesFrom, "a readable list of files, one per line", "--files-from");
      try {
        text = await handle.readFile("utf8");
      } catch (e) {
        throw new InputError("FILE_UNREADABLE", {
          file: filesFrom,
          option: "--files-from",
          expected: "a readable list of files, one per line",
          received: fsReason(e),
        });
      } finally {
        await handle.close();
      }
    }
    out.push(...fromList(text));
  }
  for (const a of args) {
    if (a === "-") out.push(...fromList(await readStdin()));
    // A name that exists is taken as it is, even if it holds glob characters (`run[1].wav`).
    else if (/[*?[{]/.test(a) && !existsSync(a)) {
      const { glob } = await import("tinyglobby");
      const found = (await glob(a, { onlyFiles: true, expandDirectories: false })).sort();
      if (found.length === 0)
        throw new InputError("NO_FILES_MATCH", {
          expected: "at least one file matching the pattern",
          received: JSON.stringify(a),
        });
      out.push(...found);
    } else out.push(a);
  }
  if (out.length === 0)
    throw new InputError("NO_FILES", {
      expected: "a recording to analyse (a file, a glob, - or --files-from)",
      received: "none",
    });
  return out;
}
