import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { ingestFlightFile } from "../../lib/ingest/index.ts";
import { archiveFilterSchema } from "../../lib/query/archive-filter.ts";
import { listFlights } from "../../lib/query/flights.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

describe.each(testEngines())("archive list on %s", (engine) => {
  let database: TestDatabase;
  let schoolId = "";
  const tropopausesM = [9_500, 12_500, 11_000];

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    const ids = await setUpSchool(database.db);
    schoolId = ids.school.id;
    for (const [i, tropopauseAltitudeM] of tropopausesM.entries()) {
      const file = makeFlightFile({ seed: 700 + i, tropopauseAltitudeM, burstAltitudeM: 18_000 });
      await ingestFlightFile(database.db, {
        file: { name: `a${i}.csv`, bytes: file.bytes },
        metadata: { schoolId, siteId: ids.site.id, layoutId: ids.layout.id, sensorId: ids.sensor.id, launchAtUtc: `2024-0${i + 1}-15T06:00:00Z`, title: `Flight ${i}`, visibility: i === 2 ? "school" : "program" },
      });
    }
  });
  afterAll(async () => database?.drop());

  const list = (params: Record<string, string>, viewer: Parameters<typeof listFlights>[0] = { kind: "local" }) => listFlights(viewer, archiveFilterSchema.parse(params), database.db);

  test("sorts by tropopause in the database, both directions, with paging", async () => {
    const descending = await list({ sort: "tropopause-desc" });
    expect(descending.rows.map((r) => r.title)).toEqual(["Flight 1", "Flight 2", "Flight 0"]);
    const ascending = await list({ sort: "tropopause-asc", pageSize: "2", page: "2" });
    expect(ascending.total).toBe(3);
    expect(ascending.rows.map((r) => r.title)).toEqual(["Flight 1"]);
  });

  test("filters by date and season; newest first by default", async () => {
    expect((await list({})).rows.map((r) => r.title)).toEqual(["Flight 2", "Flight 1", "Flight 0"]);
    expect((await list({ from: "2024-02-01" })).total).toBe(2);
    expect((await list({ season: "DJF" })).rows.map((r) => r.title).sort()).toEqual(["Flight 0", "Flight 1"]);
    expect((await list({ season: "spring" })).rows.map((r) => r.title)).toEqual(["Flight 2"]);
  });

  test("visibility: a member of another school does not see a school-only flight", async () => {
    const outsider = { kind: "member" as const, userId: "u", isProgramAdmin: false, schoolIds: ["other"], memberships: [{ schoolId: "other", role: "reader" as const }] };
    expect((await list({}, outsider)).rows.map((r) => r.title)).toEqual(["Flight 1", "Flight 0"]);
    expect((await list({}, { kind: "anonymous" })).total).toBe(0);
  });
});
