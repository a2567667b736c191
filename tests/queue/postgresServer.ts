import { execFileSync, spawnSync } from "node:child_process";
import { chmodSync, chownSync, existsSync, mkdtempSync, rmSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir, userInfo } from "node:os";
import { join } from "node:path";

/**
 * A throwaway PostgreSQL server for the queue tests: initdb and pg_ctl from the machine's PostgreSQL
 * (15 here) in a temporary folder, listening on 127.0.0.1 only, on a free port, trust authentication
 * (acceptable only because of both). PostgreSQL refuses to run as root, so as root it runs as `postgres`.
 */
export interface TestServer {
  url: string;
  /** Stops the server at once (as a crash would) and keeps its files, for `start` again on the same port. */
  halt(): void;
  start(): void;
  stop(): void;
}

const BIN_DIRS = [
  "/usr/lib/postgresql/17/bin",
  "/usr/lib/postgresql/16/bin",
  "/usr/lib/postgresql/15/bin",
  "/usr/local/bin",
  "/usr/bin",
];

export function findPostgresBin(): string | undefined {
  for (const d of BIN_DIRS) if (existsSync(join(d, "initdb")) && existsSync(join(d, "pg_ctl"))) return d;
  const w = spawnSync("sh", ["-c", "command -v initdb"], { encoding: "utf8" });
  const p = w.stdout.trim();
  return p ? p.replace(/\/initdb$/, "") : undefined;
}

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer();
    s.unref();
    s.on("error", reject);
    s.listen(0, "127.0.0.1", () => {
      const port = (s.address() as { port: number }).port;
      s.close(() => resolve(port));
    });
  });
}

export async function startTestServer(bin: string): Promise<TestServer> {
  const dir = mkdtempSync(join(tmpdir(), "psdgate-pg-"));
  const asRoot = userInfo().uid === 0;
  const run = (cmd: string, args: string[]) =>
    asRoot
      ? execFileSync("runuser", ["-u", "postgres", "--", join(bin, cmd), ...args], { stdio: "pipe" })
      : execFileSync(join(bin, cmd), args, { stdio: "pipe" });
  if (asRoot) {
    const pw = execFileSync("id", ["-u", "postgres"], { encoding: "utf8" }).trim();
    const gid = execFileSync("id", ["-g", "postgres"], { encoding: "utf8" }).trim();
    chownSync(dir, Number(pw), Number(gid));
    chmodSync(dir, 0o700);
  }
  const data = join(dir, "db");
  run("initdb", ["-D", data, "-A", "trust", "-U", "postgres", "--no-sync"]);
  const port = await freePort();
  const start = () =>
    run("pg_ctl", [
      "-D",
      data,
      "-w",
      "-t",
      "60",
      "-o",
      `-p ${port} -k ${dir} -c listen_addresses=127.0.0.1 -c fsync=off -c max_connections=100`,
      "-l",
      join(dir, "log"),
      "start",
    ]);
  start();
  return {
    url: `postgres://postgres@127.0.0.1:${port}/postgres`,
    halt: () => run("pg_ctl", ["-D", data, "-w", "-m", "immediate", "stop"]),
    start,
    stop() {
      try {
        run("pg_ctl", ["-D", data, "-w", "-m", "immediate", "stop"]);
      } finally {
        rmSync(dir, { recursive: true, force: true });
      }
    },
  };
}
