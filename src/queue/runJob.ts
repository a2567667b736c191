import type { RecordingAnalysis } from "../pass/analyzeRecording.js";
import type { TestProfile } from "../compare/testProfile.js";
import { errorToWire, InputError, type WireError } from "../errors.js";
import type { CheckResult } from "../report/checkReport.js";
import { psdJson, toolInfo } from "../report/psdJson.js";
import { runAnalysis } from "../analyses/runAnalysis.js";
import { VERSION } from "../version.js";
import type { Job } from "./job.js";
import { openRegularFile, sha256OfFile } from "../read/regularFile.js";
import { resolveJobPath } from "./jobPath.js";

/** The figures kept in their own columns beside the full JSON, one entry per channel. */
export interface KeyFigures {
  sampleRateHz: number;
  durationS: number;
  channels: {
    name: string;
    units: string;
    rms: number;
    rmsDeviationDb: number | null;
    dof: number;
    parsevalRatio: number | null;
    verdict: string | null;
  }[];
}

/** What one job gave: the batch's JSON line for the recording, its verdict and key figures, or its input error. */
export type JobOutcome =
  | {
      ok: true;
      line: Record<string, unknown>;
      verdict: "pass" | "fail" | "inconclusive" | null;
      figures: KeyFigures;
      report?: string | undefined;
    }
  | { ok: false; line: Record<string, unknown>; error: WireError };

/** An outcome with its line already as JSON text: made once, in the thread that ran the job, and stored as it is. */
export type StoredOutcome =
  | {
      ok: true;
      lineJson: string;
      verdict: "pass" | "fail" | "inconclusive" | null;
      figures: KeyFigures;
      report?: string | undefined;
    }
  | { ok: false; lineJson: string; error: WireError };

export function storedOutcome(o: JobOutcome): StoredOutcome {
  const lineJson = JSON.stringify(o.line);
  return o.ok
    ? { ok: true, lineJson, verdict: o.verdict, figures: o.figures, report: o.report }
    : { ok: false, lineJson, error: o.error };
}

export interface JobContext {
  /** The folder job paths are relative to. */
  root: string;
  /** Profiles already loaded, by SHA-256 (a worker sees the same few again and again). */
  profiles?: Map<string, TestProfile> | undefined;
  /** Write each check's HTML report here, at the recording's path with .html (runs/a.wav → DIR/runs/a.html). */
  reportDir?: string | undefined;
}

const finite = (x: number) => (Number.isFinite(x) ? x : null);

/** An input error named by the job's own path rather than the worker's resolved one. */
function asJobError(e: InputError, real: string | undefined, jobPath: string): InputError {
  if (real === undefined || e.details.file !== real) return e;
  return new InputError(e.code, { ...e.details, file: jobPath });
}

export function errorLine(file: string, e: Pick<WireError, "code" | "message">): Record<string, unknown> {
  return { tool: toolInfo(VERSION), input: { file }, error: { code: e.code, message: e.message } };
}

/**
 * Runs one job where it is called and returns its outcome: the same JSON line `psd --json` or
 * `check --json` prints for the recording in a batch (paths as the job names them), or the error
 * line for an input error. Anything else (a bug, memory) is thrown for the caller to retry.
 */
export async function runJob(job: Job, ctx: JobContext): Promise<JobOutcome> {
  let real: string | undefined;
  try {
    real = await resolveJobPath(ctx.root, job.file, "recording");
    // The file's identity before any analysis: its size at once, then its SHA-256 by streaming. A file swapped
    // after `queue add` (even a 40 GB sparse one) is refused before a worker spends its expiry on it.
    await sameFile(real, job);
    // One thread per job: the queue's parallelism is --jobs, as in the batch.
    const options = { ...job.options, csv: { ...job.options.csv, parseWorkers: 0 } };
    // A check's profile is loaded (and held to its SHA-256) here; the dispatcher refuses a check without one.
    const check = job.kind === "check";
    const profile = check && job.profile !== undefined ? await profileFor(job.profile, ctx) : undefined;
    const r = await runAnalysis({
      kind: job.kind,
      file: real,
      profile,
      options: check ? { ...options, histogram: ctx.reportDir !== undefined } : options,
    });
    if (!("verdict" in r)) {
      sameRecording(r, job);
      const line = psdJson(r, VERSION);
      line.input.file = job.file;
      line.analysis = { ...line.analysis, file: job.file };
      return { ok: true, line, verdict: null, figures: figuresOf(r, undefined) };
    }
    sameRecording(r.analysis, job);
    const { checkJson } = await import("../report/checkReport.js");
    const line = checkJson(r, VERSION);
    line.input.file = job.file;
    line.analysis = { ...line.analysis, file: job.file };
    line.profile.file = job.profile!.path;
    const report = ctx.reportDir === undefined ? undefined : await writeReport(ctx.reportDir, job, r, real);
    return { ok: true, line, verdict: r.verdict, figures: figuresOf(r.analysis, r), report };
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    const err = asJobError(e, real, job.file);
    return { ok: false, line: errorLine(job.file, err), error: errorToWire(err) };
  }
}

/**
 * The HTML report of a check, at the job's path under `dir`. A report that cannot be written is the
 * worker's problem, not the recording's: it is thrown as an internal error, so the job is retried.
 */
async function writeReport(dir: string, job: Job, r: CheckResult, recording: string): Promise<string> {
  const { checkHtml } = await import("../report/htmlReport.js");
  const { makeFolders, writeAtomic } = await import("../report/writeAtomic.js");
  const { realpath } = await import("node:fs/promises");
  const { dirname, join, sep } = await import("node:path");
  const rel = job.file.replace(/\.[^./]*$/, "") + ".html";
  const target = join(dir, rel);
  try {
    await makeFolders(dirname(target));
    // Reports stay inside the folder given: a folder link planted under it (runs -> /etc) is not followed.
    const root = await realpath(dir);
    const real = await realpath(dirname(target));
    if (real !== root && !real.startsWith(root + sep)) {
      throw new InputError("JOB_PATH_REFUSED", {
        file: job.file,
        option: "--report-dir",
        expected: `a report folder inside ${dir}`,
        received: `${dirname(rel)} leads to ${real} (a link out of the folder)`,
      });
    }
    // A retried job writes its report again: same job, same report, so it may replace it.
    await writeAtomic(
      target,
      checkHtml(
        {
          ...r,
          analysis: { ...r.analysis, input: { ...r.analysis.input, file: job.file } },
          profile: { ...r.profile, file: job.profile!.path },
        },
        VERSION,
        new Date(),
      ),
      { inputs: [recording], force: true, option: "--report-dir" },
    );
  } catch (e) {
    if (e instanceof InputError) throw e;
    throw new Error(`report ${target} not written: ${(e as Error).message}`);
  }
  return rel;
}

async function sameFile(real: string, job: Job): Promise<void> {
  const changed = (received: string) =>
    new InputError("RECORDING_CHANGED", {
      file: job.file,
      expected: `the recording queued with SHA-256 ${job.sha256}${job.bytes !== undefined ? ` (${job.bytes} bytes)` : ""}`,
      received,
      hint: "queue it again if the new file is meant",
    });
  if (job.bytes !== undefined) {
    const { stats } = await openRegularFile(real, "a readable recording").then(
      async (o) => (await o.handle.close(), o),
    );
    if (stats.size !== job.bytes) throw changed(`${stats.size} bytes`);
  }
  const { sha256 } = await sha256OfFile(real, "a readable recording");
  if (sha256 !== job.sha256) throw changed(`SHA-256 ${sha256}`);
}

function sameRecording(a: RecordingAnalysis, job: Job): void {
  if (a.input.sha256 !== job.sha256) {
    throw new InputError("RECORDING_CHANGED", {
      file: job.file,
      expected: `the recording queued with SHA-256 ${job.sha256}`,
      received: `SHA-256 ${a.input.sha256}`,
      hint: "queue it again if the new file is meant",
    });
  }
}

async function profileFor(p: { path: string; sha256: string }, ctx: JobContext): Promise<TestProfile> {
  const cached = ctx.profiles?.get(p.sha256);
  if (cached) return cached;
  const real = await resolveJobPath(ctx.root, p.path, "profile");
  const { loadProfile } = await import("../analyses/checkRecording.js");
  let profile: TestProfile;
  try {
    profile = await loadProfile(real);
  } catch (e) {
    throw e instanceof InputError ? asJobError(e, real, p.path) : e;
  }
  if (profile.sha256 !== p.sha256) {
    throw new InputError("PROFILE_CHANGED", {
      file: p.path,
      expected: `the profile queued with SHA-256 ${p.sha256}`,
      received: `SHA-256 ${profile.sha256}`,
    });
  }
  ctx.profiles?.set(p.sha256, profile);
  return profile;
}

function figuresOf(a: RecordingAnalysis, r: CheckResult | undefined): KeyFigures {
  return {
    sampleRateHz: a.input.sampleRateHz,
    durationS: a.input.durationS,
    channels: a.channels.map((c, i) => {
      const k = r?.channels[i];
      return {
        name: c.name,
        units: c.units,
        rms: k ? k.rms.measured : c.parseval.rmsTime,
        rmsDeviationDb: k ? finite(k.rms.deviationDb) : null,
        dof: c.psd.dof,
        parsevalRatio: finite(c.parseval.ratio),
        verdict: k ? k.verdict : null,
      };
    }),
  };
}
