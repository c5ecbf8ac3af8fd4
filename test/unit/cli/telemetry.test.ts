import fs from "node:fs";
import { describe, expect, test } from "vitest";

// Next.js telemetry must be off on every path the project itself uses to build or serve the app.
describe("Next.js telemetry is disabled", () => {
  const scripts = (JSON.parse(fs.readFileSync("package.json", "utf8")) as { scripts: Record<string, string> }).scripts;

  test.each(["build", "dev"])("npm run %s sets NEXT_TELEMETRY_DISABLED=1", (name) => {
    expect(scripts[name]).toMatch(/^NEXT_TELEMETRY_DISABLED=1 next /);
  });

  test.each([
    ["lib/cli/start.ts", /process\.env\.NEXT_TELEMETRY_DISABLED = "1";/],
    ["lib/cli/app-server.mjs", /process\.env\.NEXT_TELEMETRY_DISABLED = "1";/],
    ["test/support/e2e-global-setup.ts", /NEXT_TELEMETRY_DISABLED: "1"/],
  ])("%s sets it for the build and the app processes", (file, pattern) => {
    expect(fs.readFileSync(file, "utf8")).toMatch(pattern);
  });
});
