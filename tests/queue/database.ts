import { randomBytes } from "node:crypto";
import pg from "pg";
import { inject, it } from "vitest";

/**
 * The throwaway server's URL for a queue test file, or undefined when there is none: then the file's
 * tests are skipped with the reason printed, except under CI, where a missing server fails the run.
 */
export function postgresUrl(file: string): string | undefined {
  const pg = inject("postgres");
  if ("url" in pg) return pg.url;
  if (process.env.CI) {
    it(`PostgreSQL is available for ${file} (CI must run the queue tests)`, () => {
      throw new Error(`queue tests cannot run: ${pg.missing}`);
    });
  } else {
    console.warn(`\n${file}: queue tests SKIPPED: ${pg.missing}\n`);
  }
  return undefined;
}

/** A fresh database on the server for one test file, so files can run side by side. */
export async function freshDatabase(url: string): Promise<string> {
  const name = `t_${randomBytes(6).toString("hex")}`;
  const c = new pg.Client({ connectionString: url });
  await c.connect();
  try {
    await c.query(`CREATE DATABASE ${name}`);
  } finally {
    await c.end();
  }
  const u = new URL(url);
  u.pathname = `/${name}`;
  return u.toString();
}
