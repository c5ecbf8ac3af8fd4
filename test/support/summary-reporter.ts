import type { SerializedError } from "vitest";
import type { Reporter, TestCase, TestModule, TestRunEndReason, TestSuite } from "vitest/node";

export interface RunCounts {
  passed: number;
  failed: number;
  skipped: number;
}

/**
 * Counts a finished run for CI. Every test case is passed, failed or skipped (skip, todo, `only`
 * elsewhere, or never run because the run stopped). A file or suite that failed on its own — an
 * import error, a failing beforeAll/afterAll — counts as one more failure when none of its tests
 * failed, and so does each unhandled error. A run that vitest ends as failed or interrupted with
 * none of these (a global set-up that threw, no test files) counts one failure: the failed count
 * is zero only when the run was clean.
 */
export function countRun(
  testModules: ReadonlyArray<TestModule>,
  unhandledErrors: ReadonlyArray<SerializedError>,
  reason: TestRunEndReason,
): RunCounts {
  const counts: RunCounts = { passed: 0, failed: 0, skipped: 0 };
  for (const testModule of testModules) {
    for (const test of testModule.children.allTests()) {
      const state = test.result().state;
      if (state === "passed") counts.passed++;
      else if (state === "failed") counts.failed++;
      else counts.skipped++;
    }
    counts.failed += groupFailuresWithoutFailedTest(testModule);
  }
  counts.failed += unhandledErrors.length;
  if (reason !== "passed" && counts.failed === 0) counts.failed = 1;
  return counts;
}

/** The one line CI reads, with nothing else on it. */
export function formatRunCounts(counts: RunCounts): string {
  return `${counts.passed} passed, ${counts.failed} failed, ${counts.skipped} skipped`;
}

function groupFailuresWithoutFailedTest(group: TestModule | TestSuite): number {
  let failures = 0;
  for (const suite of group.children.suites()) failures += groupFailuresWithoutFailedTest(suite);
  if (failures > 0) return failures;
  if (group.errors().length === 0) return 0;
  return hasFailedTest(group.children.allTests()) ? 0 : 1;
}

function hasFailedTest(tests: Iterable<TestCase>): boolean {
  for (const test of tests) if (test.result().state === "failed") return true;
  return false;
}

/** Vitest reporter that prints `<passed> passed, <failed> failed, <skipped> skipped` once, at the end of a run. */
export default class SummaryReporter implements Reporter {
  onTestRunEnd(testModules: ReadonlyArray<TestModule>, unhandledErrors: ReadonlyArray<SerializedError>, reason: TestRunEndReason): void {
    process.stdout.write(`\n${formatRunCounts(countRun(testModules, unhandledErrors, reason))}\n`);
  }
}
