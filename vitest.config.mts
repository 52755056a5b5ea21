import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    include: ["tests/**/*.test.ts"],
    exclude: ["tests/.tmp/**", "tests/e2e/**", "node_modules/**"],
    testTimeout: 120_000,
    hookTimeout: 300_000,
    pool: "forks",
    maxWorkers: 2,
  },
});
