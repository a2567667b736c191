// A throwaway PostgreSQL for the queue benchmarks, as in tests/queue/postgresServer.ts: initdb with trust
// authentication in a temporary folder, started on a free port of 127.0.0.1 with durable settings (fsync on,
// as a lab's server would run: the commit of each result is part of the cost). stop() removes it all.
import { execFileSync } from "node:child_process";
import { chownSync, existsSync, mkdtempSync, rmSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir, userInfo } from "node:os";
import { join } from "node:path";

export async function startBenchServer() {
  const bin = ["/usr/lib/postgresql/15/bin", "/usr/local/bin", "/usr/bin"].find((d) => existsSync(join(d, "initdb")));
  if (!bin) throw new Error("no initdb: apt-get install postgresql");
  const dir = mkdtempSync(join(tmpdir(), "psdgate-bench-pg-"));
  const asRoot = userInfo().uid === 0;
  const pgRun = (cmd, args) =>
    asRoot
      ? execFileSync("runuser", ["-u", "postgres", "--", join(bin, cmd), ...args], { stdio: "pipe" })
      : execFileSync(join(bin, cmd), args, { stdio: "pipe" });
  if (asRoot)
    chownSync(
      dir,
      Number(execFileSync("id", ["-u", "postgres"], { encoding: "utf8" })),
      Number(execFileSync("id", ["-g", "postgres"], { encoding: "utf8" })),
    );
  const port = await new Promise((r) => {
    const s = createServer();
    s.listen(0, "127.0.0.1", () => {
      const p = s.address().port;
      s.close(() => r(p));
    });
  });
  pgRun("initdb", ["-D", join(dir, "db"), "-A", "trust", "-U", "postgres"]);
  pgRun("pg_ctl", [
    "-D",
    join(dir, "db"),
    "-w",
    "-o",
    `-p ${port} -k ${dir} -c listen_addresses=127.0.0.1`,
    "-l",
    join(dir, "log"),
    "start",
  ]);
  return {
    url: `postgres://postgres@127.0.0.1:${port}`,
    stop() {
      try {
        pgRun("pg_ctl", ["-D", join(dir, "db"), "-w", "-m", "fast", "stop"]);
      } finally {
        rmSync(dir, { recursive: true, force: true });
      }
    },
  };
}
