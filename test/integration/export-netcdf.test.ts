/**
 * NetCDF-4 / CF export (REFERENCE.md §16): a profile collection as a contiguous ragged array,
 * checked with an independent reader (netCDF-C's `ncdump`, Debian package netcdf-bin) and read
 * back with h5wasm; values equal the database's; CLI, API and in-process export write the same
 * content; a visitor's file holds only public flights.
 */
import { ANALYSIS_VERSION } from "../../lib/analysis/types.ts";
import { execFileSync, spawn } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import h5wasm from "h5wasm/node";
import { afterAll, beforeAll, describe, expect, test, vi } from "vitest";
import { ingestFlightFile } from "../../lib/ingest/index.ts";
import { createExport } from "../../lib/export/export.ts";
import { NETCDF_FILL_VALUE } from "../../lib/export/netcdf.ts";
import { LOCAL_VIEWER, type Viewer } from "../../lib/auth/visibility.ts";
import { getClimatology } from "../../lib/query/climatology-core.ts";
import { parseClimatologyQuery } from "../../lib/query/climatology-params.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";
import { lapsebankNodeArgs } from "../support/lapsebank-command.ts";

// The API route reads the viewer from next/headers; outside Next there is no request scope.
vi.mock("next/headers", () => ({ headers: async () => new Headers({ Host: "127.0.0.1:3000" }), cookies: async () => ({ get: () => undefined }) }));

async function collect(body: AsyncIterable<Uint8Array>): Promise<Buffer> {
  const parts: Uint8Array[] = [];
  for await (const chunk of body) parts.push(chunk);
  return Buffer.concat(parts);
}

function ncdump(file: string, args: string[] = []): string {
  return execFileSync("ncdump", [...args, file], { encoding: "utf8", maxBuffer: 64 * 1024 * 1024 });
}

/** The numbers of one variable in `ncdump -v name` output (data section). */
function dumpedValues(dump: string, name: string): number[] {
  const data = dump.slice(dump.indexOf("\ndata:"));
  const match = new RegExp(`\\n ${name} = ([^;]*);`).exec(data);
  if (!match) throw new Error(`no data for ${name}`);
  return (match[1] ?? "").split(",").map((s) => (s.trim() === "_" ? NaN : Number(s.trim())));
}

function runCommand(databaseUrl: string, args: string[]): Promise<{ code: number | null; stderr: string }> {
  const child = spawn(process.execPath, [...lapsebankNodeArgs(), ...args], { env: { ...process.env, DATABASE_URL: databaseUrl }, stdio: ["ignore", "pipe", "pipe"] });
  let stderr = "";
  child.stderr.on("data", (chunk) => (stderr += chunk));
  return new Promise((resolve) => child.on("exit", (code) => resolve({ code, stderr })));
}

/** A dump without the lines that name the moment of writing (the only difference between two writes of one scope). */
const timeless = (dump: string) => dump.replace(/^netcdf .*\{$/m, "netcdf x {").replace(/\d{4}-\d\d-\d\dT\d\d:\d\d:\d\dZ/g, "<time>").replace(/exported \d{4}-\d\d-\d\d/g, "exported <date>");

const hasNcdump = (() => {
  try {
    execFileSync("ncdump", [], { stdio: "ignore" });
    return true;
  } catch (error) {
    return (error as { status?: number }).status !== undefined; // ncdump without arguments prints usage and exits non-zero
  }
})();

describe.each(testEngines())("NetCDF export on %s", (engine) => {
  let database: TestDatabase;
  let dir: string;
  const flights = { invented: "", public: "", school: "" };
  const now = new Date("2025-03-01T10:00:00Z");

  beforeAll(async () => {
    expect(hasNcdump, "ncdump (Debian package netcdf-bin) must be installed").toBe(true);
    database = await createTestDatabase(engine);
    dir = fs.mkdtempSync(path.join(os.tmpdir(), "lapsebank-netcdf-test-"));
    const ids = await setUpSchool(database.db, "NetCDF Test School");
    const add = async (seed: number, dayOffset: number, visibility: string) => {
      const f = makeFlightFile({ seed });
      const result = await ingestFlightFile(database.db, {
        file: { name: `flight-${seed}.csv`, bytes: f.bytes },
        metadata: { schoolId: ids.school.id, siteId: ids.site.id, layoutId: ids.layout.id, sensorId: ids.sensor.id, launchAtUtc: new Date(f.launchAtUtc.getTime() + dayOffset * 86_400_000).toISOString(), visibility },
      });
      return result.flightId;
    };
    flights.invented = await add(61, 0, "program");
    flights.public = await add(62, 30, "public");
    flights.school = await add(63, 60, "school");
    await database.db.flight.update({ where: { id: flights.invented }, data: { synthetic: true } });
    await h5wasm.ready;
  }, 120_000);

  afterAll(async () => {
    await database?.drop();
    if (dir) fs.rmSync(dir, { recursive: true, force: true });
  });

  const exportTo = async (viewer: Viewer, name: string, record: Record<string, string> = {}) => {
    const output = await createExport(database, viewer, { format: "netcdf", ...record }, { now, flightPageSize: 2 });
    const file = path.join(dir, name);
    fs.writeFileSync(file, await collect(output.body));
    return { output, file };
  };

  test("ncdump -h reads a CF profile collection: dimensions, variables, standard names, global attributes", async () => {
    const { output, file } = await exportTo(LOCAL_VIEWER, "all.nc");
    expect(output.fileName).toMatch(/^lapsebank-archive-.*\.nc$/);
    expect(output.contentType).toBe("application/x-netcdf");
    expect(fs.readFileSync(file).subarray(0, 8).toString("latin1")).toBe("\x89HDF\r\n\x1a\n");
    const header = ncdump(file, ["-h"]);
    expect(header).toMatch(/dimensions:\n\tobs = UNLIMITED ; \/\/ \(\d+ currently\)\n\tprofile = UNLIMITED ; \/\/ \(3 currently\)/);
    for (const v of ["double altitude(obs)", "double air_temperature(obs)", "double air_pressure(obs)", "double relative_humidity(obs)", "string run_id(profile)", "string flight_id(profile)", "double time(profile)", "double latitude(profile)", "double longitude(profile)", "double tropopause_altitude(profile)", "double tropopause_air_temperature(profile)", "double tropospheric_lapse_rate(profile)", "byte synthetic(profile)", "int rowSize(profile)"]) {
      expect(header).toContain(`\t${v} ;`);
    }
    // CF-1.8 §9 / standard name table (REFERENCE.md §16, §10).
    for (const line of [
      ':Conventions = "CF-1.8" ;', ':featureType = "profile" ;', 'rowSize:sample_dimension = "obs" ;', 'run_id:cf_role = "profile_id" ;',
      'air_temperature:standard_name = "air_temperature" ;', 'air_temperature:units = "K" ;', "air_temperature:_FillValue = -9999. ;",
      'air_pressure:standard_name = "air_pressure" ;', 'relative_humidity:standard_name = "relative_humidity" ;', 'altitude:standard_name = "altitude" ;',
      'time:units = "seconds since 1970-01-01 00:00:00 UTC" ;', 'tropopause_altitude:standard_name = "tropopause_altitude" ;',
      'tropospheric_lapse_rate:standard_name = "air_temperature_lapse_rate" ;', 'synthetic:flag_values = 0b, 1b ;',
      ':source = "Lapsebank', `:lapsebank_analysis_versions = "${ANALYSIS_VERSION}" ;`, ':license = "CC-BY-4.0:', ":lapsebank_invented_flight_count = 1 ;",
      ':invented_data = "1 of the 3 flights in this export is INVENTED',
    ]) {
      expect(header).toContain(line);
    }
    expect(header).toMatch(/:history = "2025-03-01T10:00:00Z written by the Lapsebank [\d.]+ NetCDF export" ;/);
    expect(header).toContain(':lapsebank_query = "Every Archive flight visible to the requester" ;');
  });

  test("values read back (h5wasm and ncdump) equal the database's ascent levels and flight summaries", async () => {
    const { file } = await exportTo(LOCAL_VIEWER, "values.nc");
    const h5 = new h5wasm.File(file, "r");
    try {
      const read = (name: string) => (h5.get(name) as InstanceType<typeof h5wasm.Dataset>).value as unknown;
      const runIds = read("run_id") as string[];
      const flightIds = read("flight_id") as string[];
      const rowSize = Array.from(read("rowSize") as Int32Array);
      const altitude = Array.from(read("altitude") as Float64Array);
      const temperature = Array.from(read("air_temperature") as Float64Array);
      const pressure = Array.from(read("air_pressure") as Float64Array);
      const humidity = Array.from(read("relative_humidity") as Float64Array);
      // Archive order: by launch time.
      expect(flightIds).toEqual([flights.invented, flights.public, flights.school]);
      expect(Array.from(read("synthetic") as Int8Array)).toEqual([1, 0, 0]);
      expect(rowSize.reduce((a, b) => a + b, 0)).toBe(altitude.length);
      let start = 0;
      for (const [i, runId] of runIds.entries()) {
        const run = await database.db.analysisRun.findUniqueOrThrow({ where: { id: runId }, include: { summary: true, flight: { include: { site: true } } } });
        expect(run.isCurrent).toBe(true);
        expect(run.flightId).toBe(flightIds[i]);
        const levels = await database.db.profileLevel.findMany({ where: { runId, phase: "ascent" }, orderBy: { altitudeM: "asc" } });
        expect(levels.length).toBeGreaterThan(10);
        expect(rowSize[i]).toBe(levels.length);
        const slice = (values: number[]) => values.slice(start, start + levels.length);
        const orFill = (v: number | null) => v ?? NETCDF_FILL_VALUE;
        expect(slice(altitude)).toEqual(levels.map((l) => l.altitudeM));
        expect(slice(temperature)).toEqual(levels.map((l) => l.temperatureK));
        expect(slice(pressure)).toEqual(levels.map((l) => orFill(l.pressureHpa)));
        expect(slice(humidity)).toEqual(levels.map((l) => orFill(l.relativeHumidityPct)));
        start += levels.length;
        const at = (name: string) => (read(name) as Float64Array)[i];
        expect(at("time")).toBe(run.flight.launchAtUtc.getTime() / 1000);
        expect(at("latitude")).toBe(run.flight.site.latitudeDeg);
        expect(at("longitude")).toBe(run.flight.site.longitudeDeg);
        expect(at("tropopause_altitude")).toBe(orFill(run.summary?.tropopauseAltitudeM ?? null));
        expect(at("tropopause_air_temperature")).toBe(orFill(run.summary?.tropopauseTemperatureK ?? null));
        expect(at("tropospheric_lapse_rate")).toBe(orFill(run.summary?.troposphericLapseRateKPerKm ?? null));
        expect(run.summary?.troposphericLapseRateKPerKm).not.toBeNull();
      }
      // The independent reader sees the same temperatures (ncdump prints 7 significant digits by default; -p 15 asks for more).
      const dumped = dumpedValues(ncdump(file, ["-p", "9,17", "-v", "air_temperature"]), "air_temperature");
      expect(dumped).toEqual(temperature);
    } finally {
      h5.close();
    }
  });

  test("CLI, API and in-process export write the same content", async () => {
    const inProcess = ncdump((await exportTo(LOCAL_VIEWER, "in-process.nc")).file);
    const cliFile = path.join(dir, "cli.nc");
    const result = await runCommand(database.url, ["export", "--format", "netcdf", "--out", cliFile]);
    expect(result.stderr).toBe("");
    expect(result.code).toBe(0);
    expect(timeless(ncdump(cliFile))).toBe(timeless(inProcess));

    process.env.DATABASE_URL = database.url;
    (globalThis as { lapsebankDb?: unknown }).lapsebankDb = database;
    const { GET } = await import("../../app/api/v1/export/route.ts");
    const response = await GET(new Request("http://127.0.0.1:3000/api/v1/export?format=netcdf"));
    expect(response.status).toBe(200);
    expect(response.headers.get("content-type")).toBe("application/x-netcdf");
    const apiFile = path.join(dir, "api.nc");
    fs.writeFileSync(apiFile, Buffer.from(await response.arrayBuffer()));
    expect(timeless(ncdump(apiFile))).toBe(timeless(inProcess));
    delete (globalThis as { lapsebankDb?: unknown }).lapsebankDb;
  }, 60_000);

  test("a visitor's file holds only public flights, and says nothing invented when none is", async () => {
    const { file } = await exportTo({ kind: "anonymous" }, "visitor.nc");
    const dump = ncdump(file, ["-v", "flight_id"]);
    expect(dump).toContain("profile = UNLIMITED ; // (1 currently)");
    expect(dump).toContain(`flight_id = "${flights.public}" ;`);
    expect(dump).not.toContain(flights.invented);
    expect(dump).not.toContain(flights.school);
    expect(dump).not.toContain(":invented_data");
    expect(dump).toContain(":lapsebank_invented_flight_count = 0 ;");
  });

  test("a Climatology export holds the query's flights, with the query and its groups in the global attributes", async () => {
    const query = { metric: "tropospheric-lapse-rate", groupBy: "school", qc: "include" };
    const parsed = parseClimatologyQuery(query);
    if (!parsed.ok) throw new Error(parsed.message);
    const result = await getClimatology(LOCAL_VIEWER, { ...parsed.query, flights: "all" }, database, { profiles: false });
    const expected = result.groups.flatMap((g) => g.flights.map((f) => f.flightId));
    expect(expected.length).toBeGreaterThan(0);
    const { file } = await exportTo(LOCAL_VIEWER, "climatology.nc", { source: "climatology", ...query });
    const dump = ncdump(file, ["-v", "flight_id"]);
    expect(dump).toContain(`flight_id = ${expected.map((id) => `"${id}"`).join(", ")} ;`);
    expect(dump).toMatch(/:lapsebank_query = "Climatology query: [^"]+" ;/);
    expect(dump).toContain(':lapsebank_query_groups = "[{');
    expect(dump).toMatch(/:lapsebank_query_page = "\/climatology\?[^"]*metric=tropospheric-lapse-rate/);
  });

  test("an empty selection writes a valid file with no profiles", async () => {
    const { file } = await exportTo(LOCAL_VIEWER, "empty.nc", { from: "2100-01-01" });
    const header = ncdump(file, ["-h"]);
    expect(header).toContain("profile = UNLIMITED ; // (0 currently)");
    expect(header).toContain(':featureType = "profile" ;');
  });
});
