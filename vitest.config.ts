import { availableParallelism } from "node:os";
import { configDefaults, defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    // `npm run test:slow` narrows this to the slow set (scripts/test.mjs, which `npm test` leaves it out of).
    include: process.env.PSDGATE_TEST_INCLUDE ? process.env.PSDGATE_TEST_INCLUDE.split(",") : ["tests/**/*.test.ts"],
    exclude: [
      ...configDefaults.exclude,
      ...(process.env.PSDGATE_TEST_EXCLUDE ? process.env.PSDGATE_TEST_EXCLUDE.split(",") : []),
    ],
    testTimeout: 60000,
    hookTimeout: 60000,
    // The throwaway PostgreSQL server of the queue tests (tests/queue/globalSetup.ts).
    globalSetup: ["tests/queue/globalSetup.ts"],
    // One test file per core. vitest's default keeps a core for itself (cores - 1), which on a 2-core machine
    // ran one file at a time; its own process is idle while the files run.
    maxWorkers: Math.max(2, availableParallelism()),
    // Test files share their worker's modules (the library is loaded once a worker, not once a file): on the
    // 2-core machine the default set took 122 s instead of 151 s, 53 s less CPU. So no test may leave state
    // behind in a module (a changed setting, a mock, a listener); none does today.
    isolate: false,
  },
});
