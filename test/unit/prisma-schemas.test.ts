import { execFileSync } from "node:child_process";
import fs from "node:fs";
import { describe, expect, test } from "vitest";

describe("prisma schemas", () => {
  test("the PostgreSQL schema is generated from the SQLite one and has not drifted", () => {
    // sync-schemas --check exits 1 (and execFileSync throws) when the copy differs.
    expect(() => execFileSync(process.execPath, ["prisma/sync-schemas.mjs", "--check"], { stdio: "pipe" })).not.toThrow();
  });

  test("both schemas declare the same models", () => {
    const models = (file: string) => [...fs.readFileSync(file, "utf8").matchAll(/^model (\w+)/gm)].map((m) => m[1]);
    const sqlite = models("prisma/schema.prisma");
    expect(sqlite.length).toBeGreaterThanOrEqual(20);
    expect(models("prisma/postgres/schema.prisma")).toEqual(sqlite);
  });

  test("each engine has a checked-in migration history", () => {
    for (const dir of ["prisma/migrations", "prisma/postgres/migrations"]) {
      const folders = fs.readdirSync(dir).filter((f) => fs.statSync(`${dir}/${f}`).isDirectory());
      expect(folders.length).toBeGreaterThan(0);
      for (const folder of folders) expect(fs.existsSync(`${dir}/${folder}/migration.sql`)).toBe(true);
    }
  });
});
