import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";

// Runs a real vitest on small throw-away test files with the summary reporter beside the
// default one (as vitest.config.ts uses it) and reads the line CI reads.

const root = process.cwd();
const reporterPath = path.join(root, "test/support/summary-reporter.ts");
const vitestBin = path.join(root, "node_modules/.bin/vitest");
const tempDirs: string[] = [];

afterAll(() => {
  for (const dir of tempDirs) fs.rmSync(dir, { recursive: true, force: true });
});

function runFixture(files: Record<string, string>, options: { globalSetup?: string } = {}): { status: number | null; lines: string[]; stdout: string } {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "lapsebank-reporter-"));
  tempDirs.push(dir);
  const setup = options.globalSetup === undefined ? "" : ` globalSetup: ["./global-setup.mjs"],`;
  if (options.globalSetup !== undefined) fs.writeFileSync(path.join(dir, "global-setup.mjs"), options.globalSetup);
  fs.writeFileSync(
    path.join(dir, "vitest.config.mjs"),
    `export default { test: { globals: true, include: ["*.test.js"],${setup} reporters: ["default", ${JSON.stringify(reporterPath)}] } };\n`,
  );
  for (const [name, text] of Object.entries(files)) fs.writeFileSync(path.join(dir, name), text);
  // A nested vitest must not think it runs inside this one's worker.
  const env: NodeJS.ProcessEnv = { ...process.env, NO_COLOR: "1", CI: "1" };
  for (const key of Object.keys(env)) if (key.startsWith("VITEST") || key === "NODE_OPTIONS") delete env[key];
  const result = spawnSync(vitestBin, ["run", "--root", dir], { cwd: dir, env, encoding: "utf8", timeout: 60_000 });
  return { status: result.status, stdout: result.stdout, lines: result.stdout.split("\n").map((line) => line.trimEnd()) };
}

const SUMMARY_LINE = /^\d+ passed, \d+ failed, \d+ skipped$/;

describe("summary reporter", () => {
  it("prints the counts of a clean run alone on the last line", () => {
    const run = runFixture({ "ok.test.js": `test("one", () => {}); test("two", () => { expect(1 + 1).toBe(2); });\n` });
    expect(run.status, run.stdout).toBe(0);
    const summaries = run.lines.filter((line) => SUMMARY_LINE.test(line));
    // [D] two passing tests in the fixture
    expect(summaries).toEqual(["2 passed, 0 failed, 0 skipped"]);
    expect(run.lines.filter((line) => line !== "").at(-1)).toBe("2 passed, 0 failed, 0 skipped");
  });

  it("counts failures, skips and todos, and failures that belong to no single test", () => {
    const run = runFixture({
      // 2 passed, 1 failed, 1 skipped, 1 todo
      "mixed.test.js": `test("p1", () => {}); test("p2", () => {}); test("f1", () => { throw new Error("boom"); });\ntest.skip("s1", () => {}); test.todo("t1");\n`,
      // a failing beforeAll: its 2 tests are not run (skipped) and the suite failure counts once
      "hook.test.js": `describe("hooked", () => { beforeAll(() => { throw new Error("hook"); }); test("h1", () => {}); test("h2", () => {}); });\n`,
      // a file that cannot be imported has no tests; it counts as one failure
      "broken.test.js": `import "./no-such-module.js";\ntest("never", () => {});\n`,
      // a failing afterAll after a passing test counts as one failure
      "after.test.js": `afterAll(() => { throw new Error("after"); }); test("ok", () => {});\n`,
    });
    expect(run.status, run.stdout).toBe(1);
    // [D] passed p1 p2 ok = 3; failed f1 + hooked suite + broken file + afterAll = 4; skipped s1 t1 h1 h2 = 4
    expect(run.lines.filter((line) => SUMMARY_LINE.test(line))).toEqual(["3 passed, 4 failed, 4 skipped"]);
  });

  it("never reports 0 failed when the run itself failed before any test (global set-up threw)", () => {
    const run = runFixture(
      { "ok.test.js": `test("one", () => {});\n` },
      { globalSetup: `export default function () { throw new Error("no server"); }\n` },
    );
    // [D] vitest ends this run as "failed" with no test modules and no unhandled errors
    expect(run.lines.filter((line) => SUMMARY_LINE.test(line))).toEqual(["0 passed, 1 failed, 0 skipped"]);
  });
});
