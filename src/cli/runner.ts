import { stat } from "node:fs/promises";
import { availableParallelism } from "node:os";
import type { Command } from "commander";
import type { RecordingAnalysis } from "../pass/analyzeRecording.js";
import type { CheckOptions, CheckResult } from "../analyses/checkRecording.js";
import type { TestProfile } from "../compare/testProfile.js";
import { EXIT } from "../errors.js";
import { table } from "../report/format.js";
import { printable } from "../report/printable.js";
import { toolInfo } from "../report/psdJson.js";
import { fullScaleLines } from "../report/psdText.js";
import { VERSION } from "../version.js";
import type { Outcome } from "./batch.js";
import type { CliIo } from "./io.js";
import { asCliError } from "./optionFlags.js";
import { analysisOptions, numberOption, type ParsedCommon } from "./options.js";
import { createProgress, progressEnabled } from "./progress.js";

/**
 * The one runner behind the commands that take many recordings (psd, check): one recording in this
 * thread with a progress bar, several on the batch pool with JSON Lines or a summary table.
 */

/** Exit code of a set of outcomes: input error over fail over inconclusive over pass. */
const RANK: Record<number, number> = {
  [EXIT.ok]: 0,
  [EXIT.inconclusive]: 1,
  [EXIT.fail]: 2,
  [EXIT.input]: 3,
  [EXIT.internal]: 4,
};
export function worst(codes: number[]): number {
  return codes.reduce((a, b) => (RANK[b]! > RANK[a]! ? b : a), EXIT.ok);
}

export interface BatchFlags {
  json?: boolean;
  force?: boolean;
  jobs?: number;
  quiet?: boolean;
  filesFrom?: string;
}

export function addBatchOptions(cmd: Command): Command {
  return cmd
    .option("--json", "print the result as JSON (one JSON line per recording when there are several)")
    .option(
      "-j, --jobs <n>",
      "recordings analysed at once (default: the number of cores)",
      numberOption("--jobs", (x) => Number.isInteger(x) && x >= 1 && x <= 256, "a whole number from 1 to 256"),
    )
    .option("--files-from <list>", "read recording paths, one per line, from this file (- for stdin)")
    .option("-q, --quiet", "no progress bar")
    .option("--force", "replace an existing output file");
}

export interface Runner {
  one<T>(o: BatchFlags, run: (onProgress: (done: number, total: number) => void) => Promise<T>): Promise<T>;
  many<T extends RecordingAnalysis | CheckResult>(
    files: string[],
    o: ParsedCommon & BatchFlags & { control?: CheckOptions["control"] },
    profile: TestProfile | undefined,
    code: (r: T) => number,
    summaryRow: (r: T, index: number) => string[][],
    header: string[],
    jsonOf: (r: T) => unknown,
  ): Promise<number>;
}

export function runnerFor(io: CliIo): Runner {
  const env = io.env ?? {};
  const progressFor = (o: BatchFlags) =>
    createProgress(progressEnabled(io.stderrIsTTY === true, o.quiet === true, env), io.stderr);
  const batch = () => import("./batch.js");

  /** One recording, with a progress bar on a terminal. */
  async function one<T>(
    o: BatchFlags,
    run: (onProgress: (done: number, total: number) => void) => Promise<T>,
  ): Promise<T> {
    const progress = progressFor(o);
    try {
      return await run((d, t) => progress.update(d, t));
    } finally {
      progress.end();
    }
  }

  /** Several recordings on the worker pool: JSON Lines or a summary table, exit code of the worst outcome. */
  async function many<T extends RecordingAnalysis | CheckResult>(
    files: string[],
    o: ParsedCommon & BatchFlags & { control?: CheckOptions["control"] },
    profile: TestProfile | undefined,
    code: (r: T) => number,
    summaryRow: (r: T, index: number) => string[][],
    header: string[],
    jsonOf: (r: T) => unknown,
  ): Promise<number> {
    const progress = progressFor(o);
    let totalBytes = 0;
    for (const f of files)
      totalBytes += await stat(f).then(
        (x) => x.size,
        () => 0,
      );
    const codes: number[] = [];
    const rows: string[][] = [header];
    // Recordings read as ±1 full scale (integer WAVs with no calibration): said under the table, one line each.
    const readings: string[] = [];
    let count = 0;
    const { runBatch } = await batch();
    await runBatch<T>(
      files,
      { ...analysisOptions(o), control: o.control },
      profile,
      o.jobs ?? availableParallelism(),
      (out: Outcome<T>, index: number) => {
        count++;
        if (!out.ok) {
          const error = asCliError(out.error);
          codes.push(out.internal ? EXIT.internal : EXIT.input);
          io.stderr(`psdgate: ${printable(error.message)}\n`);
          if (o.json)
            io.stdout(
              JSON.stringify({
                tool: toolInfo(VERSION),
                input: { file: out.file },
                error: { code: out.error.code, message: error.message },
              }) + "\n",
            );
          rows.push([out.file, "", "", "", "", "error", out.error.code]);
          progress.line(`[${count}/${files.length}] ${printable(out.file)}  error ${out.error.code}`);
          return;
        }
        const c = code(out.result);
        codes.push(c);
        if (o.json) io.stdout(JSON.stringify(jsonOf(out.result)) + "\n");
        for (const row of summaryRow(out.result, index)) rows.push(row);
        const a: RecordingAnalysis = "verdict" in out.result ? out.result.analysis : out.result;
        for (const l of fullScaleLines(a.channels))
          readings.push(l.replace(/^ {2}reading {4}/, `  reading    ${printable(a.input.file)}: `));
        progress.line(
          `[${count}/${files.length}] ${printable(out.file)}  ${"verdict" in out.result ? out.result.verdict : "done"}`,
        );
      },
      (b) => progress.update(b, totalBytes),
    ).finally(() => progress.end());
    if (!o.json)
      io.stdout(
        `psdgate ${VERSION}: ${files.length} recordings\n${table(rows.map((r) => r.map(printable)))}\n${readings.map((l) => l + "\n").join("")}`,
      );
    return worst(codes);
  }

  return { one, many };
}
