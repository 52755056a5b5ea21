// Prints one closing summary line, "<label>: N passed, M failed[, K skipped]", after a vitest run.
import type { Reporter, TestModule } from "vitest/node";

export default class SummaryReporter implements Reporter {
  constructor(private readonly label = "tests") {}

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
    process.stdout.write(`\n${this.label}: ${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ""}\n`);
  }
}
