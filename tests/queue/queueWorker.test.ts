import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { dbTarget } from "../../src/queue/connection.js";
import { addJob } from "../../src/queue/enqueue.js";
import type { Job } from "../../src/queue/job.js";
import { createJobPool, JobCrash, type JobPool } from "../../src/queue/jobPool.js";
import { migrate, SCHEMA_VERSION } from "../../src/queue/migrations.js";
import { queueResults, queueStatus } from "../../src/queue/queueReport.js";
import { openQueue, QUEUE_NAME, RETRY, type QueueStore } from "../../src/queue/queueStore.js";
import { jobProblem, runWorker, transientDbError, type WorkOptions } from "../../src/queue/queueWorker.js";
import type { StoredOutcome } from "../../src/queue/runJob.js";
import { tempDir } from "../helpers.js";
import { freshDatabase, postgresUrl } from "./database.js";
import { findPostgresBin, startTestServer } from "./postgresServer.js";

const url = postgresUrl("tests/queue/queueWorker.test.ts");
const job = (file: string, sha = file.padEnd(64, "0")): Job => ({ kind: "psd", file, sha256: sha, options: {} });
const ok = (file: string): StoredOutcome => ({
  ok: true,
  lineJson: JSON.stringify({ input: { file } }),
  verdict: null,
  figures: { sampleRateHz: 1, durationS: 1, channels: [] },
});
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** A pool whose jobs are whatever `behave` says, to make internal errors and slow jobs at will. */
function fakePool(behave: (j: Job) => Promise<StoredOutcome>): JobPool {
  return {
    run: (j) =>
      behave(j).catch((e: unknown) => Promise.reject(e instanceof JobCrash ? e : new JobCrash((e as Error).message))),
    close: async () => undefined,
  };
}

function options(extra: Partial<WorkOptions>, log: string[]): WorkOptions {
  return {
    jobs: 1,
    drain: true,
    pollSeconds: 0.5,
    workerName: "test:1",
    signal: new AbortController().signal,
    log: (l) => log.push(l),
    ...extra,
  };
}

describe("transientDbError", () => {
  it("transientDbError: network errors and SQLSTATE classes 08, 40, 53, 57, 58 wait; others are bugs (PostgreSQL 15 manual, appendix A)", () => {
    expect(
      ["ECONNREFUSED", "ECONNRESET", undefined, "08006", "40001", "53300", "57P01", "58030"].map((code) =>
        transientDbError({ code }),
      ),
    ).toEqual(Array(8).fill(true));
    expect(["23505", "22P02", "42P01"].map((code) => transientDbError({ code }))).toEqual([false, false, false]);
  });
});

describe.skipIf(!url && !process.env.CI)("queue worker (in process, real PostgreSQL)", () => {
  let store: QueueStore;
  beforeAll(async () => {
    store = await openQueue(dbTarget(await freshDatabase(url!), {}), { poolSize: 4, asyncCommit: true });
  });
  afterAll(async () => store?.close());
  const rows = async (sql: string, v: unknown[] = []) => (await store.pool.query(sql, v)).rows;

  it("openQueue({ asyncCommit: true }): the worker's sessions commit without waiting for the flush", async () => {
    expect((await rows("SHOW synchronous_commit"))[0].synchronous_commit).toBe("off");
  });
  it("migrate() applies each step once; a database from a newer psdgate is refused", async () => {
    expect(await migrate(store.pool)).toEqual({ from: SCHEMA_VERSION, to: SCHEMA_VERSION });
    expect((await rows("SELECT version FROM psdgate.migration ORDER BY version")).map((r) => r.version)).toEqual([
      1, 2,
    ]);
    await store.pool.query("INSERT INTO psdgate.migration (version, name) VALUES (99, 'future')");
    await expect(migrate(store.pool)).rejects.toThrow(/version 99, newer than this psdgate knows/);
    await store.pool.query("DELETE FROM psdgate.migration WHERE version = 99");
  });

  it("addJob: the same recording and settings added twice at once makes one job", async () => {
    const [a, b] = await Promise.all([addJob(store, job("twice.csv"), 60), addJob(store, job("twice.csv"), 60)]);
    expect([a.added, b.added].sort()).toEqual([false, true]);
    expect(a.jobId).toBe(b.jobId);
    const other = await addJob(store, { ...job("twice.csv"), options: { window: "flattop" } }, 60);
    expect(other.added).toBe(true);
    await runWorker(
      store,
      fakePool(async (j) => ok(j.file)),
      options({}, []),
    );
  });

  it("an internal error is retried RETRY.limit times, then kept as failed with its message; input errors are not retried", async () => {
    await addJob(store, job("crash.csv"), 60);
    await addJob(store, job("input.csv"), 60);
    // The stated delay (5 s, doubling) shortened for the test; the limit is the queue's own.
    await store.pool.query("UPDATE pgboss.job SET retry_delay = 0, retry_backoff = false WHERE name = $1", [
      QUEUE_NAME,
    ]);
    const log: string[] = [];
    let crashes = 0;
    const sum = await runWorker(
      store,
      fakePool(async (j) => {
        if (j.file === "crash.csv") {
          crashes++;
          throw new Error("boom");
        }
        return {
          ok: false,
          lineJson: JSON.stringify({ input: { file: j.file }, error: { code: "CSV_NOT_A_NUMBER", message: "m" } }),
          error: { code: "CSV_NOT_A_NUMBER", message: "m" },
        };
      }),
      options({}, log),
    );
    expect(crashes).toBe(RETRY.limit + 1);
    expect(sum).toMatchObject({ failed: 2, retried: RETRY.limit });
    const r = await rows(
      "SELECT path, error_code, error_message, attempt FROM psdgate.result WHERE outcome = 'failed' ORDER BY path",
    );
    expect(r).toEqual([
      {
        path: "crash.csv",
        error_code: "INTERNAL",
        error_message: `internal error on attempt 3 of 3: boom`,
        attempt: 3,
      },
      { path: "input.csv", error_code: "CSV_NOT_A_NUMBER", error_message: "m", attempt: 1 },
    ]);
    expect(log.filter((l) => l.includes("it will be retried")).length).toBe(RETRY.limit);
    expect(await queueStatus(store)).toMatchObject({ queued: 0, active: 0, failed: 2 });
  });

  it("a stop signal lets the job in hand finish and be written, and takes no more", async () => {
    for (const f of ["s1.csv", "s2.csv", "s3.csv"]) await addJob(store, job(f), 60);
    const stop = new AbortController();
    const sum = await runWorker(
      store,
      fakePool(async (j) => {
        stop.abort();
        await sleep(300);
        return ok(j.file);
      }),
      options({ drain: false, signal: stop.signal }, []),
    );
    expect(sum.done).toBe(1);
    expect((await queueStatus(store)).queued).toBe(2);
    await runWorker(
      store,
      fakePool(async (j) => ok(j.file)),
      options({}, []),
    );
  });

  it("malformed job rows (data a string, null, a list, a number path, a bad hash) among good ones fail alone with JOB_INVALID; with --jobs 1 and 2 every good job is done", async () => {
    const poison: unknown[] = [
      "a string",
      null,
      [1, 2],
      { kind: "psd", file: 5, sha256: "0".repeat(64), options: {} },
      { kind: "psd", file: "nohash.csv", sha256: "", options: {} },
      { kind: "check", file: "noprofile.csv", sha256: "a".repeat(64), options: {} },
    ];
    for (const jobs of [1, 2]) {
      await store.pool.query("DELETE FROM psdgate.result");
      const ids: string[] = [];
      for (let i = 0; i < 10; i++) {
        if (i % 2 === 0) {
          const id = await store.pool.query<{ id: string }>(
            "INSERT INTO pgboss.job (name, data) VALUES ($1, $2::jsonb) RETURNING id",
            [QUEUE_NAME, JSON.stringify(poison[(i / 2) % poison.length])],
          );
          ids.push(id.rows[0]!.id);
        }
        await addJob(store, job(`good-${jobs}-${i}.csv`), 60);
      }
      const log: string[] = [];
      const ran: string[] = [];
      const sum = await runWorker(
        store,
        fakePool(async (j) => {
          ran.push(j.file);
          return ok(j.file);
        }),
        options({ jobs }, log),
      );
      expect(sum, `--jobs ${jobs}`).toMatchObject({ done: 10, failed: 5 });
      expect(ran.sort()).toEqual(Array.from({ length: 10 }, (_, i) => `good-${jobs}-${i}.csv`).sort());
      const bad = await rows(
        "SELECT path, kind, error_code, outcome FROM psdgate.result WHERE kind = 'invalid' ORDER BY path",
      );
      expect(bad.length).toBe(5);
      for (const b of bad) expect(b).toMatchObject({ kind: "invalid", error_code: "JOB_INVALID", outcome: "failed" });
      expect(bad.map((b) => b.path)).toContain(`(job ${ids[0]})`);
      expect(log.filter((l) => l.includes("JOB_INVALID")).length).toBe(5);
      expect(await queueStatus(store)).toMatchObject({ queued: 0, active: 0 });
    }
    expect(jobProblem("x")).toBe("its data is a string, not a job object");
    expect(jobProblem({ kind: "psd", file: "a.csv", sha256: "0".repeat(64), options: {} })).toBeUndefined();
  });

  it("queue results pages on an exact key: 250 results finished within the same milliseconds come out once each, at any page size", async () => {
    await store.pool.query("DELETE FROM psdgate.result");
    await store.pool.query(`
      INSERT INTO psdgate.result (job_id, path, kind, recording_sha256, settings_digest, outcome, result, worker, attempt, tool_version, finished_on)
      SELECT gen_random_uuid(), 'p' || i || '.csv', 'psd', lpad(i::text, 64, '0'), 'd', 'done', '{}'::json, 'w', 1, 'v',
             timestamptz '2026-03-01 10:00:00.000100+00' + (i / 7) * interval '1 microsecond' + (i / 50) * interval '1 millisecond'
        FROM generate_series(1, 250) AS i`);
    for (const page of [200, 7, 1]) {
      const seen: string[] = [];
      // Jobs of the earlier tests whose results were deleted come after, as lost: only the stored rows count here.
      for await (const r of queueResults(store, undefined, page)) if (r.errorCode !== "JOB_LOST") seen.push(r.path);
      expect(seen.length, `page ${page}`).toBe(250);
      expect(new Set(seen).size, `page ${page}`).toBe(250);
    }
    await store.pool.query("DELETE FROM psdgate.result");
  });

  it("a job that failed is queued again by adding it again (its failed result replaced); one that is done or queued is not", async () => {
    const j = job("retry-me.csv");
    expect((await addJob(store, j, 60)).added).toBe(true);
    const fail: StoredOutcome = {
      ok: false,
      lineJson: "{}",
      error: { code: "FILE_UNREADABLE", message: "wrong root" },
    };
    await runWorker(
      store,
      fakePool(async (x) => (x.file === "retry-me.csv" ? fail : ok(x.file))),
      options({}, []),
    );
    expect(await rows("SELECT outcome, error_code FROM psdgate.result WHERE path = 'retry-me.csv'")).toEqual([
      { outcome: "failed", error_code: "FILE_UNREADABLE" },
    ]);
    const again = await addJob(store, j, 60);
    expect(again).toMatchObject({ added: true, requeued: { state: "failed" } });
    const twice = await addJob(store, j, 60);
    expect(twice).toMatchObject({ added: false, state: "created" });
    await runWorker(
      store,
      fakePool(async (x) => ok(x.file)),
      options({}, []),
    );
    expect(await rows("SELECT outcome FROM psdgate.result WHERE path = 'retry-me.csv'")).toEqual([{ outcome: "done" }]);
    expect(await addJob(store, j, 60)).toMatchObject({ added: false, state: "done" });
  });

  it("a job whose path leaves the worker's root fails at once with JOB_PATH_REFUSED", async () => {
    const root = tempDir();
    await store.boss.send(QUEUE_NAME, job("../../etc/passwd") as unknown as object);
    const pool = createJobPool(1, root);
    await runWorker(store, pool, options({}, []));
    await pool.close();
    expect(await rows("SELECT error_code, attempt FROM psdgate.result WHERE path = '../../etc/passwd'")).toEqual([
      { error_code: "JOB_PATH_REFUSED", attempt: 1 },
    ]);
  });
});

describe.skipIf(!url && !process.env.CI)("a database role without CREATE rights", () => {
  it("queue status as a role that may not create the schemas: DB_PERMISSION, exit 2, one line (was exit 70)", async () => {
    const { cli } = await import("../helpers.js");
    const pg = (await import("pg")).default;
    const db = await freshDatabase(url!);
    const role = `lowly_${Date.now().toString(36)}`;
    const c = new pg.Client({ connectionString: db });
    await c.connect();
    try {
      await c.query(`CREATE ROLE ${role} LOGIN`);
      await c.query(`REVOKE CREATE ON DATABASE ${new URL(db).pathname.slice(1)} FROM PUBLIC`);
      await c.query("REVOKE CREATE ON SCHEMA public FROM PUBLIC");
    } finally {
      await c.end();
    }
    const u = new URL(db);
    u.username = role;
    u.password = "";
    const r = await cli("queue", "status", "--db", u.toString());
    expect(r.code, r.stderr).toBe(2);
    expect(r.stderr).toMatch(
      /option --db: expected a role that may create and use the pgboss and psdgate schemas.*\[DB_PERMISSION\]/,
    );
    expect(r.stderr.trim().split("\n").length).toBe(1);
  });
});

describe.skipIf((!url || !findPostgresBin()) && !process.env.CI)(
  "queue worker and a lost database connection (its own server, stopped and started)",
  () => {
    it("database errors are said on stderr and retried with back-off; the job is done once the server is back", async () => {
      const server = await startTestServer(findPostgresBin()!);
      const store = await openQueue(dbTarget(server.url, {}), { poolSize: 3 });
      try {
        const log: string[] = [];
        const stop = new AbortController();
        const done = runWorker(
          store,
          fakePool(async (j) => ok(j.file)),
          options({ drain: false, signal: stop.signal, pollSeconds: 0.5 }, log),
        );
        await sleep(300);
        server.halt();
        await sleep(2500);
        server.start();
        await addJob(store, job("after.csv"), 60);
        for (let t = 0; t < 100 && (await queueStatus(store)).done === 0; t++) await sleep(100);
        stop.abort();
        const sum = await done;
        if (process.env.SHOW_LOG) console.log(log.join("\n"));
        expect(sum.done).toBe(1);
        expect(
          log.some((l) =>
            /database error while (fetching a job|expiring lost jobs|counting jobs): .*; trying again in 1 s/.test(l),
          ),
        ).toBe(true);
        expect(log.some((l) => /trying again in 2 s/.test(l))).toBe(true);
        expect(log.some((l) => l.includes("database reachable again"))).toBe(true);
      } finally {
        await store.close();
        server.stop();
      }
    }, 60000);
  },
);
