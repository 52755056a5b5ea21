// `npm run test:e2e`: the real-VS-Code end-to-end test (tests/e2e/), kept out of the default run.
import { defineConfig } from "vitest/config";
import SummaryReporter from "./tests/support/summary-reporter.js";

export default defineConfig({
  test: {
    include: ["tests/e2e/**/*.e2e.ts"],
    testTimeout: 300_000,
    hookTimeout: 1_500_000,
    pool: "forks",
    maxWorkers: 1,
    fileParallelism: false,
    reporters: ["default", new SummaryReporter("e2e")],
  },
});
