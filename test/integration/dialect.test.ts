import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { Prisma } from "../../lib/db/index.ts";
import { and, column, dialectFor, identifier, list, postgresDialect, sqliteDialect, type Dialect } from "../../lib/db/dialect.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

const sql = Prisma.sql;

function num(value: unknown): number {
  return typeof value === "bigint" ? Number(value) : Number(value);
}

/** A timestamp as each engine stores a Prisma DateTime: ISO text on SQLite, timestamp (UTC) on PostgreSQL. */
function stored(dialect: Dialect, iso: string): Prisma.Sql {
  return dialect.engine === "sqlite" ? sql`${iso}` : sql`CAST(${iso.replace("T", " ").replace("Z", "")} AS timestamp)`;
}

describe("fragments without a database", () => {
  test("dialectFor picks the engine's dialect", () => {
    expect(dialectFor("sqlite")).toBe(sqliteDialect);
    expect(dialectFor("postgres")).toBe(postgresDialect);
  });

  test("identifiers are quoted and checked; lists and conditions bind their values", () => {
    expect(identifier("ProfileLevel").sql).toBe(`"ProfileLevel"`);
    expect(column("f", "deletedAt").sql).toBe(`"f"."deletedAt"`);
    expect(() => identifier(`x"; DROP TABLE "Flight`)).toThrow(/invalid SQL identifier/);
    expect(() => list([])).toThrow(/at least one value/);
    const condition = and([sql`a IN ${list(["x", "y"])}`, sql`b >= ${3}`]);
    expect(condition.sql).toBe(`(a IN (?, ?)) AND (b >= ?)`);
    expect(condition.text).toBe(`(a IN ($1, $2)) AND (b >= $3)`);
    expect(condition.values).toEqual(["x", "y", 3]);
    expect(and([]).sql).toBe("TRUE");
  });

  test("bad days and bin shapes are refused before any SQL is written", () => {
    for (const dialect of [sqliteDialect, postgresDialect]) {
      expect(() => dialect.onOrAfterDay(sql`t`, "2026-3-1")).toThrow(/invalid day/);
      expect(() => dialect.floorDivide(sql`t`, Number.NaN, 48)).toThrow();
    }
    expect(() => sqliteDialect.floorDivide(sql`t`, 5, 48)).toThrow(/multiple of width/);
    expect(() => postgresDialect.resetIdSequence(`bad name`)).toThrow(/invalid SQL identifier/);
  });
});

describe.each(testEngines())("each fragment on %s", (engine) => {
  let database: TestDatabase;
  let dialect: Dialect;
  beforeAll(async () => {
    database = await createTestDatabase(engine);
    dialect = dialectFor(database.engine);
  }, 120_000);
  afterAll(async () => {
    await database?.drop();
  });

  async function one(expression: Prisma.Sql): Promise<unknown> {
    const rows = await database.db.$queryRaw<Array<{ v: unknown }>>(sql`SELECT ${expression} AS v`);
    return rows[0]?.v;
  }

  async function holds(condition: Prisma.Sql): Promise<boolean> {
    const rows = await database.db.$queryRaw<Array<{ v: unknown }>>(sql`SELECT CASE WHEN ${condition} THEN 1 ELSE 0 END AS v`);
    return num(rows[0]?.v) === 1;
  }

  test("isoUtcSeconds: a stored DateTime as ISO 8601 UTC to the second", async () => {
    // [D] the stored instant with its milliseconds dropped and a Z appended
    expect(await one(dialect.isoUtcSeconds(stored(dialect, "2026-03-01T09:30:05.123Z")))).toBe("2026-03-01T09:30:05Z");
    expect(await one(dialect.isoUtcSeconds(stored(dialect, "2025-12-31T23:59:59.999Z")))).toBe("2025-12-31T23:59:59Z");
  });

  test("onOrAfterDay / onOrBeforeDay: whole UTC days at both ends", async () => {
    const t = (iso: string) => stored(dialect, iso);
    expect(await holds(dialect.onOrAfterDay(t("2026-03-01T00:00:00.000Z"), "2026-03-01"))).toBe(true);
    expect(await holds(dialect.onOrAfterDay(t("2026-02-28T23:59:59.999Z"), "2026-03-01"))).toBe(false);
    expect(await holds(dialect.onOrBeforeDay(t("2026-03-01T23:59:59.999Z"), "2026-03-01"))).toBe(true);
    expect(await holds(dialect.onOrBeforeDay(t("2026-03-02T00:00:00.000Z"), "2026-03-01"))).toBe(false);
  });

  test("floorDivide agrees with Math.floor down to the lowest value", async () => {
    for (const width of [1, 2, 3, 4, 6]) {
      for (const value of [-48, -7.5, -6, -0.5, 0, 0.25, 2.9, 3, 23.99, 47.5]) {
        // [D] floor(value / width), the bin index of the hour bins
        expect(num(await one(dialect.floorDivide(sql`${dialect.real(value)}`, width, 48))), `${value} / ${width}`).toBe(Math.floor(value / width));
      }
    }
  });

  test("real: a bound number typed as floating point, usable in arithmetic", async () => {
    expect(num(await one(dialect.real(1500.25)))).toBe(1500.25);
    expect(num(await one(sql`${dialect.real(3)} / 2`))).toBe(1.5); // [D] not integer division
  });

  test("unindexed keeps the value and the result", async () => {
    expect(await holds(sql`${dialect.unindexed(sql`${dialect.real(2)}`)} = 2`)).toBe(true);
  });

  test("stringAgg joins in the asked order, whatever the row order", async () => {
    const rows = await database.db.$queryRaw<Array<{ v: unknown }>>(
      sql`WITH t(k, o) AS (VALUES ('b', 2), ('c', 3), ('a', 1)) SELECT ${dialect.stringAgg(sql`t.k`, "\n", sql`t.o`)} AS v FROM t`,
    );
    expect(rows[0]?.v).toBe("a\nb\nc");
  });

  test("inTextList: one bound parameter however many values", async () => {
    const ids = Array.from({ length: 700 }, (_, i) => `id-${i}`);
    const fragment = dialect.inTextList(sql`t.k`, ids);
    expect(fragment.values).toHaveLength(1);
    const rows = await database.db.$queryRaw<Array<{ k: string }>>(
      sql`WITH t(k) AS (VALUES ('id-0'), ('id-699'), ('id-700'), ('other')) SELECT t.k AS k FROM t WHERE ${fragment} ORDER BY t.k`,
    );
    expect(rows.map((r) => r.k)).toEqual(["id-0", "id-699"]);
    const none = await database.db.$queryRaw<unknown[]>(sql`WITH t(k) AS (VALUES ('a')) SELECT t.k FROM t WHERE ${dialect.inTextList(sql`t.k`, [])}`);
    expect(none).toHaveLength(0);
  });

  test("resetIdSequence: the next generated id follows the largest inserted one", async () => {
    const ddl =
      engine === "postgres"
        ? `CREATE TABLE "DialectProbe" ("id" SERIAL PRIMARY KEY, "note" TEXT)`
        : `CREATE TABLE "DialectProbe" ("id" INTEGER PRIMARY KEY AUTOINCREMENT, "note" TEXT)`;
    await database.db.$executeRawUnsafe(ddl);
    await database.db.$executeRaw(sql`INSERT INTO "DialectProbe" ("id", "note") VALUES (41, ${"restored"})`);
    for (const statement of dialect.resetIdSequence("DialectProbe")) await database.db.$executeRaw(statement);
    await database.db.$executeRaw(sql`INSERT INTO "DialectProbe" ("note") VALUES (${"new"})`);
    const rows = await database.db.$queryRaw<Array<{ id: unknown }>>(sql`SELECT "id" AS id FROM "DialectProbe" WHERE "note" = ${"new"}`);
    expect(num(rows[0]?.id)).toBe(42); // [D] 41 + 1
  });
});
