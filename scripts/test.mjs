// `npm test`: vitest on every test file but the slow set, then the plain closing line "N passed, N failed" that CI
// reads; keeps vitest's exit code.
//   node scripts/test.mjs [vitest args]          the default set: tests/**/*.test.ts without the slow files
//   node scripts/test.mjs --slow [vitest args]   `npm run test:slow`: the slow set alone (CI runs it too)
//   node scripts/test.mjs --total                the closing line of every run recorded in $PSDGATE_TEST_TALLY
//   node scripts/test.mjs --all                  `npm run test:all` (README's test command, what CI runs): the
//                                                default set, then the slow set, then one closing line for both
// The slow set is named by its files: *.montecarlo.test.ts (a decision rule or a rate proven by Monte Carlo) and
// *.slow.test.ts (anything else that takes long); a new file of either name goes there with no list to edit.
// With PSDGATE_TEST_TALLY set (.ci/run sets it), each run appends its counts to that file and words its own
// line "fast set: N tests passed, N failed", so that the one "N passed, N failed" line of the CI log is the
// total from `--total`.
import { spawnSync } from "node:child_process";
import { appendFileSync, existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";

const SLOW_FILES = ["tests/**/*.montecarlo.test.ts", "tests/**/*.slow.test.ts"];
const args = process.argv.slice(2);
const tally = process.env.PSDGATE_TEST_TALLY || undefined;

if (args[0] === "--all") {
  // Both sets, always (a failing fast set does not hide the slow one), counted into one tally.
  const dir = mkdtempSync(join(tmpdir(), "psdgate-tally-"));
  const env = { ...process.env, PSDGATE_TEST_TALLY: join(dir, "tally") };
  const self = process.argv[1];
  for (const part of [[], ["--slow"]])
    spawnSync(process.execPath, [self, ...part, ...args.slice(1)], { stdio: "inherit", env });
  const total = spawnSync(process.execPath, [self, "--total"], { stdio: "inherit", env });
  rmSync(dir, { recursive: true, force: true });
  process.exit(total.status ?? 1);
}

if (args[0] === "--total") {
  let parts = [];
  try {
    parts = readFileSync(tally ?? "", "utf8")
      .split("\n")
      .filter(Boolean)
      .map((l) => JSON.parse(l));
  } catch {
    // No tally: nothing ran, which is a failure.
  }
  const sum = (k) => parts.reduce((t, p) => t + p[k], 0);
  const failed =
    sum("failed") + parts.filter((p) => p.status !== 0 && p.failed === 0).length + (parts.length === 0 ? 1 : 0);
  const skipped = sum("skipped");
  console.log(`${sum("passed")} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ""}`);
  process.exit(failed > 0 ? 1 : 0);
}

const slow = args[0] === "--slow";
const rest = slow ? args.slice(1) : args;
const set = slow ? "slow set" : "fast set";
function finish(passed, failed, skipped, status) {
  if (tally) {
    appendFileSync(tally, JSON.stringify({ set, passed, failed, skipped, status }) + "\n");
    console.log(`${set}: ${passed} tests passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ""}`);
  } else console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ""}`);
  process.exit(status);
}

// Tests that run the built CLI (worker threads exist only in dist/) need a fresh build: make it first, so no test
// has a reason to skip.
const build = spawnSync("npx", ["tsc", "-p", "tsconfig.build.json"], { stdio: "inherit" });
if (build.status !== 0) finish(0, 1, 0, build.status || 1);

const report = slow ? ".vitest-slow.json" : ".vitest.json";
rmSync(report, { force: true });
// The fast set leaves the slow files out (vitest.config.ts reads PSDGATE_TEST_EXCLUDE); the slow set is vitest's
// include list (PSDGATE_TEST_INCLUDE), so file filters given after it narrow the slow set rather than add to it.
// Both go by environment, not as arguments: tests/queue/globalSetup.ts reads file filters from the arguments.
const env = { ...process.env, [slow ? "PSDGATE_TEST_INCLUDE" : "PSDGATE_TEST_EXCLUDE"]: SLOW_FILES.join(",") };
const r = spawnSync(
  "npx",
  ["vitest", "run", "--reporter=default", "--reporter=json", `--outputFile=${report}`, ...rest],
  { stdio: "inherit", env },
);
let j;
try {
  j = JSON.parse(readFileSync(report, "utf8"));
} catch {
  finish(0, 1, 0, r.status || 1);
}
const skippedNow = (j.numPendingTests ?? 0) + (j.numTodoTests ?? 0);
if (skippedNow) explainSkipped(j);
finish(j.numPassedTests, j.numFailedTests, (j.numPendingTests ?? 0) + (j.numTodoTests ?? 0), r.status ?? 1);
/**
 * Before the summary: which tests skipped, why, and the one command that makes them run. Only the browser tests
 * (Chromium; poppler-utils reads their PDFs back) and the queue tests (PostgreSQL) ever skip, and only outside CI.
 */
function explainSkipped(j) {
  const byFile = new Map();
  for (const f of j.testResults ?? []) {
    const n = (f.assertionResults ?? []).filter(
      (a) => a.status === "pending" || a.status === "skipped" || a.status === "todo",
    ).length;
    if (n) byFile.set(f.name.replace(process.cwd() + "/", ""), n);
  }
  const has = (cmd) => spawnSync("sh", ["-c", `command -v ${cmd}`]).status === 0;
  const chromium = existsSync(process.env.CHROMIUM ?? "/usr/bin/chromium");
  const pg = has("initdb") || (existsSync("/usr/lib/postgresql") && readdirSync("/usr/lib/postgresql").length > 0);
  const missing = [
    ...(chromium ? [] : ["chromium"]),
    ...(has("pdftotext") ? [] : ["poppler-utils"]),
    ...(pg ? [] : ["postgresql"]),
  ];
  console.log("\nSkipped tests (they need system packages this machine lacks):");
  for (const [file, n] of byFile) {
    const why = /queue/.test(file)
      ? "PostgreSQL (initdb, pg_ctl)"
      : /report/.test(file)
        ? "Chromium (and poppler-utils to read the PDFs back)"
        : "a system package";
    console.log(`  ${file}: ${n} skipped, needs ${why}`);
  }
  console.log(
    missing.length
      ? `To run them: sudo apt-get install -y ${missing.join(" ")} && npm run test:all`
      : "To run them: npm run test:all (the packages are present now)",
  );
  console.log("");
}
