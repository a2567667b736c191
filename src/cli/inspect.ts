import type { Command } from "commander";
import { inspectText } from "../report/psdText.js";
import { VERSION } from "../version.js";
import type { CliIo } from "./io.js";
import { addReadingOptions, analysisOptions, type ParsedCommon } from "./options.js";
import { findingTexts } from "../report/findingTexts.js";

/** `psdgate inspect FILE`: what is in a recording. */
export function registerInspect(program: Command, io: CliIo): void {
  addReadingOptions(
    program
      .command("inspect")
      .argument("<file>", "recording: CSV or WAV")
      .description("what is in a recording: channels, rate, length, statistics, warnings"),
  )
    .option("--json", "print what was found as JSON (the recording, and per channel its unit, statistics and warnings)")
    .option("-q, --quiet", "no progress output (inspect shows none; accepted so every analysis command takes it)")
    .action(async (file: string, o: ParsedCommon & { json?: boolean }) => {
      const { analyzeRecording } = await import("../pass/analyzeRecording.js");
      const a = await analyzeRecording(file, { ...analysisOptions(o), spectrum: false });
      if (o.json) {
        const { inputJson, statsJson, toolInfo } = await import("../report/psdJson.js");
        io.stdout(
          JSON.stringify({
            tool: toolInfo(VERSION),
            input: inputJson(a),
            channels: a.channels.map((c) => ({
              name: c.name,
              position: c.position,
              units: c.units,
              reading: c.reading,
              stats: statsJson(c),
              warnings: findingTexts(c.notes),
              doubts: findingTexts(c.doubts),
            })),
          }) + "\n",
        );
      } else io.stdout(inspectText(a, VERSION));
    });
}
