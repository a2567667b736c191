import type { Command } from "commander";
import { inspectText } from "../report/psdText.js";
import { VERSION } from "../version.js";
import type { CliIo } from "./main.js";
import { addReadingOptions, analysisOptions, type ParsedCommon } from "./options.js";


/** `psdgate inspect FILE`: what is in a recording. */
export function registerInspect(program: Command, io: CliIo): void {
  addReadingOptions(
    program.command("inspect").argument("<file>", "recording: CSV or WAV").description("what is in a recording: channels, rate, length, statistics, warnings"),
  ).action(async (file: string, o: ParsedCommon) => {
    const { analyzeRecording } = await import("../analyzeRecording.js");
    io.stdout(inspectText(await analyzeRecording(file, { ...analysisOptions(o), spectrum: false }), VERSION));
  });
}
