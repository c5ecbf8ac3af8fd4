/**
 * The invented demo program never passes for real data: every demo flight is stored as invented
 * (synthetic), the archive, flight page, climatology and every export format say so, `npm start`
 * loads it only into an empty embedded SQLite database, already stored demo flights are marked by
 * a migration, and removing the demo deletes exactly the demo (keeping what real flights use).
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { parse } from "csv-parse/sync";
import { unzipSync } from "fflate";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { LOCAL_VIEWER, type Viewer } from "../../lib/auth/visibility.ts";
import { PermissionError } from "../../lib/auth/permissions.ts";
import { createExport } from "../../lib/export/export.ts";
import { backupArchive } from "../../lib/export/backup.ts";
import { countDemoFlights, findDemoSchools, removeDemoProgram } from "../../lib/ingest/demo-data.ts";
import { createCalibration, createLayout, createSensor, ingestFlightFile } from "../../lib/ingest/index.ts";
import { archiveFilterSchema } from "../../lib/query/archive-filter.ts";
import { getClimatology } from "../../lib/query/climatology-core.ts";
import { parseClimatologyQuery } from "../../lib/query/climatology-params.ts";
import { getFlight, listFlights } from "../../lib/query/flights.ts";
import { COMMA_COUNTS_LAYOUT, LINEAR_10BIT_CALIBRATION } from "../../seed/demo-files.ts";
import { generateDemoProgram, type DemoProgram } from "../../seed/demo-program.ts";
import { autoloadDemo, loadDemoProgram } from "../../seed/load.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

const program = generateDemoProgram();
/** Two flights of each demo school keep the test quick; the setup is the whole demo setup. */
function smallProgram(perSchool = 2): DemoProgram {
  const flights = program.schools.flatMap((school) => program.flights.filter((f) => f.schoolKey === school.key).slice(0, perSchool));
  return { ...program, flights };
}

async function bytesOf(body: AsyncIterable<Uint8Array>): Promise<Uint8Array> {
  const parts: Uint8Array[] = [];
  for await (const chunk of body) parts.push(chunk);
  return Buffer.concat(parts);
}
const text = (bytes: Uint8Array | undefined) => new TextDecoder().decode(bytes);

function climatology(database: TestDatabase, record: Record<string, string> = {}) {
  const parsed = parseClimatologyQuery(record);
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.fieldErrors));
  return getClimatology(LOCAL_VIEWER, parsed.query, database, { profiles: false });
}

describe.each(testEngines())("demo data on %s", (engine) => {
  let database: TestDatabase;
  let demoFlightCount = 0;
  let real: Awaited<ReturnType<typeof setUpSchool>>;
  let realFlightId = "";
  let realAtDemoSiteId = "";
  let demoSiteUsedByReal = { id: "", name: "", schoolId: "" };

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    const report = await loadDemoProgram(database.db, { program: smallProgram() });
    expect(report.failures).toEqual([]);
    demoFlightCount = report.flights;
  }, 300_000);

  afterAll(async () => {
    await database?.drop();
  });

  test("the demo loader stores every demo flight as invented, and audits the setup it creates", async () => {
    const db = database.db;
    expect(demoFlightCount).toBe(6);
    expect(await db.flight.count({ where: { synthetic: true } })).toBe(demoFlightCount);
    expect(await db.flight.count({ where: { synthetic: false } })).toBe(0);
    expect(await countDemoFlights(db)).toBe(demoFlightCount);
    expect(await db.auditEvent.count({ where: { action: "site.create", actorLabel: "demo loader" } })).toBe(program.sites.length);
    expect(await db.auditEvent.count({ where: { action: "calibration.create", actorLabel: "demo loader" } })).toBe(program.sensors.reduce((n, s) => n + s.calibrations.length, 0));
  });

  test("archive rows and the flight page carry the invented label", async () => {
    const listed = await listFlights(LOCAL_VIEWER, archiveFilterSchema.parse({ pageSize: "200" }), database.db);
    expect(listed.rows).toHaveLength(demoFlightCount);
    expect(listed.rows.every((r) => r.synthetic)).toBe(true);
    const flight = await getFlight(LOCAL_VIEWER, listed.rows[0]?.id ?? "", database.db);
    expect(flight?.synthetic).toBe(true);
  });

  test("climatology over an archive of invented flights only takes them and counts them as invented", async () => {
    const result = await climatology(database);
    expect(result.invented).toEqual({ rule: "auto", included: true, contributingCount: result.overall.n, leftOutCount: 0 });
    expect(result.overall.n).toBeGreaterThan(0);
    expect(result.warnings.join(" ")).toMatch(new RegExp(`${result.overall.n} of the ${result.overall.n} contributing flights are invented`));
    expect(result.groups.flatMap((g) => g.flights).every((f) => f.synthetic)).toBe(true);
  });

  test("every export format says the flights are invented", async () => {
    const handle = database;
    const csv = await createExport(handle, LOCAL_VIEWER, { source: "archive", format: "csv", table: "flights" });
    const records = parse(text(await bytesOf(csv.body)), { columns: true }) as Array<Record<string, string>>;
    expect(records).toHaveLength(demoFlightCount);
    expect(records.map((r) => r.synthetic)).toEqual(records.map(() => "true"));

    const json = JSON.parse(text(await bytesOf((await createExport(handle, LOCAL_VIEWER, { source: "archive", format: "json" })).body))) as {
      lapsebank: { inventedFlightCount: number; inventedData?: string; dataDictionary: { flights: { fields: Array<{ name: string; description: string }> } } };
      tables: { flights: Array<{ synthetic: boolean }> };
      provenance: { inventedFlightCount: number };
    };
    expect(json.lapsebank.inventedFlightCount).toBe(demoFlightCount);
    expect(json.lapsebank.inventedData).toContain(`All ${demoFlightCount} flights in this export are INVENTED`);
    expect(json.provenance.inventedFlightCount).toBe(demoFlightCount);
    expect(json.tables.flights.every((f) => f.synthetic === true)).toBe(true);
    expect(json.lapsebank.dataDictionary.flights.fields.find((f) => f.name === "synthetic")?.description).toMatch(/invented/);

    const zip = unzipSync(await bytesOf((await createExport(handle, LOCAL_VIEWER, { source: "climatology", format: "package", metric: "tropospheric-lapse-rate" })).body));
    const descriptor = JSON.parse(text(zip["datapackage.json"])) as { description: string; lapsebank: { inventedFlightCount: number } };
    expect(descriptor.lapsebank.inventedFlightCount).toBeGreaterThan(0);
    expect(descriptor.description).toContain("INVENTED");
    expect(text(zip["CITATION.cff"])).toMatch(/^abstract: ".*INVENTED.*"$/m);
    expect(text(zip["README.md"])).toContain("**Invented data.**");
    const packaged = parse(text(zip["data/flights.csv"]), { columns: true }) as Array<Record<string, string>>;
    expect(packaged.length).toBe(descriptor.lapsebank.inventedFlightCount);
    expect(packaged.every((r) => r.synthetic === "true")).toBe(true);
    // Every per-flight table says it too, so a table read on its own still tells.
    for (const table of ["runs", "layers", "levels", "query-values"]) {
      const rows = parse(text(zip[`data/${table}.csv`]), { columns: true }) as Array<Record<string, string>>;
      expect(rows.length, table).toBeGreaterThan(0);
      expect(rows.every((r) => r.synthetic === "true"), table).toBe(true);
    }
    const levelsCsv = parse(text(await bytesOf((await createExport(handle, LOCAL_VIEWER, { source: "archive", format: "csv", table: "levels" })).body)), { columns: true }) as Array<Record<string, string>>;
    expect(levelsCsv.length).toBeGreaterThan(100);
    expect(levelsCsv.every((r) => r.synthetic === "true")).toBe(true);

    const values = parse(text(await bytesOf((await createExport(handle, LOCAL_VIEWER, { source: "climatology", format: "csv", table: "query-values", metric: "tropospheric-lapse-rate" })).body)), { columns: true }) as Array<Record<string, string>>;
    expect(values.length).toBeGreaterThan(0);
    expect(values.every((r) => r.synthetic === "true")).toBe(true);

    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "lapsebank-demo-backup-"));
    try {
      const file = path.join(dir, "backup.zip");
      await backupArchive(database.db, file);
      const manifest = JSON.parse(text(unzipSync(fs.readFileSync(file))["manifest.json"])) as { inventedFlights: number; inventedData: string };
      expect(manifest.inventedFlights).toBe(demoFlightCount);
      expect(manifest.inventedData).toContain("INVENTED");
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  }, 120_000);

  test("with a real flight present, climatology leaves invented flights out by default and says how many", async () => {
    real = await setUpSchool(database.db, "Real School East");
    const file = makeFlightFile({ seed: 71 });
    realFlightId = (await ingestFlightFile(database.db, {
      file: { name: "real-71.csv", bytes: file.bytes },
      metadata: { schoolId: real.school.id, siteId: real.site.id, layoutId: real.layout.id, sensorId: real.sensor.id, payloadId: real.payload.id, launchAtUtc: file.launchAtUtc.toISOString() },
      actor: { userId: null, label: "web upload" },
    })).flightId;
    const auto = await climatology(database, { groupBy: "none" });
    expect(auto.overall.n).toBe(1);
    expect(auto.invented).toEqual({ rule: "auto", included: false, contributingCount: 0, leftOutCount: demoFlightCount });
    const included = await climatology(database, { groupBy: "none", invented: "include" });
    expect(included.invented).toMatchObject({ rule: "include", included: true, leftOutCount: 0 });
    expect(included.invented.contributingCount).toBe(included.overall.n - 1);
    expect(included.groups[0]?.flights.filter((f) => !f.synthetic).map((f) => f.flightId)).toEqual([realFlightId]);
    const excluded = await climatology(database, { groupBy: "none", invented: "exclude" });
    expect(excluded.overall.n).toBe(1);
    // Only invented flights at the chosen school: the message says why there is nothing.
    const demoSchool = (await findDemoSchools(database.db))[0];
    await expect(climatology(database, { school: demoSchool?.id ?? "" })).rejects.toThrow(/invented flights? left out because real flights exist; invented=include takes them/);
    // A real flight's export carries no invented label.
    const json = JSON.parse(text(await bytesOf((await createExport(database, LOCAL_VIEWER, { source: "flight", flight: realFlightId, format: "json" })).body))) as { lapsebank: { inventedFlightCount: number; inventedData?: string } };
    expect(json.lapsebank).toMatchObject({ inventedFlightCount: 0 });
    expect(json.lapsebank.inventedData).toBeUndefined();
  }, 120_000);

  test("the migration marks demo flights stored before the loader did, and leaves real flights in a demo school alone", async () => {
    const db = database.db;
    // A real upload into a demo school, at a demo site, with a layout of its own.
    const [demoSchool] = await findDemoSchools(db);
    if (!demoSchool) throw new Error("no demo school");
    const site = await db.site.findFirstOrThrow({ where: { schoolId: demoSchool.id, name: { in: demoSchool.identity.sites } } });
    demoSiteUsedByReal = { id: site.id, name: site.name, schoolId: site.schoolId };
    const layout = await createLayout(db, { schoolId: demoSchool.id, spec: { ...COMMA_COUNTS_LAYOUT, name: "Real team logger" } });
    const sensor = await createSensor(db, { schoolId: demoSchool.id, serial: "REAL-1", kind: "10 mV/K voltage sensor" });
    await createCalibration(db, { sensorId: sensor.id, spec: LINEAR_10BIT_CALIBRATION, validFromUtc: new Date("2020-01-01T00:00:00Z"), method: "datasheet" });
    const file = makeFlightFile({ seed: 72 });
    realAtDemoSiteId = (await ingestFlightFile(db, {
      file: { name: "real-72.csv", bytes: file.bytes },
      metadata: { schoolId: demoSchool.id, siteId: site.id, layoutId: layout.id, sensorId: sensor.id, launchAtUtc: file.launchAtUtc.toISOString() },
      actor: { userId: null, label: "web upload" },
    })).flightId;

    await db.flight.updateMany({ data: { synthetic: false } });
    const folder = engine === "sqlite" ? "prisma/migrations" : "prisma/postgres/migrations";
    const sql = fs.readFileSync(path.join(folder, "20261202160400_mark_demo_flights", "migration.sql"), "utf8");
    await db.$executeRawUnsafe(sql);
    expect(await db.flight.count({ where: { synthetic: true } })).toBe(demoFlightCount);
    const realFlights = await db.flight.findMany({ where: { synthetic: false }, select: { id: true } });
    expect(realFlights.map((f) => f.id).sort()).toEqual([realFlightId, realAtDemoSiteId].sort());
  });

  test("only a program admin may remove the demo; nothing is deleted otherwise", async () => {
    const schoolAdmin: Viewer = { kind: "member", userId: "u-1", email: "a@example.org", isProgramAdmin: false, schoolIds: [real.school.id], memberships: [{ schoolId: real.school.id, role: "school-admin" }] } as Viewer;
    await expect(removeDemoProgram(database.db, schoolAdmin, { userId: "u-1", label: "a@example.org" })).rejects.toBeInstanceOf(PermissionError);
    await expect(removeDemoProgram(database.db, { kind: "anonymous" }, { userId: null, label: "visitor" })).rejects.toMatchObject({ status: 401 });
    expect(await countDemoFlights(database.db)).toBe(demoFlightCount);
    expect(await database.db.auditEvent.count({ where: { action: "demo.remove" } })).toBe(0);
  });

  test("removing the demo deletes exactly the demo flights and setup; a demo site a real flight uses stays, and the report says so", async () => {
    const db = database.db;
    const realSetupBefore = await db.school.findUniqueOrThrow({ where: { id: real.school.id }, select: { _count: { select: { sites: true, payloads: true, sensors: true, layouts: true, flights: true } } } });
    const calibrationsBefore = await db.calibration.count({ where: { sensor: { schoolId: real.school.id } } });
    const admin: Viewer = { kind: "member", userId: "u-admin", email: "admin@example.org", isProgramAdmin: true, schoolIds: [], memberships: [] } as Viewer;
    const report = await removeDemoProgram(db, admin, { userId: "u-admin", label: "admin@example.org" });

    expect(report.flights).toBe(demoFlightCount);
    expect(await db.flight.count({ where: { synthetic: true } })).toBe(0);
    expect((await db.flight.findMany({ select: { id: true } })).map((f) => f.id).sort()).toEqual([realFlightId, realAtDemoSiteId].sort());
    expect(await db.rawFile.count()).toBe(2);
    expect(await db.analysisRun.count({ where: { flightId: { notIn: [realFlightId, realAtDemoSiteId] } } })).toBe(0);

    // The real school shares nothing with the demo: all of it stays.
    expect(await db.school.findUniqueOrThrow({ where: { id: real.school.id }, select: { _count: { select: { sites: true, payloads: true, sensors: true, layouts: true, flights: true } } } })).toEqual(realSetupBefore);
    expect(await db.calibration.count({ where: { sensor: { schoolId: real.school.id } } })).toBe(calibrationsBefore);

    // The demo school with a real flight keeps that flight's site and its own layout, and itself.
    expect(report.kept).toContainEqual({ kind: "site", id: demoSiteUsedByReal.id, name: demoSiteUsedByReal.name, reason: "used by 1 flight" });
    expect(report.kept.find((k) => k.kind === "school")).toMatchObject({ id: demoSiteUsedByReal.schoolId, reason: "still has 1 site, 1 sensor, 1 logger layout, 1 flight, 1 raw file" });
    expect(await db.site.findMany({ where: { schoolId: demoSiteUsedByReal.schoolId }, select: { id: true } })).toEqual([{ id: demoSiteUsedByReal.id }]);
    expect(await db.loggerLayout.findMany({ where: { schoolId: demoSiteUsedByReal.schoolId }, select: { name: true } })).toEqual([{ name: "Real team logger" }]);
    expect(await db.sensor.findMany({ where: { schoolId: demoSiteUsedByReal.schoolId }, select: { serial: true, _count: { select: { calibrations: true } } } })).toEqual([{ serial: "REAL-1", _count: { calibrations: 1 } }]);
    expect(await db.payload.count({ where: { schoolId: demoSiteUsedByReal.schoolId } })).toBe(0);

    // The other demo schools are gone entirely.
    const demoSetup = generateDemoProgram().schools;
    expect(await db.school.count({ where: { name: { in: demoSetup.map((s) => s.name) } } })).toBe(1);
    expect(report.schools).toBe(program.schools.length - 1);
    expect(report.sites).toBe(program.sites.length - 1);
    expect(report.sensors).toBe(program.sensors.length);
    expect(report.payloads).toBe(program.payloads.length);

    const audit = await db.auditEvent.findMany({ where: { action: "demo.remove" } });
    expect(audit).toHaveLength(1);
    expect(audit[0]).toMatchObject({ actorUserId: "u-admin", actorLabel: "admin@example.org" });

    // Again: nothing more to delete.
    const again = await removeDemoProgram(db, LOCAL_VIEWER, { userId: null, label: "cli" });
    expect({ ...again, kept: [] }).toEqual({ flights: 0, schools: 0, sites: 0, payloads: 0, sensors: 0, calibrations: 0, layouts: 0, kept: [] });
  }, 120_000);
});

describe.each(testEngines())("autoloading the demo on %s", (engine) => {
  const tiny: DemoProgram = { ...program, flights: program.flights.slice(0, 1) };
  let database: TestDatabase;

  beforeAll(async () => {
    database = await createTestDatabase(engine);
  }, 120_000);

  afterAll(async () => {
    await database?.drop();
  });

  test(engine === "sqlite" ? "an empty SQLite database gets the demo once; a non-empty one never" : "PostgreSQL never gets the demo unasked", async () => {
    const db = database.db;
    expect(await autoloadDemo(database, { program: tiny, skip: true })).toEqual({ loaded: false, reason: "skipped" });
    const first = await autoloadDemo(database, { program: tiny });
    if (engine === "postgres") {
      expect(first).toEqual({ loaded: false, reason: "not-sqlite" });
      expect(await db.school.count()).toBe(0);
      return;
    }
    expect(first.loaded).toBe(true);
    expect(await db.flight.count({ where: { synthetic: true } })).toBe(1);
    expect(await autoloadDemo(database, { program: tiny })).toEqual({ loaded: false, reason: "not-empty" });
    expect(await db.flight.count()).toBe(1);
    // A database holding only an account is not empty either.
    await removeDemoProgram(db, LOCAL_VIEWER, { userId: null, label: "test" });
    expect(await db.school.count()).toBe(0);
    await db.user.create({ data: { email: "someone@example.org", displayName: "Someone", passwordHash: "x" } });
    expect(await autoloadDemo(database, { program: tiny })).toEqual({ loaded: false, reason: "not-empty" });
    expect(await db.flight.count()).toBe(0);
  }, 120_000);
});
