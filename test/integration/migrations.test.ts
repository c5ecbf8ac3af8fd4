import { spawnSync } from "node:child_process";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { applyMigrations } from "../../lib/db/migrate.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

// Each check exercises a workaround in prisma/schema-engine-wasm.mjs (see DEVELOPERS.md).
function prisma(args: string[], url: string) {
  const r = spawnSync("node_modules/.bin/prisma", args, { env: { ...process.env, DATABASE_URL: url }, encoding: "utf8" });
  return { status: r.status, output: `${r.stdout}\n${r.stderr}` };
}

describe.each(testEngines())("migrations on %s", (engine) => {
  let database: TestDatabase;
  beforeAll(async () => {
    database = await createTestDatabase(engine); // a fresh database: the migrations table starts missing
  });
  afterAll(async () => database?.drop());

  test("deploy applies every migration and is idempotent", () => {
    expect(() => applyMigrations(database.url, { quiet: true })).not.toThrow();
    const status = prisma(["migrate", "status"], database.url);
    expect(status.output).toContain("up to date");
    expect(status.status).toBe(0);
  });

  test("replaying the history on a shadow database matches the schema", () => {
    const dir = engine === "sqlite" ? "prisma/migrations" : "prisma/postgres/migrations";
    const schema = engine === "sqlite" ? "prisma/schema.prisma" : "prisma/postgres/schema.prisma";
    const diff = prisma(["migrate", "diff", "--from-migrations", dir, "--to-schema", schema, "--exit-code"], database.url);
    expect(diff.output).toContain("No difference detected");
    expect(diff.status).toBe(0);
  });

  test("the migrated tables accept and return a row", async () => {
    const school = await database.db.school.create({ data: { name: "Migration Check School", slug: "migration-check" } });
    expect((await database.db.school.findUniqueOrThrow({ where: { id: school.id } })).slug).toBe("migration-check");
  });
});
