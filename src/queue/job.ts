import { createHash } from "node:crypto";
import type { AnalysisJob } from "../analyses/runAnalysis.js";

/**
 * A job as data: everything a worker needs to analyse one recording, and nothing it could only get
 * from the machine that made the job. Paths are relative to the worker's root folder (`--root`), so
 * the same job means the same file on every node that mounts the same archive. The dispatcher
 * (runAnalysis.ts) runs it once runJob.ts has resolved its paths and loaded its profile.
 */
export interface Job extends AnalysisJob<{ path: string; sha256: string }> {
  /** The recording, relative to the root, with forward slashes. */
  file: string;
  /** SHA-256 of the recording's bytes when the job was made; the worker refuses a changed file. */
  sha256: string;
  /** Its size in bytes then: a worker compares it (at once) and the SHA-256 (by streaming) before analysing. */
  bytes?: number | undefined;
  /** The profile of a check job, by path (relative to the root) and SHA-256 of its text. */
  profile?: { path: string; sha256: string } | undefined;
}

/** JSON with keys sorted and undefined fields left out, so equal settings give equal text. */
export function canonicalJson(value: unknown): string {
  return JSON.stringify(sortKeys(value));
}

function sortKeys(v: unknown): unknown {
  if (Array.isArray(v)) return v.map(sortKeys);
  if (v !== null && typeof v === "object") {
    const out: Record<string, unknown> = {};
    for (const k of Object.keys(v).sort()) {
      const x = (v as Record<string, unknown>)[k];
      if (x !== undefined) out[k] = sortKeys(x);
    }
    return out;
  }
  return v;
}

/**
 * SHA-256 of what decides a job's result besides the recording itself: the kind, the options and the
 * profile's SHA-256 (not its path, not the recording's path). Same recording + same digest = same job.
 */
export function settingsDigest(job: Pick<Job, "kind" | "options" | "profile">): string {
  return createHash("sha256")
    .update(canonicalJson({ kind: job.kind, options: job.options, profileSha256: job.profile?.sha256 ?? null }))
    .digest("hex");
}
