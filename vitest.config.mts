import { defineConfig } from "vitest/config";
import SummaryReporter from "./tests/support/summary-reporter.js";

export default defineConfig({
  test: {
    include: ["tests/**/*.test.ts"],
    exclude: ["tests/.tmp/**", "tests/e2e/**", "node_modules/**"],
    testTimeout: 120_000,
    hookTimeout: 300_000,
    pool: "forks",
    maxWorkers: 2,
    reporters: ["default", new SummaryReporter("vitest")],
  },
});
