import type { Command } from "commander";
import { EXIT } from "../errors.js";
import { Exit } from "./exit.js";
import type { CliIo } from "./io.js";
import { inFlags } from "./optionFlags.js";
import { numberOption } from "./options.js";

interface VerifyFlags {
  recording?: string;
  profile?: string;
  tolerance?: number;
  json?: boolean;
  quiet?: boolean;
}

const WORD = { reproduced: "REPRODUCED", differs: "DIFFERS", missing: "INPUT MISSING" } as const;
const MEANING = {
  reproduced:
    "the report is intact, its inputs are the recorded ones, and re-running its analysis gives its numbers and verdict",
  differs: "the report, an input or a re-computed number is not what the report records",
  missing: "the report is intact but an input it names was not found, so its numbers were not re-run",
} as const;

/**
 * `psdgate verify REPORT.html`: the report intact, its inputs by SHA-256, its analysis re-run (exit 0), a difference
 * (1), an input missing (2).
 */
export function registerVerify(program: Command, io: CliIo): void {
  program
    .command("verify")
    .argument(
      "<report.html>",
      "an HTML record written by any psdgate command's --report (check, psd, ride, transfer, respond, derive)",
    )
    .description(
      "check a report: its embedded result and page unedited, its recording and profile the ones it names (SHA-256), its analysis re-run to the same numbers and verdict, and its page the one the re-run renders: reproduced (exit 0), differs (1), input missing (2)",
    )
    .option(
      "--recording <file>",
      "the recording (or respond's source recording; default: the file of the recorded name beside the report, else at the recorded path)",
    )
    .option(
      "--profile <file>",
      "the profile, for a check record (or respond's source profile; default: beside the report, else at the recorded path)",
    )
    .option(
      "--tolerance <rel>",
      "relative tolerance on every number (default 1e-9)",
      numberOption("--tolerance", (x) => x >= 0 && x < 1, "a relative tolerance 0 <= t < 1"),
    )
    .option("--json", "print the result as JSON")
    .option("-q, --quiet", "no progress output (verify shows none; accepted so every command takes it)")
    .action(async (report: string, o: VerifyFlags) => {
      const { verifyReport } = await import("../verify/verifyReport.js");
      const { VERSION } = await import("../version.js");
      const v = await verifyReport(report, {
        recording: o.recording,
        profile: o.profile,
        tolerance: o.tolerance,
        version: VERSION,
      });
      if (o.json)
        io.stdout(
          JSON.stringify({ tool: { name: "psdgate", version: VERSION }, ...v, meaning: MEANING[v.status] }) + "\n",
        );
      else {
        const out = [`psdgate ${VERSION}: verify ${report}${v.kind ? ` (${v.kind} report)` : ""}`];
        for (const s of v.steps) out.push(`  ${s.ok ? "ok  " : "FAIL"}  ${s.step.padEnd(9)} ${s.text}`);
        for (const m of v.missing) out.push(`  MISSING ${inFlags(m)}`);
        for (const d of v.differences) out.push(`        differs: ${d}`);
        out.push("", `${WORD[v.status]}: ${MEANING[v.status]}`, "");
        io.stdout(out.join("\n"));
      }
      throw new Exit(v.status === "reproduced" ? EXIT.ok : v.status === "missing" ? EXIT.input : EXIT.fail);
    });
}
