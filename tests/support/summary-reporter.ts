import type { Reporter, SerializedError, TestModule } from 'vitest/node';

/**
 * Prints one closing line "N passed, N failed, N skipped" so that tools reading a run's last
 * lines (CI among them) see the totals in a plain, runner-independent form. A file that failed
 * outside its tests (a hook, an import) counts as one failure, as does an unhandled error.
 */
export default class SummaryReporter implements Reporter {
  onTestRunEnd(testModules: ReadonlyArray<TestModule>, unhandledErrors: ReadonlyArray<SerializedError> = []): void {
    let passed = 0;
    let failed = unhandledErrors.length;
    let skipped = 0;
    for (const module of testModules) {
      let failedHere = 0;
      for (const test of module.children.allTests()) {
        const state = test.result().state;
        if (state === 'passed') passed++;
        else if (state === 'failed') failedHere++;
        else skipped++;
      }
      if (failedHere === 0 && (module.state() === 'failed' || module.errors().length > 0)) failedHere = 1;
      failed += failedHere;
    }
    process.stdout.write(`\n${passed} passed, ${failed} failed, ${skipped} skipped\n`);
  }
}
