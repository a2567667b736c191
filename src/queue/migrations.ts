import type pg from "pg";

/**
 * psdgate's own tables beside pg-boss's schema, created and changed only by these numbered steps,
 * each applied once, in order, in one transaction under an advisory lock (so workers starting
 * together do not race). A step is never edited once released: a change is a new step.
 */
export const MIGRATIONS: { version: number; name: string; sql: string }[] = [
  {
    version: 1,
    name: "submissions and results",
    sql: `
      -- One row per (recording, settings) ever queued: the key that makes 'queue add' idempotent.
      CREATE TABLE psdgate.submission (
        recording_sha256 text NOT NULL,
        settings_digest  text NOT NULL,
        path             text NOT NULL,
        kind             text NOT NULL,
        profile_sha256   text,
        job_id           uuid NOT NULL UNIQUE,
        queued_on        timestamptz NOT NULL DEFAULT now(),
        PRIMARY KEY (recording_sha256, settings_digest)
      );
      -- One row per finished job, written in the transaction that completes (or finally fails) it.
      CREATE TABLE psdgate.result (
        job_id           uuid PRIMARY KEY,
        path             text NOT NULL,
        kind             text NOT NULL CHECK (kind IN ('psd', 'check')),
        recording_sha256 text NOT NULL,
        profile_sha256   text,
        settings_digest  text NOT NULL,
        outcome          text NOT NULL CHECK (outcome IN ('done', 'failed')),
        verdict          text CHECK (verdict IN ('pass', 'fail', 'inconclusive')),
        error_code       text,
        error_message    text,
        figures          jsonb,
        -- json, not jsonb: the batch's line kept as written (key order, number spelling), so
        -- 'queue results --json' prints what 'check --json' prints; psql's -> and ->> work on it.
        result           json NOT NULL,
        -- The HTML report, relative to the worker's --report-dir, when it wrote one.
        report_path      text,
        worker           text NOT NULL,
        attempt          integer NOT NULL,
        tool_version     text NOT NULL,
        finished_on      timestamptz NOT NULL DEFAULT clock_timestamp(),
        UNIQUE (recording_sha256, settings_digest)
      );
      CREATE INDEX result_finished_on ON psdgate.result (finished_on);
      CREATE INDEX result_verdict ON psdgate.result (verdict);
      -- A psd line is some 400 KB of JSON; lz4 stores it 2.4x faster than the default pglz (32 -> 13 ms
      -- a row, measured here, bench/README.md). Only where the server was built with lz4 (PostgreSQL 14+).
      DO $$ BEGIN
        IF EXISTS (SELECT 1 FROM pg_settings WHERE name = 'default_toast_compression' AND 'lz4' = ANY (enumvals)) THEN
          EXECUTE 'ALTER TABLE psdgate.result ALTER COLUMN result SET COMPRESSION lz4';
        END IF;
      END $$;
    `,
  },
  {
    version: 2,
    name: "results of malformed jobs",
    sql: `
      -- A job row that is not a psdgate job (its data not an object, no path, no SHA-256) fails alone with
      -- JOB_INVALID; its result is kept under kind 'invalid' and a key of its own job id.
      ALTER TABLE psdgate.result DROP CONSTRAINT result_kind_check;
      ALTER TABLE psdgate.result ADD CONSTRAINT result_kind_check CHECK (kind IN ('psd', 'check', 'invalid'));
    `,
  },
];

export const SCHEMA_VERSION = MIGRATIONS[MIGRATIONS.length - 1]!.version;

/** Brings psdgate's schema up to SCHEMA_VERSION; refuses a database made by a newer psdgate. */
export async function migrate(pool: pg.Pool): Promise<{ from: number; to: number }> {
  const c = await pool.connect();
  try {
    await c.query("BEGIN");
    await c.query("SELECT pg_advisory_xact_lock(hashtext('psdgate.migrate'))");
    await c.query("CREATE SCHEMA IF NOT EXISTS psdgate");
    await c.query(
      "CREATE TABLE IF NOT EXISTS psdgate.migration (version integer PRIMARY KEY, name text NOT NULL, applied_on timestamptz NOT NULL DEFAULT now())",
    );
    const { rows } = await c.query<{ v: number | null }>("SELECT max(version) AS v FROM psdgate.migration");
    const from = rows[0]?.v ?? 0;
    if (from > SCHEMA_VERSION)
      throw new Error(
        `the database's psdgate schema is version ${from}, newer than this psdgate knows (${SCHEMA_VERSION}): upgrade psdgate on this node`,
      );
    for (const m of MIGRATIONS) {
      if (m.version <= from) continue;
      await c.query(m.sql);
      await c.query("INSERT INTO psdgate.migration (version, name) VALUES ($1, $2)", [m.version, m.name]);
    }
    await c.query("COMMIT");
    return { from, to: SCHEMA_VERSION };
  } catch (e) {
    await c.query("ROLLBACK").catch(() => undefined);
    throw e;
  } finally {
    c.release();
  }
}
