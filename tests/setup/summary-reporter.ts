import type { Reporter, TestModule } from "vitest/node";

/** Prints one line of our own at the very end: `N passed, N failed` over every project. */
export default class SummaryReporter implements Reporter {
  onTestRunEnd(testModules: ReadonlyArray<TestModule>, unhandledErrors: ReadonlyArray<unknown>): void {
    let passed = 0;
    let failed = 0;
    let skipped = 0;
    for (const mod of testModules) {
      for (const test of mod.children.allTests()) {
        const state = test.result().state;
        if (state === "passed") passed += 1;
        else if (state === "failed") failed += 1;
        else skipped += 1;
      }
      // A file that failed to load has no tests but is still a failure.
      if (mod.state() === "failed" && [...mod.children.allTests()].length === 0) failed += 1;
    }
    failed += unhandledErrors.length;
    const tail = skipped > 0 ? `, ${skipped} skipped` : "";
    process.stdout.write(`\n${passed} passed, ${failed} failed${tail}\n`);
  }
}
