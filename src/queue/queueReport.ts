import { errorToWire, InputError } from "../errors.js";
import { errorLine } from "./runJob.js";
import { QUEUE_NAME, type QueueStore } from "./queueStore.js";
import type { KeyFigures } from "./runJob.js";

export interface QueueStatus {
  queued: number;
  active: number;
  done: number;
  failed: number;
  verdicts: { pass: number; fail: number; inconclusive: number };
}

/** Jobs that pg-boss failed without a result of ours: their worker vanished on every attempt. */
const LOST = `
  SELECT f.id, f.data, f.retry_count, f.completed_on FROM (
    SELECT id, data, retry_count, completed_on FROM pgboss.job WHERE name = $1 AND state = 'failed'
    UNION ALL
    SELECT id, data, retry_count, completed_on FROM pgboss.archive WHERE name = $1 AND state = 'failed'
  ) f WHERE NOT EXISTS (SELECT 1 FROM psdgate.result r WHERE r.job_id = f.id)`;

export async function queueStatus(store: QueueStore): Promise<QueueStatus> {
  const jobs = await store.pool.query<{ state: string; n: string }>(
    `SELECT state::text AS state, count(*) AS n FROM pgboss.job WHERE name = $1 AND state IN ('created', 'retry', 'active') GROUP BY state`,
    [QUEUE_NAME],
  );
  const res = await store.pool.query<{ outcome: string; verdict: string | null; n: string }>(
    `SELECT outcome, verdict, count(*) AS n FROM psdgate.result GROUP BY outcome, verdict`,
  );
  const lost = await store.pool.query<{ n: string }>(`SELECT count(*) AS n FROM (${LOST}) l`, [QUEUE_NAME]);
  const s: QueueStatus = {
    queued: 0,
    active: 0,
    done: 0,
    failed: Number(lost.rows[0]!.n),
    verdicts: { pass: 0, fail: 0, inconclusive: 0 },
  };
  for (const r of jobs.rows) {
    if (r.state === "active") s.active += Number(r.n);
    else s.queued += Number(r.n);
  }
  for (const r of res.rows) {
    if (r.outcome === "done") s.done += Number(r.n);
    else s.failed += Number(r.n);
    if (r.verdict === "pass" || r.verdict === "fail" || r.verdict === "inconclusive")
      s.verdicts[r.verdict] += Number(r.n);
  }
  return s;
}

export interface StoredResult {
  path: string;
  kind: string;
  outcome: "done" | "failed";
  verdict: string | null;
  errorCode: string | null;
  figures: KeyFigures | null;
  /** The batch's JSON line. */
  line: Record<string, unknown>;
  finishedOn: Date;
}

/**
 * Every finished job, oldest first (finished after `since` if given), read a page at a time so a long
 * history does not sit in memory; then the jobs lost for good, as error lines with code JOB_LOST.
 */
export async function* queueResults(
  store: QueueStore,
  since: Date | undefined,
  pageSize = 200,
): AsyncGenerator<StoredResult> {
  // The page key is the last row's exact finishing time, carried as PostgreSQL's own text (microseconds):
  // a JavaScript Date holds milliseconds, and a key cut to them sorts before the row it came from, which
  // was then read again at the top of the next page.
  let after: { t: string; id: string } | undefined;
  for (;;) {
    const { rows } = await store.pool.query<{
      job_id: string;
      path: string;
      kind: string;
      outcome: "done" | "failed";
      verdict: string | null;
      error_code: string | null;
      figures: KeyFigures | null;
      result: Record<string, unknown>;
      finished_on: Date;
      finished_key: string;
    }>(
      `SELECT job_id, path, kind, outcome, verdict, error_code, figures, result, finished_on, finished_on::text AS finished_key FROM psdgate.result
        WHERE ($1::timestamptz IS NULL OR finished_on > $1) AND ($2::timestamptz IS NULL OR (finished_on, job_id) > ($2::timestamptz, $3::uuid))
        ORDER BY finished_on, job_id LIMIT $4`,
      [since ?? null, after?.t ?? null, after?.id ?? null, pageSize],
    );
    for (const r of rows)
      yield {
        path: r.path,
        kind: r.kind,
        outcome: r.outcome,
        verdict: r.verdict,
        errorCode: r.error_code,
        figures: r.figures,
        line: r.result,
        finishedOn: r.finished_on,
      };
    if (rows.length < pageSize) break;
    const last = rows[rows.length - 1]!;
    after = { t: last.finished_key, id: last.job_id };
  }
  const lost = await store.pool.query<{ id: string; data: unknown; retry_count: number; completed_on: Date }>(
    `${LOST} AND ($2::timestamptz IS NULL OR f.completed_on > $2) ORDER BY f.completed_on`,
    [QUEUE_NAME, since ?? null],
  );
  for (const r of lost.rows) {
    // A row's data may be anything a database user stored: name it by its id when it has no path.
    const d = (r.data !== null && typeof r.data === "object" ? r.data : {}) as { file?: unknown; kind?: unknown };
    const file = typeof d.file === "string" && d.file !== "" ? d.file : `(job ${r.id})`;
    const error = errorToWire(
      new InputError("JOB_LOST", {
        file,
        expected: "a worker to finish the job",
        received: `no answer on any of ${r.retry_count + 1} attempts (each expired)`,
      }),
    );
    yield {
      path: file,
      kind: d.kind === "psd" || d.kind === "check" ? d.kind : "invalid",
      outcome: "failed",
      verdict: null,
      errorCode: error.code,
      figures: null,
      line: errorLine(file, error),
      finishedOn: r.completed_on,
    };
  }
}
