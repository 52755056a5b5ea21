// Prints one summary line for `npm run test:e2e`: "e2e: N passed, M failed".
import type { Reporter, TestModule } from "vitest/node";

export default class SummaryReporter implements Reporter {
  onTestRunEnd(modules: ReadonlyArray<TestModule>, errors: ReadonlyArray<unknown>): void {
    let passed = 0;
    let failed = 0;
    let skipped = 0;
    for (const m of modules) {
      for (const t of m.children.allTests()) {
        const s = t.result().state;
        if (s === "passed") passed++;
        else if (s === "failed") failed++;
        else skipped++;
      }
      if (m.state() === "failed" && ![...m.children.allTests()].some((t) => t.result().state === "failed")) failed++; // a failed hook
    }
    failed += errors.length;
    process.stdout.write(`\ne2e: ${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ""}\n`);
  }
}
