import { defineConfig } from "vitest/config";

export default defineConfig({
  // globalSetup: the throwaway PostgreSQL server of the queue tests (tests/queue/globalSetup.ts).
  test: { include: ["tests/**/*.test.ts"], testTimeout: 60000, hookTimeout: 60000, globalSetup: ["tests/queue/globalSetup.ts"] },
});
