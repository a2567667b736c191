import { InputError } from "../errors.js";
import { sha256OfFile } from "../read/regularFile.js";
import { settingsDigest, type Job } from "./job.js";
import { QUEUE_NAME, type QueueStore } from "./queueStore.js";

/** SHA-256 of a file's bytes, streamed; a FIFO, device or folder is FILE_UNREADABLE at once (named as `shown`). */
export async function fileSha256(file: string, shown: string): Promise<string> {
  return (await fileIdentity(file, shown)).sha256;
}

/** A file's SHA-256 and size, what a queued job carries so a worker can tell the file is still the one queued. */
export async function fileIdentity(file: string, shown: string): Promise<{ sha256: string; bytes: number }> {
  try {
    return await sha256OfFile(file, "a readable regular file");
  } catch (e) {
    if (e instanceof InputError) throw new InputError(e.code, { ...e.details, file: shown });
    throw e;
  }
}

export type AddResult =
  | { file: string; added: true; jobId: string; requeued?: { jobId: string; state: string } | undefined }
  | { file: string; added: false; jobId: string; state: string };

/**
 * Queues one job unless the same recording (by SHA-256) was queued before with the same settings
 * digest: the key row and the pg-boss job are written in one transaction, so two nodes adding the same
 * files at once still make one job each. A job that failed (its result stored as failed, or lost by its
 * workers) is queued again: its failed result and key row are replaced, and the result says so (`requeued`).
 */
export async function addJob(store: QueueStore, job: Job, expireInSeconds: number): Promise<AddResult> {
  const digest = settingsDigest(job);
  return store.transaction(async (c, db) => {
    const insert = async () =>
      (
        await c.query<{ job_id: string }>(
          `INSERT INTO psdgate.submission (recording_sha256, settings_digest, path, kind, profile_sha256, job_id)
       VALUES ($1, $2, $3, $4, $5, gen_random_uuid()) ON CONFLICT DO NOTHING RETURNING job_id`,
          [job.sha256, digest, job.file, job.kind, job.profile?.sha256 ?? null],
        )
      ).rows[0]?.job_id;
    const send = async (id: string) => {
      await store.boss.send(QUEUE_NAME, job as unknown as object, { id, expireInSeconds, db: db as never });
    };
    for (let attempt = 0; attempt < 3; attempt++) {
      const id = await insert();
      if (id !== undefined) {
        await send(id);
        return { file: job.file, added: true, jobId: id };
      }
      // The key exists: lock it (a concurrent add of the same failed job waits here, then sees the new job).
      const prior = await c.query<{ job_id: string; outcome: string | null; state: string | null }>(
        `SELECT s.job_id, r.outcome, j.state::text AS state
           FROM psdgate.submission s
           LEFT JOIN psdgate.result r ON r.job_id = s.job_id
           LEFT JOIN pgboss.job j ON j.id = s.job_id AND j.name = $3
          WHERE s.recording_sha256 = $1 AND s.settings_digest = $2
          FOR UPDATE OF s`,
        [job.sha256, digest, QUEUE_NAME],
      );
      const p = prior.rows[0];
      if (p === undefined) continue; // replaced by a concurrent add between our insert and the lock: try again
      const failed = p.outcome === "failed" || (p.outcome === null && p.state === "failed");
      if (!failed) return { file: job.file, added: false, jobId: p.job_id, state: p.outcome ?? p.state ?? "archived" };
      await c.query("DELETE FROM psdgate.result WHERE job_id = $1", [p.job_id]);
      await c.query("DELETE FROM psdgate.submission WHERE job_id = $1", [p.job_id]);
      const again = await insert();
      if (again === undefined) continue;
      await send(again);
      return { file: job.file, added: true, jobId: again, requeued: { jobId: p.job_id, state: "failed" } };
    }
    throw new Error("the job's key kept changing under concurrent adds; try again");
  });
}
