import { analyzeRecording, type AnalysisOptions } from "./analyzeRecording.js";
import { checkChannel, overallVerdict } from "./compare/complianceCheck.js";
import { parseProfile, type TestProfile } from "./compare/testProfile.js";
import { InputError } from "./errors.js";
import { readProfileText } from "./read/profileFile.js";
import type { CheckResult } from "./report/checkReport.js";

/** Read and validate a profile file (JSON, YAML or two-column CSV). */
export async function loadProfile(file: string): Promise<TestProfile> {
  // A regular file of bounded size only (read/profileFile.ts): a FIFO never blocks, a huge file is refused.
  return parseProfile(await readProfileText(file), file);
}

/**
 * Analyse a recording at the profile's resolution (unless the options set one) and in the profile's
 * units, then judge every channel against the profile. The amplitude histogram (for the report) is
 * built unless `histogram: false`.
 */
export async function checkRecording(file: string, profile: TestProfile, options: AnalysisOptions = {}): Promise<CheckResult> {
  const resolutionHz = options.segmentLength === undefined && options.resolutionHz === undefined ? profile.resolutionHz : options.resolutionHz;
  if (options.resultUnits !== undefined && options.resultUnits !== profile.units) {
    throw new InputError("OPTION_CONFLICT", { option: "--result-units", expected: `the profile's unit ${profile.units} (or no --result-units)`, received: options.resultUnits });
  }
  const analysis = await analyzeRecording(file, { ...options, resolutionHz, resultUnits: profile.units, histogram: options.histogram ?? true });
  const channels = analysis.channels.map((c) => checkChannel(c, profile, analysis.settings.confidence));
  return { verdict: overallVerdict(channels.map((c) => c.verdict)), analysis, profile, channels };
}
