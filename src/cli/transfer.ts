import type { Command } from "commander";
import { InputError } from "../errors.js";
import type { CliIo } from "./io.js";
import {
  addReadingOptions,
  addSpectrumOptions,
  analysisOptions,
  givenOptions,
  numberOption,
  rerunOptions,
  type ParsedCommon,
} from "./options.js";

const collect = (v: string, prev: string[] = []) => [...prev, v];

interface TransferFlags extends ParsedCommon {
  in: string;
  outputChannel?: string[];
  meta?: string;
  quiet?: boolean;
  json?: boolean;
  csv?: string;
  report?: string;
  force?: boolean;
  goodCoherence?: number;
}

/** `psdgate transfer FILE --in CH [--output-channel CH …]`: frequency response between channels of one recording. */
export function registerTransfer(program: Command, io: CliIo): void {
  addSpectrumOptions(
    addReadingOptions(
      program
        .command("transfer")
        .argument("<file>", "recording with the input and output channels: CSV or WAV")
        .description(
          "frequency response between channels: H1, H2, coherence, predicted against measured output PSD, resonances with half-power Q",
        ),
    ),
  )
    .requiredOption("--in <name|n>", "the input (reference) channel, e.g. the base or floor accelerometer")
    .option(
      "--output-channel <name|n>",
      "an output (response) channel, e.g. the item or seat accelerometer; repeat for more (default: every channel but --in)",
      collect,
    )
    .option(
      "--good-coherence <c>",
      "coherence at or above which a line counts as explained by the input (default 0.9)",
      numberOption("--good-coherence", (x) => x > 0 && x < 1, "a coherence between 0 and 1"),
    )
    .option("--json", "print the result as JSON")
    .option(
      "--csv <out>",
      "also write frequency, input PSD and each output's |H1|, phase, |H2|, coherence, predicted and measured PSD to this CSV",
    )
    .option(
      "--report <out.html>",
      "also write a self-contained HTML page with magnitude, phase, coherence and output-PSD plots",
    )
    .option(
      "--meta <file>",
      "the test's identity (YAML or JSON: testId, workOrder, item, serialNumber, axis, fixture, sensor, sensorSerial, sensorCalibrated, operator, location, notes), carried into --json and the report",
    )
    .option("--force", "replace an existing output file")
    .option("-q, --quiet", "no progress bar (transfer shows none; accepted so every analysis command takes it)")
    .action(async (file: string, o: TransferFlags, cmd: Command) => {
      if (o.channel !== undefined)
        throw new InputError("OPTION_CONFLICT", {
          option: "--channel",
          expected: "--in and --output-channel to name the channels of transfer",
          received: o.channel.join(", "),
        });
      const { analyzeTransfer } = await import("../analyses/analyzeTransfer.js");
      const { transferCsv, transferJson, transferText } = await import("../report/transferReport.js");
      const { checkOutputPaths, writeAtomic } = await import("../report/writeAtomic.js");
      const { VERSION } = await import("../version.js");
      const meta = o.meta !== undefined ? await (await import("../read/testMeta.js")).loadTestMeta(o.meta) : undefined;
      const inputs = [file, ...(o.meta !== undefined ? [o.meta] : [])];
      checkOutputPaths(
        [
          ["--csv", o.csv],
          ["--report", o.report],
        ],
        inputs,
        o.force,
      );
      const options = {
        ...analysisOptions(o),
        inputChannel: o.in,
        outputChannels: o.outputChannel,
        goodCoherence: o.goodCoherence,
      };
      const t = await analyzeTransfer(file, options);
      if (o.csv !== undefined) await writeAtomic(o.csv, transferCsv(t), { inputs, force: o.force, option: "--csv" });
      if (o.report !== undefined) {
        const { transferHtml } = await import("../report/transferHtml.js");
        await writeAtomic(
          o.report,
          transferHtml(t, VERSION, new Date(), { meta, given: givenOptions(cmd), rerun: rerunOptions(options) }),
          { inputs, force: o.force, option: "--report" },
        );
      }
      io.stdout(
        o.json
          ? JSON.stringify({ ...transferJson(t, VERSION), ...(meta ? { meta } : {}) }) + "\n"
          : transferText(t, VERSION),
      );
    });
}
