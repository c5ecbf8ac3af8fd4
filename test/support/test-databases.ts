import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import pg from "pg";
import { createDb, type DbHandle } from "../../lib/db/index.ts";
import { applyMigrations } from "../../lib/db/migrate.ts";

export type Engine = "sqlite" | "postgres";

export interface TestDatabase extends DbHandle {
  drop(): Promise<void>;
}

/** The engines integration tests run on. PostgreSQL comes from the global set-up (LAPSEBANK_TEST_POSTGRES_URL). */
export function testEngines(): Engine[] {
  return process.env.LAPSEBANK_TEST_POSTGRES_URL ? ["sqlite", "postgres"] : ["sqlite"];
}

/** A fresh, migrated database of its own for one test file. */
export async function createTestDatabase(engine: Engine): Promise<TestDatabase> {
  if (engine === "sqlite") {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "lapsebank-test-"));
    const url = `file:${path.join(dir, "test.db")}`;
    applyMigrations(url, { quiet: true });
    const handle = createDb(url);
    return {
      ...handle,
      drop: async () => {
        await handle.db.$disconnect();
        fs.rmSync(dir, { recursive: true, force: true });
      },
    };
  }
  const adminUrl = process.env.LAPSEBANK_TEST_POSTGRES_URL;
  if (!adminUrl) throw new Error("LAPSEBANK_TEST_POSTGRES_URL is not set (the integration global set-up starts PostgreSQL)");
  const name = `lapsebank_test_${process.pid}_${Math.random().toString(36).slice(2, 8)}`;
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  await admin.query(`CREATE DATABASE "${name}"`);
  await admin.end();
  const url = Object.assign(new URL(adminUrl), { pathname: `/${name}` }).toString();
  applyMigrations(url, { quiet: true });
  const handle = createDb(url);
  return {
    ...handle,
    drop: async () => {
      await handle.db.$disconnect();
      // A background worker (autovacuum) may still sit in the database, and only a superuser may
      // end it: retry a few times, then leave the database to the throw-away cluster.
      const client = new pg.Client({ connectionString: adminUrl });
      await client.connect();
      try {
        for (let attempt = 1; ; attempt++) {
          try {
            await client.query(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`);
            break;
          } catch (error) {
            if (attempt >= 5) {
              console.warn(`test database ${name} left behind: ${(error as Error).message}`);
              break;
            }
            await new Promise((resolve) => setTimeout(resolve, 300 * attempt));
          }
        }
      } finally {
        await client.end();
      }
    },
  };
}
