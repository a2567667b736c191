// `npm test`: vitest, plus the plain closing line "N passed, N failed" that CI reads; keeps vitest's exit code.
import { spawnSync } from "node:child_process";
import { readFileSync, rmSync } from "node:fs";

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
  console.log(`${j.numPassedTests} passed, ${j.numFailedTests} failed${skipped ? `, ${skipped} skipped` : ""}`);
} catch {
  console.log("0 passed, 1 failed");
  process.exit(r.status || 1);
}
process.exit(r.status ?? 1);
