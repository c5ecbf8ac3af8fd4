/**
 * The levels table's fast path (lib/export/level-csv.ts: SQLite worker threads, PostgreSQL
 * server-side formatting) must write byte for byte what csv.ts writes for the same rows, including
 * for numbers each database prints differently from ECMAScript (17 digits, exponents, integral
 * reals, negative zero, missing values).
 */
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { ingestFlightFile } from "../../lib/ingest/index.ts";
import { csvLine } from "../../lib/export/csv.ts";
import { levelCsvPages, type RunOfFlight } from "../../lib/export/level-csv.ts";
import { openLevelReader } from "../../lib/export/level-reader.ts";
import { LEVELS_TABLE } from "../../lib/export/tables.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

/** Doubles whose shortest round-trip text is awkward for one engine or another. */
const AWKWARD = [
  1 / 3, 0.1 + 0.2, -1 / 3, 1e-7, 0.00001234, 1e15, 1.5e20, 1e21, 123456789012345.6, 1234.567890123456, 9007199254740994,
  5e-324, 1e300, 288.15, 10000, -5.5, -0, 0, 2.5e-5, 0.0003580679437258616,
];

async function* pagesOf(runs: RunOfFlight[], size: number): AsyncGenerator<RunOfFlight[]> {
  for (let i = 0; i < runs.length; i += size) yield runs.slice(i, i + size);
}

describe.each(testEngines())("levels CSV fast path on %s", (engine) => {
  let database: TestDatabase;
  const runs: RunOfFlight[] = [];

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    const ids = await setUpSchool(database.db, "Fast Path School");
    for (const seed of [31, 32, 33]) {
      const f = makeFlightFile({ seed });
      // One flight of the three is stored as invented: its rows carry synthetic = true.
      const synthetic = seed === 32;
      const result = await ingestFlightFile(database.db, {
        file: { name: `flight-${seed}.csv`, bytes: f.bytes },
        metadata: { schoolId: ids.school.id, siteId: ids.site.id, layoutId: ids.layout.id, sensorId: ids.sensor.id, launchAtUtc: f.launchAtUtc.toISOString() },
        synthetic,
      });
      const run = await database.db.analysisRun.findFirstOrThrow({ where: { flightId: result.flightId, isCurrent: true }, select: { id: true } });
      runs.push({ flightId: result.flightId, runId: run.id, synthetic });
    }
    // Put the awkward numbers into the first run's level cells (not the altitude, which orders the rows).
    const levels = await database.db.profileLevel.findMany({ where: { runId: runs[0]?.runId }, orderBy: { id: "asc" }, take: AWKWARD.length });
    for (const [i, level] of levels.entries()) {
      const value = AWKWARD[i] as number;
      const other = AWKWARD[(i + 7) % AWKWARD.length] as number;
      await database.db.profileLevel.update({
        where: { id: level.id },
        data: { temperatureK: value, baseM: other, topM: -other, temperatureSdK: i % 3 === 0 ? null : other, pressureHpa: i % 2 ? value : null, relativeHumidityPct: i % 4 ? null : value },
      });
    }
  }, 120_000);

  afterAll(async () => {
    await database?.drop();
  });

  test("writes the same bytes as csv.ts, in the runs' order, each by phase then altitude", async () => {
    // Expected: rows read through the driver, cells written by csv.ts.
    const reader = openLevelReader(database);
    let expected = "";
    try {
      for (const run of [...runs].reverse()) {
        const tuples = await reader.read([run.runId]);
        expect(tuples.length).toBeGreaterThan(100);
        for (const t of tuples) {
          const row = { flightId: run.flightId, synthetic: run.synthetic, runId: t[0], phase: t[1], altitudeM: t[2], baseM: t[3], topM: t[4], sampleCount: t[5], temperatureK: t[6], temperatureSdK: t[7], pressureHpa: t[8], relativeHumidityPct: t[9] };
          expected += csvLine(LEVELS_TABLE.fields.map((f) => f.get(row) as number | string | null));
        }
      }
    } finally {
      await reader.close();
    }
    // Reversed order and pages of two runs: the fast path must keep the order it is given.
    let actual = "";
    let rows = 0;
    for await (const page of levelCsvPages(database, pagesOf([...runs].reverse(), 2))) {
      actual += new TextDecoder().decode(page.bytes);
      rows += page.rows;
    }
    expect(actual).toBe(expected);
    expect(rows).toBe(expected.split("\r\n").length - 1);
    // The awkward values really are there (the comparison above is not between two empty texts).
    expect(actual).toContain(",0.30000000000000004,");
    expect(actual).toContain("1e-7");
  });

  test("an empty page list gives no bytes", async () => {
    const pages = [];
    for await (const page of levelCsvPages(database, pagesOf([], 2))) pages.push(page);
    expect(pages).toEqual([]);
  });
});
