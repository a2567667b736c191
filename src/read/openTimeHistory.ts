import { InputError } from "../errors.js";
import { MAX_CHANNELS } from "./analysisLimits.js";
import { openCsvTimeHistory, type CsvReadOptions } from "./csvTimeHistory.js";
import { openRegularFile } from "./regularFile.js";
import type { TimeHistorySource } from "./timeHistory.js";
import { openWavTimeHistory } from "./wavTimeHistory.js";

/**
 * Open a recording by its content: a RIFF, RIFX, RF64 or BW64 signature (EBU Tech 3306) or a `.wav` name means WAV,
 * anything else text.
 */
export async function openTimeHistory(file: string, csv: CsvReadOptions = {}): Promise<TimeHistorySource> {
  // Only a regular file is opened: a FIFO would block the read for ever, and /dev/zero is a device, not an empty file.
  const { handle: fh } = await openRegularFile(file, "a readable file");
  let magic: Buffer;
  try {
    const b = Buffer.alloc(4);
    const { bytesRead } = await fh.read(b, 0, 4, 0);
    magic = b.subarray(0, bytesRead);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputError("FILE_UNREADABLE", {
      file,
      expected: "a readable file",
      received: code === "EISDIR" ? "a folder" : String(code),
    });
  } finally {
    await fh.close();
  }
  const sig = magic.toString("latin1");
  let source: TimeHistorySource;
  if (sig === "RIFF" || sig === "RIFX" || sig === "RF64" || sig === "BW64" || /\.wave?$/i.test(file)) {
    if (
      csv.timeColumn !== undefined ||
      csv.delimiter !== undefined ||
      csv.decimal !== undefined ||
      csv.timeUnit !== undefined ||
      csv.sampleRateHz !== undefined
    ) {
      throw new InputError("OPTION_NOT_FOR_WAV", {
        file,
        expected:
          "no CSV options (`csv.sampleRateHz`, `csv.timeColumn`, `csv.timeUnit`, `csv.delimiter`, `csv.decimal`) for a WAV file",
        received: "CSV options",
        hint: "a WAV file states its own sample rate",
      });
    }
    source = await openWavTimeHistory(file);
  } else source = await openCsvTimeHistory(file, csv);
  // Checked before any per-channel buffer exists (analysis limits: analysisLimits.ts).
  if (source.info.channels.length > MAX_CHANNELS) {
    await source.close?.();
    throw new InputError("TOO_MANY_CHANNELS", {
      file,
      expected: `at most ${MAX_CHANNELS} channels (${source.info.format === "csv" ? "columns" : "channels in the format chunk"})`,
      received: `${source.info.channels.length}`,
    });
  }
  return source;
}
