import { defineConfig } from "vitest/config";
import * as os from "node:os";
import * as path from "node:path";
import SummaryReporter from "./tests/support/summary-reporter.js";

export default defineConfig({
  test: {
    include: ["tests/**/*.test.ts"],
    exclude: ["tests/.tmp/**", "tests/e2e/**", "node_modules/**"],
    testTimeout: 120_000,
    hookTimeout: 300_000,
    pool: "forks",
    maxWorkers: 2,
    // the CLI and the language server under test keep their facts cache here, not in the user's
    // cache folder (every suite then also runs warm against facts an earlier one stored)
    env: { FERRULE_CACHE_DIR: path.join(os.tmpdir(), `ferrule-test-cache-${process.pid}`) },
    reporters: ["default", new SummaryReporter("vitest")],
  },
});
