import type { AnalysisOptions, RecordingAnalysis } from "../pass/analyzeRecording.js";
import type { CheckOptions, CheckResult } from "./checkRecording.js";
import type { TestProfile } from "../compare/testProfile.js";
import { InputError } from "../errors.js";

/**
 * One analysis of one recording, as data: what a queued job (queue/job.ts) and a batch's recording have
 * in common. `P` is how the profile of a check is given: by path and SHA-256 in a queued job, loaded in
 * a batch. Plain data, so it crosses to a worker thread by structured clone as it is.
 */
export interface AnalysisJob<P = TestProfile> {
  kind: "psd" | "check";
  /** The recording: a path the runner can open (a queued job's is relative to the worker's root). */
  file: string;
  /** The analysis options as resolved from the command line (no progress callback). */
  options: Omit<CheckOptions, "onProgress">;
  /** The profile of a check job. */
  profile?: P | undefined;
}

export type AnalysisResult = RecordingAnalysis | CheckResult;

/**
 * The one place that chooses between a PSD and a check and calls the library for it: single runs
 * (cli/psd.ts, cli/check.ts), the batch (in this thread and on its pool) and the queue's threads all
 * run a recording through here. The modules
 * load on first use: a thread that only runs PSDs never loads the profile code (zod, yaml).
 */
export async function runAnalysis(
  job: AnalysisJob & { kind: "psd" },
  onProgress?: AnalysisOptions["onProgress"],
): Promise<RecordingAnalysis>;
export async function runAnalysis(
  job: AnalysisJob & { kind: "check" },
  onProgress?: AnalysisOptions["onProgress"],
): Promise<CheckResult>;
export async function runAnalysis(
  job: AnalysisJob,
  onProgress?: AnalysisOptions["onProgress"],
): Promise<AnalysisResult>;
export async function runAnalysis(
  job: AnalysisJob,
  onProgress?: AnalysisOptions["onProgress"],
): Promise<AnalysisResult> {
  const options = onProgress ? { ...job.options, onProgress } : job.options;
  if (job.kind === "psd") return (await import("../pass/analyzeRecording.js")).analyzeRecording(job.file, options);
  if (job.profile === undefined)
    throw new InputError("JOB_INVALID", { file: job.file, expected: "a check job with a profile", received: "none" });
  return (await import("./checkRecording.js")).checkRecording(job.file, job.profile, options);
}
