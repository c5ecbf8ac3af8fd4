import { readdirSync, readFileSync, statSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, test } from "vitest";

// Tests, seeds and sources cite the project's own science reference as "REFERENCE.md §N"; that file is
// lib/analysis/REFERENCE.md. Every citation must name a section that exists there.
const ROOT = join(import.meta.dirname, "..", "..");
const REFERENCE = readFileSync(join(ROOT, "lib/analysis/REFERENCE.md"), "utf8");
const SECTIONS = new Set([...REFERENCE.matchAll(/^## §(\d+) /gm)].map((m) => Number(m[1])));

function files(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir)) {
    const full = join(dir, name);
    if (name === "node_modules" || name === "generated") continue;
    if (statSync(full).isDirectory()) out.push(...files(full));
    else if (/\.(ts|tsx|mjs)$/.test(name)) out.push(full);
  }
  return out;
}

describe("citations of the science reference", () => {
  const citations = ["test", "seed", "lib"].flatMap((d) => files(join(ROOT, d))).flatMap((file) =>
    [...readFileSync(file, "utf8").matchAll(/REFERENCE\.md §(\d+)/g)].map((m) => ({ file: file.slice(ROOT.length + 1), section: Number(m[1]) })),
  );

  test("the reference has its numbered sections and the tests use it", () => {
    expect(SECTIONS.size).toBeGreaterThanOrEqual(12);
    expect(citations.length).toBeGreaterThan(40);
  });

  test("every cited section exists in lib/analysis/REFERENCE.md", () => {
    expect(citations.filter((c) => !SECTIONS.has(c.section))).toEqual([]);
  });
});
