import type { Command } from "commander";
import { VERSION } from "../version.js";
import type { CliIo } from "./io.js";

/** `psdgate profile FILE`: what a required profile asks for. */
export function registerProfile(program: Command, io: CliIo): void {
  program
    .command("profile")
    .argument("<file>", "test profile: JSON, YAML or two-column CSV (Hz, level)")
    .description("breakpoints, slopes, overall RMS, velocity and stroke of a required profile")
    .option("--json", "print the result as JSON")
    .option("-q, --quiet", "no progress output (profile shows none; accepted so every command takes it)")
    .action(async (file: string, o: { json?: boolean; quiet?: boolean }) => {
      const { loadProfile } = await import("../analyses/checkRecording.js");
      const { profileJson, profileText } = await import("../report/profileText.js");
      const p = await loadProfile(file);
      io.stdout(o.json ? JSON.stringify(profileJson(p, VERSION)) + "\n" : profileText(p, VERSION));
    });
}
