import pg from "pg";
import PgBoss from "pg-boss";
import { redact, type DbTarget } from "./connection.js";
import { InputError } from "../errors.js";
import { migrate } from "./migrations.js";

/** The one pg-boss queue psdgate uses. */
export const QUEUE_NAME = "psdgate-recordings";

/** Retry policy of the queue, stated in --help and README. */
export const RETRY = { limit: 2, delaySeconds: 5, backoff: true } as const;

/** pg-boss's adapter: SQL through our pool, or through one client inside our transaction. */
export type SqlRunner = {
  executeSql(text: string, values?: unknown[]): Promise<{ rows: Record<string, unknown>[]; rowCount?: number | null }>;
};

export interface QueueStore {
  pool: pg.Pool;
  boss: PgBoss;
  target: DbTarget;
  /** Runs `fn` in one transaction; `db` passes the same transaction to pg-boss calls. */
  transaction<T>(fn: (client: pg.PoolClient, db: SqlRunner) => Promise<T>): Promise<T>;
  close(): Promise<void>;
}

/** The server could not be reached or refused us: the CLI reports it, a worker waits and tries again. */
export class DbUnreachable extends Error {}

export interface OpenOptions {
  poolSize?: number | undefined;
  /** Run pg-boss's maintenance (expiry of lost jobs, archiving): workers do, one-shot commands do not. */
  supervise?: boolean | undefined;
  onError?: ((message: string) => void) | undefined;
  /**
   * Commit without waiting for the disk flush (synchronous_commit = off for this pool's sessions), for
   * workers. Each statement stays atomic; a server crash can lose the last fraction of a second of
   * commits, and loses each completion together with its result, so those jobs are active again,
   * expire and are redone: never a result without its completion, or twice. The flush cost about
   * 30 ms a job on the development machine.
   */
  asyncCommit?: boolean | undefined;
}

/** Connects, installs or upgrades pg-boss's schema and psdgate's, and makes sure the queue exists. */
export async function openQueue(target: DbTarget, o: OpenOptions = {}): Promise<QueueStore> {
  const pool = new pg.Pool({
    ...target.config,
    max: o.poolSize ?? 4,
    application_name: "psdgate",
    connectionTimeoutMillis: 10000,
    ...(o.asyncCommit ? { options: "-c synchronous_commit=off" } : {}),
  });
  // An idle client losing its server emits here; without a listener node would end the process.
  pool.on("error", (e) => o.onError?.(redact(e.message, target)));
  try {
    await pool.query("SELECT 1");
  } catch (e) {
    await pool.end().catch(() => undefined);
    throw new DbUnreachable(
      `${target.label}: ${redact((e as Error).message || String((e as NodeJS.ErrnoException).code), target)}`,
    );
  }
  const db: SqlRunner = { executeSql: (text, values) => pool.query(text, values as unknown[]) };
  const boss = new PgBoss({
    db: db as PgBoss.Db,
    schema: "pgboss",
    migrate: true,
    schedule: false,
    supervise: o.supervise === true,
    maintenanceIntervalSeconds: 30,
  });
  boss.on("error", (e: Error) => o.onError?.(redact(e.message, target)));
  try {
    await boss.start();
    await migrate(pool);
    const queue = await boss.getQueue(QUEUE_NAME);
    if (!queue)
      await boss.createQueue(QUEUE_NAME, {
        name: QUEUE_NAME,
        retryLimit: RETRY.limit,
        retryDelay: RETRY.delaySeconds,
        retryBackoff: RETRY.backoff,
      });
  } catch (e) {
    await boss.stop({ graceful: false, close: false }).catch(() => undefined);
    await pool.end().catch(() => undefined);
    // SQLSTATE 42501 insufficient_privilege (PostgreSQL manual, appendix A): the role's rights, not a bug.
    if ((e as { code?: unknown }).code === "42501") {
      throw new InputError("DB_PERMISSION", {
        option: "--db",
        expected: `a role that may create and use the pgboss and psdgate schemas on ${target.label} (CREATE on the database)`,
        received: redact((e as Error).message, target),
        hint: "grant CREATE on the database to the role, or let an owner run `psdgate queue status` once to make the schemas",
      });
    }
    throw e;
  }
  return {
    pool,
    boss,
    target,
    async transaction(fn) {
      const c = await pool.connect();
      try {
        await c.query("BEGIN");
        const out = await fn(c, { executeSql: (text, values) => c.query(text, values as unknown[]) });
        await c.query("COMMIT");
        return out;
      } catch (e) {
        await c.query("ROLLBACK").catch(() => undefined);
        throw e;
      } finally {
        c.release();
      }
    },
    async close() {
      await boss.stop({ graceful: false, close: false, wait: true }).catch(() => undefined);
      await pool.end().catch(() => undefined);
    },
  };
}
