import { spawn } from "node:child_process";
import fs from "node:fs";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { createSite, flightsAnalysedWithOtherSite, ingestFlightFile, reprocessFlights, selectFlights } from "../../lib/ingest/index.ts";
import { updateSite } from "../../lib/ingest/setup-more.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { lapsebankNodeArgs } from "../support/lapsebank-command.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

function runCommand(args: string[], databaseUrl: string): Promise<{ code: number | null; stdout: string; stderr: string }> {
  const child = spawn(process.execPath, [...lapsebankNodeArgs(), ...args], { env: { ...process.env, DATABASE_URL: databaseUrl }, stdio: ["ignore", "pipe", "pipe"] });
  let stdout = "";
  let stderr = "";
  child.stdout.on("data", (chunk) => (stdout += chunk));
  child.stderr.on("data", (chunk) => (stderr += chunk));
  return new Promise((resolve) => child.on("exit", (code) => resolve({ code, stdout, stderr })));
}

/** The statements of a hand-written migration file, comments dropped (none of ours contains a ";" inside a statement). */
function migrationStatements(file: string): string[] {
  const text = fs.readFileSync(file, "utf8").split("\n").filter((line) => !line.trimStart().startsWith("--")).join("\n");
  return text.split(";").map((s) => s.trim()).filter(Boolean);
}

const SNAPSHOT_COLUMNS = ["siteLatitudeDeg", "siteLongitudeDeg", "siteElevationM", "siteTimeZone"] as const;

describe.each(testEngines())("site corrections on %s", (engine) => {
  let database: TestDatabase;
  let ids: Awaited<ReturnType<typeof setUpSchool>>;
  let otherSiteId: string;
  const fieldFlights: string[] = [];
  let otherFlightId: string;

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    ids = await setUpSchool(database.db);
    otherSiteId = (await createSite(database.db, { schoolId: ids.school.id, name: "Other Field", latitudeDeg: 47.9, longitudeDeg: 9.5, elevationM: 450, timeZone: "Europe/Berlin" })).id;
    for (const seed of [61, 62]) {
      const f = makeFlightFile({ seed });
      const result = await ingestFlightFile(database.db, {
        file: { name: `field-${seed}.csv`, bytes: f.bytes },
        metadata: { schoolId: ids.school.id, siteId: ids.site.id, layoutId: ids.layout.id, sensorId: ids.sensor.id, launchAtUtc: new Date(f.launchAtUtc.getTime() + (seed - 61) * 86_400_000).toISOString() },
      });
      fieldFlights.push(result.flightId);
    }
    const f = makeFlightFile({ seed: 63 });
    otherFlightId = (await ingestFlightFile(database.db, {
      file: { name: "other-63.csv", bytes: f.bytes },
      metadata: { schoolId: ids.school.id, siteId: otherSiteId, layoutId: ids.layout.id, sensorId: ids.sensor.id, launchAtUtc: f.launchAtUtc.toISOString() },
    })).flightId;
  });
  afterAll(async () => database?.drop());

  test("an upload records the site it was analysed with", async () => {
    const run = await database.db.analysisRun.findFirstOrThrow({ where: { flightId: fieldFlights[0], isCurrent: true } });
    // setUpSchool's invented site: 48.1° N, 9.2° E, 200 m, Europe/Berlin
    expect(run).toMatchObject({ siteLatitudeDeg: 48.1, siteLongitudeDeg: 9.2, siteElevationM: 200, siteTimeZone: "Europe/Berlin" });
  });

  test("selection by site covers exactly that site's flights that are not deleted", async () => {
    expect(await selectFlights(database.db, { siteId: ids.site.id })).toEqual(fieldFlights);
    expect(await selectFlights(database.db, { siteId: otherSiteId })).toEqual([otherFlightId]);
    expect(await selectFlights(database.db, { siteId: "no-such-site" })).toEqual([]);
  });

  test("a correction that changes no analysis input (the name) lists no flights", async () => {
    const site = await database.db.site.findUniqueOrThrow({ where: { id: ids.site.id } });
    await updateSite(database.db, site.id, { name: "Test Field (renamed)", latitudeDeg: site.latitudeDeg, longitudeDeg: site.longitudeDeg, elevationM: site.elevationM, timeZone: site.timeZone });
    expect(await flightsAnalysedWithOtherSite(database.db, site.id)).toEqual([]);
    const result = await reprocessFlights(database.db, { siteId: site.id }, { reason: "test" });
    expect(result.outcomes.map((o) => o.status)).toEqual(["up-to-date", "up-to-date"]);
  });

  test("moving a site to the other hemisphere lists its flights; re-analysis changes season name and snapshot, other sites stay", async () => {
    const db = database.db;
    const before = await db.flightSummary.findFirstOrThrow({ where: { flightId: fieldFlights[0], isCurrent: true } });
    // July launch: meteorological JJA, summer north of the equator, winter south of it [P]
    expect(before).toMatchObject({ season: "JJA", seasonName: "summer", latitudeDeg: 48.1 });

    await updateSite(db, ids.site.id, { name: "Test Field", latitudeDeg: -48.1, longitudeDeg: 9.2, elevationM: 200, timeZone: "Europe/Berlin" });
    expect(await flightsAnalysedWithOtherSite(db, ids.site.id)).toEqual(fieldFlights);
    expect(await flightsAnalysedWithOtherSite(db, otherSiteId)).toEqual([]);

    const result = await reprocessFlights(db, { siteId: ids.site.id }, { reason: "site corrected" });
    expect(result.outcomes.map((o) => o.status)).toEqual(["reprocessed", "reprocessed"]);
    expect(result.outcomes[0]?.change?.siteChanged).toBe(true);
    expect(result.outcomes[0]?.change?.calibrationChanged).toBe(false);

    const after = await db.flightSummary.findFirstOrThrow({ where: { flightId: fieldFlights[0], isCurrent: true } });
    expect(after).toMatchObject({ season: "JJA", seasonName: "winter", latitudeDeg: -48.1 });
    const run = await db.analysisRun.findFirstOrThrow({ where: { flightId: fieldFlights[0], isCurrent: true } });
    expect(run).toMatchObject({ siteLatitudeDeg: -48.1, siteLongitudeDeg: 9.2, siteElevationM: 200, siteTimeZone: "Europe/Berlin", reason: "site corrected" });
    // The earlier run keeps the site it was analysed with.
    const old = await db.analysisRun.findUniqueOrThrow({ where: { id: result.outcomes[0]?.previousRunId ?? "" } });
    expect(old).toMatchObject({ isCurrent: false, siteLatitudeDeg: 48.1 });

    expect(await flightsAnalysedWithOtherSite(db, ids.site.id)).toEqual([]);
    const again = await reprocessFlights(db, { all: true }, { reason: "test" });
    expect(again.outcomes.map((o) => o.status)).toEqual(["up-to-date", "up-to-date", "up-to-date"]);
  });

  test.each([
    { what: "time zone", change: { timeZone: "Europe/Lisbon" } },
    { what: "elevation", change: { elevationM: 230 } },
    { what: "longitude", change: { longitudeDeg: 9.3 } },
  ])("a corrected $what makes the site's runs out of date", async ({ change }) => {
    const db = database.db;
    const site = await db.site.findUniqueOrThrow({ where: { id: otherSiteId } });
    const values = { name: site.name, latitudeDeg: site.latitudeDeg, longitudeDeg: site.longitudeDeg, elevationM: site.elevationM, timeZone: site.timeZone };
    await updateSite(db, site.id, { ...values, ...change });
    expect(await flightsAnalysedWithOtherSite(db, site.id)).toEqual([otherFlightId]);
    const result = await reprocessFlights(db, { siteId: site.id }, { reason: "site corrected" });
    expect(result.outcomes.map((o) => o.status)).toEqual(["reprocessed"]);
    const run = await db.analysisRun.findFirstOrThrow({ where: { flightId: otherFlightId, isCurrent: true } });
    expect(run).toMatchObject(Object.fromEntries(Object.entries({ ...values, ...change }).filter(([k]) => k !== "name").map(([k, v]) => [`site${k[0]?.toUpperCase()}${k.slice(1)}`, v])));
  });

  test("reprocess --site ID on the command line re-analyses exactly that site's flights", async () => {
    const db = database.db;
    await updateSite(db, ids.site.id, { name: "Test Field", latitudeDeg: 48.1, longitudeDeg: 9.2, elevationM: 200, timeZone: "Europe/Berlin" });
    const otherRunBefore = await db.analysisRun.findFirstOrThrow({ where: { flightId: otherFlightId, isCurrent: true } });
    const result = await runCommand(["reprocess", "--site", ids.site.id], database.url);
    expect(result.stderr).toBe("");
    expect(result.code).toBe(0);
    expect(result.stdout).toContain("2 selected: 2 reprocessed, 0 already up to date, 0 failed");
    for (const flightId of fieldFlights) expect(result.stdout).toContain(`${flightId}: reprocessed`);
    expect(result.stdout).not.toContain(otherFlightId);
    expect((await db.analysisRun.findFirstOrThrow({ where: { flightId: otherFlightId, isCurrent: true } })).id).toBe(otherRunBefore.id);
    const summary = await db.flightSummary.findFirstOrThrow({ where: { flightId: fieldFlights[1], isCurrent: true } });
    expect(summary.seasonName).toBe("summer");

    const refused = await runCommand(["reprocess", "--site", ids.site.id, "--all"], database.url);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toContain("--site ID");
  });

  test("the migration backfills each existing run's snapshot: latitude from its own summary, the rest from the site", async () => {
    const db = database.db;
    // A run written before the migration, analysed when its site was at another latitude than now.
    const runId = (await db.analysisRun.findFirstOrThrow({ where: { flightId: fieldFlights[0], isCurrent: true } })).id;
    await db.flightSummary.update({ where: { runId }, data: { latitudeDeg: 47.5 } });
    await db.site.update({ where: { id: ids.site.id }, data: { elevationM: 205 } });
    // Back to the table as it was before the migration, then the migration exactly as shipped.
    for (const column of SNAPSHOT_COLUMNS) await db.$executeRawUnsafe(`ALTER TABLE "AnalysisRun" DROP COLUMN "${column}"`);
    const dir = engine === "sqlite" ? "prisma/migrations" : "prisma/postgres/migrations";
    const folder = fs.readdirSync(dir).find((name) => name.endsWith("_run_site_snapshot"));
    expect(folder).toBeDefined();
    for (const statement of migrationStatements(`${dir}/${folder}/migration.sql`)) await db.$executeRawUnsafe(statement);

    const run = await db.analysisRun.findUniqueOrThrow({ where: { id: runId } });
    expect(run).toMatchObject({ siteLatitudeDeg: 47.5, siteLongitudeDeg: 9.2, siteElevationM: 205, siteTimeZone: "Europe/Berlin" });
    const other = await db.analysisRun.findFirstOrThrow({ where: { flightId: otherFlightId, isCurrent: true } });
    const otherSite = await db.site.findUniqueOrThrow({ where: { id: otherSiteId } });
    expect(other).toMatchObject({ siteLatitudeDeg: otherSite.latitudeDeg, siteLongitudeDeg: otherSite.longitudeDeg, siteElevationM: otherSite.elevationM, siteTimeZone: otherSite.timeZone });
    expect(await db.analysisRun.count({ where: { OR: SNAPSHOT_COLUMNS.map((c) => ({ [c]: null })) } })).toBe(0);
    // The latitude it was analysed with is known, so the first flight shows as out of date; an elevation
    // corrected before the migration cannot be told apart (the second flight takes the site's 205 m).
    expect(await flightsAnalysedWithOtherSite(db, ids.site.id)).toEqual([fieldFlights[0]]);
    expect(await flightsAnalysedWithOtherSite(db, otherSiteId)).toEqual([]);
  });
});
