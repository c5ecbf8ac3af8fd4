import { afterAll, beforeAll, describe, expect, test, vi } from "vitest";
import { createUser, signIn } from "../../lib/auth/accounts.ts";
import { createTestDatabase, type TestDatabase } from "../support/test-databases.ts";

const DAY_MS = 86_400_000;

// LAPSEBANK_SESSION_DAYS sets how long a sign-in lasts (lib/env.ts validates it once, so it is set
// before anything in this file reads the environment).
describe("session lifetime follows LAPSEBANK_SESSION_DAYS", () => {
  let database: TestDatabase;
  const password = "correct horse battery";

  beforeAll(async () => {
    vi.stubEnv("LAPSEBANK_SESSION_DAYS", "3");
    database = await createTestDatabase("sqlite");
    await createUser(database.db, { email: "days@example.org", password, displayName: "Days" });
  });
  afterAll(async () => {
    vi.unstubAllEnvs();
    await database?.drop();
  });

  test("a sign-in expires after the configured days, not the 14-day default", async () => {
    const before = Date.now();
    const session = await signIn(database.db, { email: "days@example.org", password }, "127.0.0.1");
    const after = Date.now();
    expect(session.expiresAt.getTime()).toBeGreaterThanOrEqual(before + 3 * DAY_MS);
    expect(session.expiresAt.getTime()).toBeLessThanOrEqual(after + 3 * DAY_MS);
    const stored = await database.db.session.findFirstOrThrow({ where: { userId: session.userId } });
    expect(stored.expiresAt.getTime()).toBe(session.expiresAt.getTime());
  });

  test("an explicit sessionDays wins over the environment", async () => {
    const before = Date.now();
    const session = await signIn(database.db, { email: "days@example.org", password }, "127.0.0.1", { sessionDays: 1 });
    expect(session.expiresAt.getTime() - before).toBeLessThan(1 * DAY_MS + 60_000);
    expect(session.expiresAt.getTime() - before).toBeGreaterThanOrEqual(1 * DAY_MS - 1_000);
  });
});
