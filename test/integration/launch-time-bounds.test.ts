import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { IngestFailure, ingestFlightFile } from "../../lib/ingest/index.ts";
import { archiveFilterSchema } from "../../lib/query/archive-filter.ts";
import { listFlights } from "../../lib/query/flights.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

// Launch times are checked at the one upload path that web form, API and CLI share, and again just before
// storing: year 10000 used to be written on PostgreSQL and then broke every page that read it back.
describe.each(testEngines())("launch-time bounds on %s", (engine) => {
  let database: TestDatabase;
  let ids: Awaited<ReturnType<typeof setUpSchool>>;
  const file = makeFlightFile({ seed: 31 });

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    ids = await setUpSchool(database.db);
  });
  afterAll(async () => {
    await database?.drop();
  });

  const upload = (launchAtUtc: unknown) =>
    ingestFlightFile(database.db, {
      file: { name: "dawn.csv", bytes: file.bytes },
      metadata: { schoolId: ids.school.id, siteId: ids.site.id, layoutId: ids.layout.id, sensorId: ids.sensor.id, launchAtUtc },
    });

  async function refusal(launchAtUtc: unknown): Promise<IngestFailure> {
    const error = await upload(launchAtUtc).then(() => null, (e: unknown) => e);
    expect(error).toBeInstanceOf(IngestFailure);
    expect(await database.db.flight.count()).toBe(0);
    expect(await database.db.rawFile.count()).toBe(0);
    return error as IngestFailure;
  }

  test.each([
    ["+010000-01-01T00:00:00Z", /after|future/],
    ["1899-12-31T23:59:59Z", /before 1900/],
    [new Date(Date.now() + 3 * 24 * 3600 * 1000).toISOString(), /future/],
  ])("refuses %s, names the field, writes nothing", async (value, words) => {
    const failure = await refusal(value);
    expect(failure.code).toBe("invalid-metadata");
    expect(failure.issues[0]?.columnName).toBe("launchAtUtc");
    expect(failure.issues[0]?.file).toBe("dawn.csv");
    expect(failure.message).toMatch(words);
  });

  test.each(["2025-07-14T06:30:00", "2025-07-14 06:30", "2025-07-14"])("refuses %s: no offset, so no zone", async (value) => {
    const failure = await refusal(value);
    expect(failure.message).toMatch(/with an offset/);
  });

  test("an offset other than Z is honoured, and the archive still reads", async () => {
    const result = await upload("2024-07-10T01:01:00-05:00");
    expect(result.launchAtUtc.toISOString()).toBe("2024-07-10T06:01:00.000Z");
    const listed = await listFlights({ kind: "local" }, archiveFilterSchema.parse({}), database.db);
    expect(listed.rows.map((row) => row.id)).toContain(result.flightId);
  });
});
