import { open } from "node:fs/promises";
import { InputError } from "../errors.js";
import { openCsvTimeHistory, type CsvReadOptions } from "./csvTimeHistory.js";
import type { TimeHistorySource } from "./timeHistory.js";
import { openWavTimeHistory } from "./wavTimeHistory.js";

/** Open a recording by its content: a RIFF/WAVE signature or a `.wav` name means WAV, anything else text. */
export async function openTimeHistory(file: string, csv: CsvReadOptions = {}): Promise<TimeHistorySource> {
  let fh;
  try {
    fh = await open(file, "r");
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputError("FILE_UNREADABLE", { file, expected: "a readable file", received: code === "ENOENT" ? "no such file" : code === "EISDIR" ? "a folder" : String(code) });
  }
  let magic: Buffer;
  try {
    const b = Buffer.alloc(4);
    const { bytesRead } = await fh.read(b, 0, 4, 0);
    magic = b.subarray(0, bytesRead);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputError("FILE_UNREADABLE", { file, expected: "a readable file", received: code === "EISDIR" ? "a folder" : String(code) });
  } finally {
    await fh.close();
  }
  const sig = magic.toString("latin1");
  if (sig === "RIFF" || sig === "RIFX" || /\.wave?$/i.test(file)) {
    if (csv.timeColumn !== undefined || csv.delimiter !== undefined || csv.decimal !== undefined) {
      throw new InputError("OPTION_NOT_FOR_WAV", { file, expected: "no CSV options (--time-column, --delimiter, --decimal) for a WAV file", received: "CSV options" });
    }
    return openWavTimeHistory(file);
  }
  return openCsvTimeHistory(file, csv);
}
