/**
 * The climatology cache reuses a result only while the archive is unchanged: the ArchiveRevision
 * triggers must fire for every kind of change climatology reads, in any app process.
 */
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { ingestFlightFile } from "../../lib/ingest/index.ts";
import { deleteFlight, editFlight, restoreFlight } from "../../lib/ingest/flight-admin.ts";
import { archiveRevision, getClimatologyCached } from "../../lib/query/climatology-cache.ts";
import { parseClimatologyQuery, type ClimatologyQuery } from "../../lib/query/climatology-params.ts";
import { LOCAL_VIEWER, type Viewer } from "../../lib/auth/visibility.ts";
import { createDb } from "../../lib/db/index.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

function queryOf(record: Record<string, string>): ClimatologyQuery {
  const parsed = parseClimatologyQuery(record);
  if (!parsed.ok) throw new Error(parsed.message);
  return parsed.query;
}

describe.each(testEngines())("climatology cache on %s", (engine) => {
  let database: TestDatabase;
  let ids: Awaited<ReturnType<typeof setUpSchool>>;
  const flights: string[] = [];
  const query = queryOf({ metric: "tropospheric-lapse-rate", groupBy: "season" });

  const add = async (seed: number, visibility: string) => {
    const f = makeFlightFile({ seed });
    const result = await ingestFlightFile(database.db, {
      file: { name: `flight-${seed}.csv`, bytes: f.bytes },
      metadata: { schoolId: ids.school.id, siteId: ids.site.id, layoutId: ids.layout.id, sensorId: ids.sensor.id, launchAtUtc: f.launchAtUtc.toISOString(), visibility },
    });
    flights.push(result.flightId);
    return result.flightId;
  };

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    ids = await setUpSchool(database.db, "Cache School");
    await add(41, "public");
    await add(42, "program");
  }, 120_000);

  afterAll(async () => {
    await database?.drop();
  });

  test("an unchanged archive answers from the cache; the same query by a viewer who sees other flights does not", async () => {
    const first = await getClimatologyCached(LOCAL_VIEWER, query, database);
    const again = await getClimatologyCached(LOCAL_VIEWER, query, database);
    expect(again).toBe(first);
    expect(first.overall.n).toBe(2);
    const visitor: Viewer = { kind: "anonymous" };
    const forVisitor = await getClimatologyCached(visitor, query, database);
    expect(forVisitor).not.toBe(first);
    expect(forVisitor.overall.n).toBe(1); // the public flight only
  });

  test("an upload, an edit, a deletion and a restore each make the next answer fresh", async () => {
    const before = await getClimatologyCached(LOCAL_VIEWER, query, database);
    const id = await add(43, "school");
    const afterUpload = await getClimatologyCached(LOCAL_VIEWER, query, database);
    expect(afterUpload.overall.n).toBe(before.overall.n + 1);

    const visitor: Viewer = { kind: "anonymous" };
    const visitorBefore = await getClimatologyCached(visitor, query, database);
    await editFlight(database.db, LOCAL_VIEWER, id, { visibility: "public" });
    expect((await getClimatologyCached(visitor, query, database)).overall.n).toBe(visitorBefore.overall.n + 1);

    await deleteFlight(database.db, LOCAL_VIEWER, id);
    expect((await getClimatologyCached(LOCAL_VIEWER, query, database)).overall.n).toBe(before.overall.n);
    await restoreFlight(database.db, LOCAL_VIEWER, id);
    expect((await getClimatologyCached(LOCAL_VIEWER, query, database)).overall.n).toBe(before.overall.n + 1);
  });

  test("a site renamed by another process (another client) shows in the next answer", async () => {
    const bySite = queryOf({ metric: "tropospheric-lapse-rate", groupBy: "site" });
    const before = await getClimatologyCached(LOCAL_VIEWER, bySite, database);
    expect(before.groups.map((g) => g.label)).toContain("Test Field");
    const revision = await archiveRevision(database.db);
    const other = createDb(database.url);
    try {
      await other.db.site.update({ where: { id: ids.site.id }, data: { name: "Renamed Field" } });
    } finally {
      await other.db.$disconnect();
    }
    expect(await archiveRevision(database.db)).toBeGreaterThan(revision);
    const after = await getClimatologyCached(LOCAL_VIEWER, bySite, database);
    expect(after.groups.map((g) => g.label)).toContain("Renamed Field");
  });

  test("a write that rolls back leaves the revision as it was", async () => {
    const revision = await archiveRevision(database.db);
    await expect(
      database.db.$transaction(async (tx) => {
        await tx.flight.update({ where: { id: flights[0] as string }, data: { title: "Rolled back" } });
        throw new Error("undo");
      }),
    ).rejects.toThrow("undo");
    expect(await archiveRevision(database.db)).toBe(revision);
  });
});
