import { defineConfig } from "vitest/config";
import { BaseSequencer, type TestSpecification } from "vitest/node";
import { fileURLToPath } from "node:url";

const root = fileURLToPath(new URL(".", import.meta.url));

/**
 * Test files run in alphabetical order, always: the e2e files share one app and database, and the upload test
 * (last) adds real flights, after which Climatology leaves the invented demo flights out by default.
 */
class AlphabeticalSequencer extends BaseSequencer {
  override async sort(files: TestSpecification[]): Promise<TestSpecification[]> {
    return [...files].sort((a, b) => a.moduleId.localeCompare(b.moduleId));
  }
}

export default defineConfig({
  resolve: { alias: { "@": root, "server-only": `${root}test/support/server-only-stub.ts` } },
  test: {
    reporters: ["default", "./test/support/summary-reporter.ts"],
    sequence: { sequencer: AlphabeticalSequencer },
    projects: [
      {
        extends: true,
        // Generous timeout: property tests and generators run on a busy 2-core machine in CI.
        test: { name: "unit", include: ["test/analysis/**/*.test.ts", "test/stats/**/*.test.ts", "test/unit/**/*.test.ts"], testTimeout: 60_000 },
      },
      {
        extends: true,
        test: {
          name: "integration",
          include: ["test/integration/**/*.test.ts"],
          globalSetup: ["test/support/postgres-global-setup.ts"],
          testTimeout: 60_000,
          hookTimeout: 120_000,
          fileParallelism: false,
        },
      },
      {
        extends: true,
        test: {
          name: "e2e",
          include: ["test/e2e/**/*.test.ts"],
          globalSetup: ["test/support/postgres-global-setup.ts", "test/support/e2e-global-setup.ts"],
          testTimeout: 120_000,
          hookTimeout: 300_000,
          fileParallelism: false,
        },
      },
    ],
  },
});
