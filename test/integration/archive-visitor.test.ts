/**
 * What a visitor meets in the Archive and Climatology: the invented demo flights are public, a
 * visitor who can see nothing while members-only flights exist is told how many (the number
 * only), and both query APIs refuse an unknown parameter with 422 naming it instead of ignoring it
 * (today `sites=<id>` would be dropped and the answer cover every flight).
 */
import { afterAll, beforeAll, describe, expect, test, vi } from "vitest";
import { ingestFlightFile } from "../../lib/ingest/index.ts";
import { archiveFilterSchema } from "../../lib/query/archive-filter.ts";
import { countHiddenFlights, listFlights } from "../../lib/query/flights.ts";
import { generateDemoProgram, type DemoProgram } from "../../seed/demo-program.ts";
import { loadDemoProgram } from "../../seed/load.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

// The route handlers read the request's headers and cookies through next/headers; outside Next there
// is no request scope, so it is pointed at the request under test (as in api-request-guards.test.ts).
const current = vi.hoisted(() => ({ headers: new Headers() }));
vi.mock("next/headers", () => ({
  headers: async () => current.headers,
  cookies: async () => ({ get: () => undefined }),
}));

type Handler = (request: Request) => Promise<Response>;
const ORIGIN = "http://127.0.0.1:3000";

async function get(handler: Handler, path: string): Promise<Response> {
  const request = new Request(`${ORIGIN}${path}`, { headers: { Host: "127.0.0.1:3000" } });
  current.headers = request.headers;
  return handler(request);
}

/** One demo flight per invented school keeps the test quick. */
function tinyProgram(): DemoProgram {
  const program = generateDemoProgram();
  return { ...program, flights: program.schools.flatMap((school) => program.flights.filter((f) => f.schoolKey === school.key).slice(0, 1)) };
}

describe("query APIs refuse unknown parameters (SQLite, local mode)", () => {
  let database: TestDatabase;
  let demoFlightCount = 0;
  let flightsApi: { GET: Handler };
  let climatologyApi: { GET: Handler };

  beforeAll(async () => {
    database = await createTestDatabase("sqlite");
    process.env.DATABASE_URL = database.url;
    const report = await loadDemoProgram(database.db, { program: tinyProgram() });
    expect(report.failures).toEqual([]);
    demoFlightCount = report.flights;
    flightsApi = (await import("../../app/api/v1/flights/route.ts")) as unknown as { GET: Handler };
    climatologyApi = (await import("../../app/api/v1/climatology/route.ts")) as unknown as { GET: Handler };
  }, 300_000);
  afterAll(async () => {
    const { getDbHandle } = await import("../../lib/db/index.ts");
    await getDbHandle().db.$disconnect();
    await database?.drop();
  });

  test("the demo flights are public: a visitor sees them in the Archive, and nothing is hidden", async () => {
    const visitor = { kind: "anonymous" as const };
    const listed = await listFlights(visitor, archiveFilterSchema.parse({}), database.db);
    expect(listed.total).toBe(demoFlightCount);
    expect(demoFlightCount).toBeGreaterThan(0);
    expect(listed.rows.every((row) => row.synthetic)).toBe(true);
    expect(await countHiddenFlights(visitor, database.db)).toBe(0);
  });

  test("GET /api/v1/flights: a known query answers; sites=<id> is 422 naming the parameter", async () => {
    const ok = await get(flightsApi.GET, "/api/v1/flights?sort=title&pageSize=5");
    expect(ok.status).toBe(200);
    const bad = await get(flightsApi.GET, "/api/v1/flights?sites=abc&sort=title");
    expect(bad.status).toBe(422);
    const body = await bad.json();
    expect(body.error.code).toBe("invalid-query");
    expect(body.error.message).toContain('unknown parameter "sites"');
    expect(body.error.message).toContain("site"); // the list of parameters the query takes
  });

  test("GET /api/v1/climatology: a known query answers; sites=<id> and two unknowns are 422 naming them", async () => {
    const ok = await get(climatologyApi.GET, "/api/v1/climatology?groupBy=none&flights=none");
    expect(ok.status).toBe(200);
    const bad = await get(climatologyApi.GET, "/api/v1/climatology?groupBy=none&sites=abc");
    expect(bad.status).toBe(422);
    expect((await bad.json()).error.message).toContain('unknown parameter "sites"');
    const two = await get(climatologyApi.GET, "/api/v1/climatology?metrc=max-altitude&grupBy=none");
    expect(two.status).toBe(422);
    expect((await two.json()).error.message).toContain('unknown parameters "metrc", "grupBy"');
  });
});

describe.each(testEngines())("flights hidden from a viewer on %s", (engine) => {
  let database: TestDatabase;
  let schoolId = "";

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    const ids = await setUpSchool(database.db);
    schoolId = ids.school.id;
    const visibilities = ["program", "school", "school", "public"];
    for (const [i, visibility] of visibilities.entries()) {
      await ingestFlightFile(database.db, {
        file: { name: `h${i}.csv`, bytes: makeFlightFile({ seed: 900 + i }).bytes },
        metadata: { schoolId, siteId: ids.site.id, layoutId: ids.layout.id, sensorId: ids.sensor.id, launchAtUtc: `2024-0${i + 1}-10T06:00:00Z`, title: `Hidden ${i}`, visibility },
      });
    }
    // A deleted members-only flight is no longer there to be hidden.
    const deleted = await database.db.flight.findFirstOrThrow({ where: { title: "Hidden 2" } });
    await database.db.flight.update({ where: { id: deleted.id }, data: { deletedAt: new Date("2024-06-01T00:00:00Z") } });
  });
  afterAll(async () => database?.drop());

  test("counts what each viewer cannot see, deleted flights left out", async () => {
    const db = database.db;
    // Four flights, one deleted: program (1) and school (1) are hidden from a visitor, the public one is not.
    expect(await countHiddenFlights({ kind: "anonymous" }, db)).toBe(2);
    const outsider = { kind: "member" as const, userId: "u", isProgramAdmin: false, schoolIds: ["other"], memberships: [{ schoolId: "other", role: "reader" as const }] };
    expect(await countHiddenFlights(outsider, db)).toBe(1);
    const member = { kind: "member" as const, userId: "m", isProgramAdmin: false, schoolIds: [schoolId], memberships: [{ schoolId, role: "reader" as const }] };
    expect(await countHiddenFlights(member, db)).toBe(0);
    expect(await countHiddenFlights({ kind: "local" }, db)).toBe(0);
    // Visible plus hidden is every flight that is not deleted.
    const visible = await listFlights({ kind: "anonymous" }, archiveFilterSchema.parse({}), db);
    expect(visible.total + 2).toBe(3);
  });
});
