import { readdirSync, readFileSync, statSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, test } from "vitest";

// DESIGN.md / STYLE.md: lib/analysis and lib/stats are pure (no framework, database, Node I/O,
// environment, clock or unseeded randomness).
const ROOT = join(import.meta.dirname, "..", "..");
const DIRS = ["lib/analysis", "lib/stats"];

function sourceFiles(dir: string): string[] {
  let out: string[] = [];
  let entries: string[] = [];
  try {
    entries = readdirSync(dir);
  } catch {
    return out;
  }
  for (const name of entries) {
    const full = join(dir, name);
    if (statSync(full).isDirectory()) out = out.concat(sourceFiles(full));
    else if (/\.(ts|tsx|js|mjs)$/.test(name)) out.push(full);
  }
  return out;
}

const FORBIDDEN: Array<[string, RegExp]> = [
  ["next", /from\s+["']next(\/[^"']*)?["']|import\(\s*["']next/],
  ["@prisma", /["']@prisma\//],
  ["node: built-ins", /["']node:/],
  ["fs", /from\s+["'](fs|fs\/promises)["']|require\(\s*["']fs/],
  ["path", /from\s+["']path["']|require\(\s*["']path/],
  ["process.env", /process\.env/],
  ["Date.now", /Date\.now\s*\(/],
  ["new Date()", /new\s+Date\s*\(\s*\)/],
  ["Math.random", /Math\.random/],
];

describe("purity of lib/analysis and lib/stats", () => {
  const files = DIRS.flatMap((d) => sourceFiles(join(ROOT, d)));

  test("the scan sees the analysis sources", () => {
    expect(files.some((f) => f.endsWith(join("lib", "analysis", "index.ts")))).toBe(true);
  });

  test.each(FORBIDDEN)("no %s", (_name, pattern) => {
    const offenders = files.filter((f) => pattern.test(readFileSync(f, "utf8")));
    expect(offenders.map((f) => f.slice(ROOT.length + 1))).toEqual([]);
  });

  test("the scan itself catches a forbidden import", () => {
    expect(FORBIDDEN.some(([, p]) => p.test('import { readFileSync } from "node:fs";'))).toBe(true);
    expect(FORBIDDEN.some(([, p]) => p.test("const t = Date.now();"))).toBe(true);
  });
});
