import type { TestProject } from "vitest/node";
import { findPostgresBin, startTestServer, type TestServer } from "./postgresServer.js";

declare module "vitest" {
  export interface ProvidedContext {
    /** The throwaway server's URL, or why there is none. */
    postgres: { url: string } | { missing: string };
  }
}

let server: TestServer | undefined;

/** Starts PostgreSQL once for the whole run, unless the run was narrowed to files that are not queue tests. */
export async function setup(project: TestProject): Promise<void> {
  const filters = process.argv.slice(2).filter((a) => !a.startsWith("-") && a !== "run" && !a.includes("vitest"));
  if (filters.length > 0 && !filters.some((f) => /queue/.test(f))) {
    project.provide("postgres", { missing: "not started: this run has no queue tests" });
    return;
  }
  const bin = findPostgresBin();
  if (!bin) {
    project.provide("postgres", {
      missing: "no PostgreSQL server binaries (initdb, pg_ctl) on this machine; apt-get install postgresql",
    });
    return;
  }
  try {
    server = await startTestServer(bin);
    project.provide("postgres", { url: server.url });
  } catch (e) {
    const err = e as Error & { stderr?: Buffer };
    project.provide("postgres", {
      missing: `PostgreSQL from ${bin} did not start: ${(err.stderr?.toString() || err.message).trim().split("\n").slice(-3).join(" ")}`,
    });
  }
}

export function teardown(): void {
  server?.stop();
  server = undefined;
}
