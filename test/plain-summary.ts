// A vitest reporter that ends the run with one plain line, "N passed, N failed", for tools that
// read a run's closing line.
import type { Reporter, TestModule } from "vitest/node";

export default class PlainSummary implements Reporter {
  onTestRunEnd(modules: ReadonlyArray<TestModule>): void {
    let passed = 0,
      failed = 0,
      skipped = 0;
    for (const m of modules) {
      for (const t of m.children.allTests()) {
        const state = t.result().state;
        if (state === "passed") passed++;
        else if (state === "failed") failed++;
        else skipped++;
      }
    }
    process.stdout.write(`\n${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ""}\n`);
  }
}
