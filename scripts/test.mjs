// `npm test`: vitest, plus the plain closing line "N passed, N failed" that CI reads; keeps vitest's exit code.
import { spawnSync } from "node:child_process";
import { existsSync, readdirSync, readFileSync, rmSync } from "node:fs";

// Tests that run the built CLI (worker threads exist only in dist/) need a fresh build: make it first, so no test
// has a reason to skip.
const build = spawnSync("npx", ["tsc", "-p", "tsconfig.build.json"], { stdio: "inherit" });
if (build.status !== 0) {
  console.log("0 passed, 1 failed");
  process.exit(build.status || 1);
}

const report = ".vitest.json";
rmSync(report, { force: true });
const r = spawnSync("npx", ["vitest", "run", "--reporter=default", "--reporter=json", `--outputFile=${report}`, ...process.argv.slice(2)], { stdio: "inherit" });
try {
  const j = JSON.parse(readFileSync(report, "utf8"));
  const skipped = (j.numPendingTests ?? 0) + (j.numTodoTests ?? 0);
  if (skipped) explainSkipped(j);
  console.log(`${j.numPassedTests} passed, ${j.numFailedTests} failed${skipped ? `, ${skipped} skipped` : ""}`);
} catch {
  console.log("0 passed, 1 failed");
  process.exit(r.status || 1);
}
process.exit(r.status ?? 1);

/**
 * Before the summary: which tests skipped, why, and the one command that makes them run. Only the browser tests
 * (Chromium; poppler-utils reads their PDFs back) and the queue tests (PostgreSQL) ever skip, and only outside CI.
 */
function explainSkipped(j) {
  const byFile = new Map();
  for (const f of j.testResults ?? []) {
    const n = (f.assertionResults ?? []).filter((a) => a.status === "pending" || a.status === "skipped" || a.status === "todo").length;
    if (n) byFile.set(f.name.replace(process.cwd() + "/", ""), n);
  }
  const has = (cmd) => spawnSync("sh", ["-c", `command -v ${cmd}`]).status === 0;
  const chromium = existsSync(process.env.CHROMIUM ?? "/usr/bin/chromium");
  const pg = has("initdb") || (existsSync("/usr/lib/postgresql") && readdirSync("/usr/lib/postgresql").length > 0);
  const missing = [...(chromium ? [] : ["chromium"]), ...(has("pdftotext") ? [] : ["poppler-utils"]), ...(pg ? [] : ["postgresql"])];
  console.log("\nSkipped tests (they need system packages this machine lacks):");
  for (const [file, n] of byFile) {
    const why = /queue/.test(file) ? "PostgreSQL (initdb, pg_ctl)" : /report/.test(file) ? "Chromium (and poppler-utils to read the PDFs back)" : "a system package";
    console.log(`  ${file}: ${n} skipped, needs ${why}`);
  }
  console.log(missing.length ? `To run them: sudo apt-get install -y ${missing.join(" ")} && npm test` : "To run them: npm test (the packages are present now)");
  console.log("");
}
