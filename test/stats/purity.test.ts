import { readFileSync, readdirSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, test } from "vitest";

// Common brief / STYLE.md: lib/stats is pure — no framework, database, file-system, environment,
// clock or unseeded randomness.
const forbidden = [/from\s+["']next/, /from\s+["']@prisma/, /from\s+["']node:/, /process\.env/, /Date\.now/, /Math\.random/];
const dir = join(process.cwd(), "lib", "stats");
const files = readdirSync(dir).filter((f) => f.endsWith(".ts") && !f.endsWith(".d.ts"));

describe("lib/stats purity", () => {
  test("has source files to check", () => {
    expect(files.length).toBeGreaterThan(5);
  });

  test.each(files)("%s uses no impure imports or calls", (file) => {
    const source = readFileSync(join(dir, file), "utf8");
    for (const pattern of forbidden) expect(source, `${file} matches ${pattern}`).not.toMatch(pattern);
  });
});
