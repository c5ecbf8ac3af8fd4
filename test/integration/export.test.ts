import { createHash } from "node:crypto";
import { parse } from "csv-parse/sync";
import { unzipSync } from "fflate";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { ingestFlightFile } from "../../lib/ingest/index.ts";
import { createExport } from "../../lib/export/export.ts";
import { ExportRequestError } from "../../lib/export/read.ts";
import { unguardTextCell } from "../../lib/export/csv.ts";
import { FLIGHTS_TABLE, LAYERS_TABLE, LEVELS_TABLE, RUNS_TABLE } from "../../lib/export/tables.ts";
import { LOCAL_VIEWER, type Viewer } from "../../lib/auth/visibility.ts";
import { listFlights } from "../../lib/query/flights.ts";
import { archiveFilterSchema } from "../../lib/query/archive-filter.ts";
import { getClimatology } from "../../lib/query/climatology-core.ts";
import { parseClimatologyQuery } from "../../lib/query/climatology-params.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";
import { frictionlessValidator } from "../unit/export/frictionless.ts";

async function collect(body: AsyncIterable<Uint8Array>): Promise<Uint8Array> {
  const parts: Uint8Array[] = [];
  for await (const chunk of body) parts.push(chunk);
  return Buffer.concat(parts);
}

const text = (bytes: Uint8Array | undefined) => new TextDecoder().decode(bytes);
const csvRecords = (bytes: Uint8Array | undefined) => parse(text(bytes), { columns: true }) as Array<Record<string, string>>;

/** A CSV cell read back as the stored value, following the package's Table Schema (empty = missing). */
function readCell(type: string, cell: string | undefined): unknown {
  if (cell === undefined || cell === "") return null;
  switch (type) {
    case "number":
    case "integer":
      return Number(cell);
    case "boolean":
      return cell === "true";
    case "datetime":
      return new Date(cell).toISOString();
    case "object":
    case "array":
      return JSON.parse(unguardTextCell(cell));
    default:
      return unguardTextCell(cell);
  }
}

/** Stored value as the export should carry it: dates as ISO text, empty text as missing. */
function stored(value: unknown): unknown {
  if (value instanceof Date) return value.toISOString();
  if (value === "" || value === undefined) return null;
  return value;
}

describe.each(testEngines())("export on %s", (engine) => {
  let database: TestDatabase;
  let north: Awaited<ReturnType<typeof setUpSchool>>;
  let south: Awaited<ReturnType<typeof setUpSchool>>;
  const flights: Record<"formula" | "public" | "southSchool", string> = { formula: "", public: "", southSchool: "" };
  const now = new Date("2025-03-01T10:00:00Z");

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    north = await setUpSchool(database.db, "Test School North");
    south = await setUpSchool(database.db, "Test School South");
    const add = async (ids: typeof north, seed: number, dayOffset: number, extra: Record<string, string>) => {
      const f = makeFlightFile({ seed });
      const result = await ingestFlightFile(database.db, {
        file: { name: `flight-${seed}.csv`, bytes: f.bytes },
        metadata: {
          schoolId: ids.school.id, siteId: ids.site.id, layoutId: ids.layout.id, sensorId: ids.sensor.id,
          launchAtUtc: new Date(f.launchAtUtc.getTime() + dayOffset * 86_400_000).toISOString(), ...extra,
        },
      });
      return result.flightId;
    };
    // A title a spreadsheet would run as a formula: the export must disarm it.
    flights.formula = await add(north, 21, 0, { visibility: "program", title: "=HYPERLINK(\"http://x\",\"y\")" });
    flights.public = await add(north, 22, 40, { visibility: "public", title: "Public flight" });
    flights.southSchool = await add(south, 23, 80, { visibility: "school", title: "-South school only" });
  });
  afterAll(async () => database?.drop());

  const run = (viewer: Viewer, record: Record<string, string>) => createExport(database, viewer, record, { now, flightPageSize: 2 });

  test("a data package validates, and every number in it equals the database value at full precision", async () => {
    const output = await run(LOCAL_VIEWER, { source: "archive", format: "package" });
    expect(output.contentType).toBe("application/zip");
    const files = unzipSync(await collect(output.body));
    const descriptor = JSON.parse(text(files["datapackage.json"])) as { resources: Array<{ name: string; path: string; bytes: number; hash: string }>; lapsebank: { rowCounts: Record<string, number>; analysisVersions: string[]; calibrationsUsed: string[] } };
    const validate = frictionlessValidator();
    expect(validate(descriptor), JSON.stringify(validate.errors)).toBe(true);
    expect(descriptor.resources.map((r) => r.name)).toEqual(["flights", "runs", "layers", "levels", "calibrations"]);
    for (const r of descriptor.resources) {
      const bytes = files[r.path];
      expect(bytes, r.path).toBeDefined();
      expect(r.bytes).toBe(bytes?.length);
      expect(r.hash).toBe(`sha256:${createHash("sha256").update(bytes ?? new Uint8Array()).digest("hex")}`);
    }
    expect(text(files["CITATION.cff"])).toMatch(/authors:\n {2}- name: "Test School North"\n {2}- name: "Test School South"/);
    expect(descriptor.lapsebank.calibrationsUsed.sort()).toEqual([north.calibration.id, south.calibration.id].sort());

    // Flights: every field of every row equals the stored value.
    const db = database.db;
    const flightRows = csvRecords(files["data/flights.csv"]);
    expect(flightRows.map((r) => r.flightId).sort()).toEqual(Object.values(flights).sort());
    for (const row of flightRows) {
      const f = await db.flight.findUniqueOrThrow({ where: { id: row.flightId }, include: { school: true, site: true, sensor: true, rawFile: true, runs: { where: { isCurrent: true }, include: { summary: true } } } });
      for (const field of FLIGHTS_TABLE.fields) {
        const value = field.get({ ...f, run: f.runs[0] ?? null });
        expect(readCell(field.type, row[field.name]), `${field.name}`).toEqual(stored(value));
      }
      expect(row.troposphericLapseRateKPerKm).not.toBe("");
    }
    const formulaRow = flightRows.find((r) => r.flightId === flights.formula);
    expect(formulaRow?.title?.startsWith("'=")).toBe(true);
    expect(unguardTextCell(formulaRow?.title ?? "")).toBe("=HYPERLINK(\"http://x\",\"y\")");
    expect(flightRows.find((r) => r.flightId === flights.southSchool)?.title).toBe("'-South school only");

    // Levels: row for row, bit for bit.
    const levelRows = csvRecords(files["data/levels.csv"]);
    const dbLevels = await db.profileLevel.findMany({ where: { run: { isCurrent: true } }, include: { run: { select: { flightId: true, flight: { select: { synthetic: true } } } } } });
    expect(levelRows.length).toBe(dbLevels.length);
    expect(descriptor.lapsebank.rowCounts.levels).toBe(dbLevels.length);
    const byKey = new Map(dbLevels.map((l) => [`${l.runId}|${l.phase}|${l.altitudeM}`, l]));
    expect(byKey.size).toBe(dbLevels.length); // the primary key (runId, phase, altitudeM) is unique
    for (const row of levelRows) {
      const level = byKey.get(`${row.runId}|${row.phase}|${Number(row.altitudeM)}`);
      expect(level, `level ${row.runId} ${row.altitudeM}`).toBeDefined();
      if (!level) continue;
      for (const field of LEVELS_TABLE.fields) {
        const value = field.get({ ...level, flightId: level.run.flightId, synthetic: level.run.flight.synthetic });
        expect(Object.is(readCell(field.type, row[field.name]), stored(value)) || readCell(field.type, row[field.name]) === stored(value), field.name).toBe(true);
      }
    }

    // Layers by id, every field.
    const layerRows = csvRecords(files["data/layers.csv"]);
    const dbLayers = await db.layerStat.findMany({ where: { run: { isCurrent: true } }, include: { run: { select: { flightId: true, flight: { select: { synthetic: true } } } } } });
    expect(layerRows.length).toBe(dbLayers.length);
    for (const row of layerRows) {
      const layer = dbLayers.find((l) => l.id === row.layerId);
      expect(layer).toBeDefined();
      if (!layer) continue;
      for (const field of LAYERS_TABLE.fields) expect(readCell(field.type, row[field.name]), field.name).toEqual(stored(field.get({ ...layer, flightId: layer.run.flightId, synthetic: layer.run.flight.synthetic })));
    }

    // Runs by id, every field: the site values each run was analysed with among them.
    const runRows = csvRecords(files["data/runs.csv"]);
    for (const row of runRows) {
      const { flight, ...runRow } = await db.analysisRun.findUniqueOrThrow({ where: { id: row.runId ?? "" }, include: { flight: { select: { synthetic: true } } } });
      expect(runRow.siteLatitudeDeg).not.toBeNull();
      for (const field of RUNS_TABLE.fields) expect(readCell(field.type, row[field.name]), field.name).toEqual(stored(field.get({ ...runRow, synthetic: flight.synthetic })));
    }

    // Foreign keys hold inside the package.
    const flightIds = new Set(flightRows.map((r) => r.flightId));
    const runIds = new Set(csvRecords(files["data/runs.csv"]).map((r) => r.runId));
    for (const row of [...levelRows, ...layerRows]) {
      expect(flightIds.has(row.flightId ?? "")).toBe(true);
      expect(runIds.has(row.runId ?? "")).toBe(true);
    }
  });

  test("layer columns name the reference of every band height: asked above ground or sea level, fitted and stored above sea level", async () => {
    const output = await run(LOCAL_VIEWER, { source: "flight", flight: flights.public, format: "csv", table: "layers" });
    const bytes = await collect(output.body);
    const header = (text(bytes).split("\n")[0] ?? "").split(",");
    for (const name of ["baseM", "topM", "fittedBaseM", "fittedTopM", "bandReference", "bandBaseAglM", "bandTopAglM", "bandBaseMslM", "bandTopMslM", "groundElevationM"]) expect(header).toContain(name);
    const bands = csvRecords(bytes).filter((r) => r.kind === "band" && r.phase === "ascent");
    // [D] the test site lies at 200 m; the default bands are 0–2000 m AGL, 2000–5000 and 5000–10000 m MSL
    const agl = bands.find((r) => r.bandReference === "agl");
    expect(agl).toMatchObject({ bandBaseAglM: "0", bandTopAglM: "2000", bandBaseMslM: "", bandTopMslM: "", groundElevationM: "200", baseM: "200", topM: "2200" });
    expect(Number(agl?.fittedBaseM)).toBeGreaterThanOrEqual(200);
    expect(Number(agl?.fittedBaseM)).toBeLessThanOrEqual(300);
    const msl = bands.filter((r) => r.bandReference === "msl").map((r) => [r.bandBaseMslM, r.bandTopMslM, r.bandBaseAglM, r.groundElevationM]);
    expect(msl).toEqual([["2000", "5000", "", ""], ["5000", "10000", "", ""]]);
  });

  test("raw files travel byte for byte, with their SHA-256", async () => {
    const output = await run(LOCAL_VIEWER, { source: "flight", flight: flights.public, format: "package", raw: "yes" });
    const files = unzipSync(await collect(output.body));
    const [row] = csvRecords(files["data/raw-files.csv"]);
    const stored = await database.db.flight.findUniqueOrThrow({ where: { id: flights.public }, include: { rawFile: true } });
    expect(row?.flightId).toBe(flights.public);
    const bytes = files[row?.path ?? ""];
    expect(Buffer.from(bytes ?? new Uint8Array()).equals(Buffer.from(stored.rawFile.bytes))).toBe(true);
    expect(createHash("sha256").update(bytes ?? new Uint8Array()).digest("hex")).toBe(row?.sha256);
  });

  test("exports respect visibility", async () => {
    const ids = async (viewer: Viewer) => csvRecords(await collect((await run(viewer, { format: "csv", table: "flights" })).body)).map((r) => r.flightId).sort();
    expect(await ids({ kind: "anonymous" })).toEqual([flights.public]);
    const northMember: Viewer = { kind: "member", userId: "u1", isProgramAdmin: false, schoolIds: [north.school.id], memberships: [{ schoolId: north.school.id, role: "reader" }] };
    expect(await ids(northMember)).toEqual([flights.formula, flights.public].sort());
    const southMember: Viewer = { kind: "member", userId: "u2", isProgramAdmin: false, schoolIds: [south.school.id], memberships: [{ schoolId: south.school.id, role: "reader" }] };
    expect(await ids(southMember)).toEqual(Object.values(flights).sort());
    const hidden = await run(northMember, { source: "flight", flight: flights.southSchool, format: "csv" }).then(() => null, (e: unknown) => e);
    expect(hidden).toBeInstanceOf(ExportRequestError);
    expect((hidden as ExportRequestError).status).toBe(404);
    // A hidden flight's levels never leak either.
    const levels = csvRecords(await collect((await run({ kind: "anonymous" }, { format: "csv", table: "levels" })).body));
    expect(new Set(levels.map((l) => l.flightId))).toEqual(new Set([flights.public]));
  });

  test("an Archive export holds exactly the flights the Archive lists for the same filter", async () => {
    for (const record of [{}, { school: north.school.id }, { from: "2024-07-01", to: "2024-08-01" }, { season: "JJA" }] as Array<Record<string, string>>) {
      const listed = await listFlights(LOCAL_VIEWER, archiveFilterSchema.parse({ ...record, pageSize: 200 }), database.db);
      const exported = csvRecords(await collect((await run(LOCAL_VIEWER, { ...record, format: "csv" })).body)).map((r) => r.flightId);
      expect(exported.sort(), JSON.stringify(record)).toEqual(listed.rows.map((r) => r.id).sort());
    }
  });

  test("a Climatology export holds the query's flights and their metric values, through the climatology engine", async () => {
    const query = { metric: "tropospheric-lapse-rate", groupBy: "school", qc: "include" };
    const parsed = parseClimatologyQuery(query);
    if (!parsed.ok) throw new Error(parsed.message);
    const result = await getClimatology(LOCAL_VIEWER, parsed.query, database, { profiles: false });
    const output = await run(LOCAL_VIEWER, { source: "climatology", format: "package", ...query });
    const files = unzipSync(await collect(output.body));
    const values = csvRecords(files["data/query-values.csv"]);
    const expected = result.groups.flatMap((g) => g.flights.map((f) => ({ flightId: f.flightId, groupKey: g.key, value: f.value })));
    expect(values.map((v) => ({ flightId: v.flightId, groupKey: v.groupKey, value: Number(v.value) }))).toEqual(expected);
    const descriptor = JSON.parse(text(files["datapackage.json"])) as { lapsebank: { query: { source: string; parameters: Record<string, string> } } };
    expect(descriptor.lapsebank.query.source).toBe("climatology");
    expect(descriptor.lapsebank.query.parameters.metric).toBe("tropospheric-lapse-rate");
    expect(frictionlessValidator()(descriptor)).toBe(true);
  });

  test("a Climatology page in its statistics-only form (flights=none) still exports every contributing flight", async () => {
    const query = { metric: "tropospheric-lapse-rate", groupBy: "none", qc: "include" };
    const all = csvRecords(await collect((await run(LOCAL_VIEWER, { source: "climatology", format: "csv", table: "query-values", ...query })).body));
    const summaryOnly = csvRecords(await collect((await run(LOCAL_VIEWER, { source: "climatology", format: "csv", table: "query-values", ...query, flights: "none" })).body));
    expect(all.length).toBe(3);
    expect(summaryOnly).toEqual(all);
  });

  test("a claim check exports through the same code, with its verdict in the package metadata", async () => {
    const query = { metric: "tropospheric-lapse-rate", groupBy: "none", qc: "include", claim: "one-sample", claimValue: "6.5" };
    const files = unzipSync(await collect((await run(LOCAL_VIEWER, { source: "climatology", format: "package", ...query })).body));
    const descriptor = JSON.parse(text(files["datapackage.json"])) as { lapsebank: { query: { claim: { verdict: string } | null; parameters: Record<string, string> } } };
    expect(descriptor.lapsebank.query.parameters).toMatchObject({ claim: "one-sample", claimValue: "6.5" });
    expect(descriptor.lapsebank.query.claim?.verdict).toMatch(/\w/);
    expect(csvRecords(files["data/query-values.csv"]).length).toBe(3);
  });

  test("an export that matches no flight is still a valid, empty package", async () => {
    const files = unzipSync(await collect((await run(LOCAL_VIEWER, { source: "archive", format: "package", from: "1990-01-01", to: "1990-01-02" })).body));
    expect(frictionlessValidator()(JSON.parse(text(files["datapackage.json"])))).toBe(true);
    expect(csvRecords(files["data/flights.csv"])).toEqual([]);
  });

  test("JSON export: one document, numbers equal to the database", async () => {
    const output = await run(LOCAL_VIEWER, { source: "flight", flight: flights.formula, format: "json" });
    const doc = JSON.parse(text(await collect(output.body))) as { tables: { flights: Array<Record<string, unknown>>; levels: Array<Record<string, unknown>> }; lapsebank: { dataDictionary: Record<string, unknown> } };
    expect(doc.tables.flights[0]?.title).toBe("=HYPERLINK(\"http://x\",\"y\")"); // JSON carries text as stored
    const dbLevels = await database.db.profileLevel.findMany({ where: { run: { flightId: flights.formula, isCurrent: true } }, orderBy: [{ runId: "asc" }, { phase: "asc" }, { altitudeM: "asc" }] });
    expect(doc.tables.levels.map((l) => l.temperatureK)).toEqual(dbLevels.map((l) => l.temperatureK));
    expect(Object.keys(doc.lapsebank.dataDictionary)).toContain("levels");
  });

  test("bad requests are refused before any byte is written", async () => {
    for (const [record, status] of [
      [{ format: "xml" }, 422],
      [{ format: "csv", raw: "yes" }, 422],
      [{ source: "flight" }, 422],
      [{ source: "climatology", metric: "band-lapse-rate" }, 422],
      [{ source: "archive", from: "not a date" }, 422],
    ] as Array<[Record<string, string>, number]>) {
      const error = await run(LOCAL_VIEWER, record).then(() => null, (e: unknown) => e);
      expect(error, JSON.stringify(record)).toBeInstanceOf(ExportRequestError);
      expect((error as ExportRequestError).status).toBe(status);
    }
  });
});
