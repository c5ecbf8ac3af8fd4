import { describe, expect, test } from "vitest";
import { citationCff, dataPackageDescriptor, readmeText, type PackageFacts } from "../../../lib/export/package-metadata.ts";
import { CALIBRATIONS_TABLE, FLIGHTS_TABLE, LAYERS_TABLE, LEVELS_TABLE, RAW_FILES_TABLE, RUNS_TABLE, queryValuesTable, type ExportTable } from "../../../lib/export/tables.ts";
import { licenceById } from "../../../lib/export/request.ts";
import { frictionlessValidator } from "./frictionless.ts";

const TABLES = [FLIGHTS_TABLE, RUNS_TABLE, LAYERS_TABLE, LEVELS_TABLE, CALIBRATIONS_TABLE, RAW_FILES_TABLE, queryValuesTable("tropospheric lapse rate", "K/km")] as unknown as ExportTable<never>[];

function facts(overrides: Partial<PackageFacts> = {}): PackageFacts {
  return {
    name: "lapsebank-climatology-20250101-120000",
    title: "Test: \"quoted\" title",
    createdAtUtc: new Date("2025-01-01T12:00:00Z"),
    lapsebankVersion: "0.1.0",
    programName: "Invented Program",
    licence: licenceById("CC-BY-4.0"),
    query: { source: "climatology", summary: "A query", parameters: { metric: "tropospheric-lapse-rate" }, pagePath: "/climatology?metric=tropospheric-lapse-rate" },
    schools: [{ id: "s1", name: "Invented School" }],
    analysisVersions: ["1.0.0"],
    analysisParameterSets: [{ binSizeM: 100 }],
    calibrationIds: ["c1"],
    flightCount: 2,
    inventedFlightCount: 0,
    includesRawFiles: true,
    resources: TABLES.map((table) => ({ table, path: `data/${table.name}.csv`, bytes: 10, sha256: "ab".repeat(32), rowCount: 1 })),
    ...overrides,
  };
}

describe("datapackage.json", () => {
  const validate = frictionlessValidator();

  test("validates against the Tabular Data Package and Table Schema JSON Schemas", () => {
    const ok = validate(dataPackageDescriptor(facts()));
    expect(validate.errors ?? []).toEqual([]);
    expect(ok).toBe(true);
  });

  test("an export with no flights (and so no school) still validates", () => {
    expect(validate(dataPackageDescriptor(facts({ schools: [], flightCount: 0, calibrationIds: [] }))), JSON.stringify(validate.errors)).toBe(true);
  });

  test("the validator is not a rubber stamp: broken descriptors fail", () => {
    const good = dataPackageDescriptor(facts()) as { resources: Array<Record<string, unknown>>; name: string };
    expect(validate({ ...good, resources: [] })).toBe(false);
    expect(validate({ ...good, name: "Upper Case" })).toBe(false);
    const [first, ...rest] = good.resources;
    expect(validate({ ...good, resources: [{ ...first, schema: { fields: [] } }, ...rest] })).toBe(false);
    expect(validate({ ...good, resources: [{ ...first, path: "../outside.csv" }, ...rest] })).toBe(false);
    expect(validate({ ...good, resources: [{ ...first, schema: { fields: [{ name: "x", type: "decimal" }] } }, ...rest] })).toBe(false);
  });

  test("every primary and foreign key names fields that exist; foreign keys point at resources in the package", () => {
    const names = new Set(TABLES.map((t) => t.name));
    for (const table of TABLES) {
      const fields = new Set(table.fields.map((f) => f.name));
      for (const key of table.primaryKey) expect(fields.has(key), `${table.name}.${key}`).toBe(true);
      for (const fk of table.foreignKeys) {
        for (const f of [fk.fields].flat()) expect(fields.has(f)).toBe(true);
        expect(names.has(fk.reference.resource)).toBe(true);
        const target = TABLES.find((t) => t.name === fk.reference.resource);
        for (const f of [fk.reference.fields].flat()) expect(target?.fields.some((x) => x.name === f)).toBe(true);
      }
    }
  });

  test("field names are unique per table and every measured quantity carries a unit", () => {
    for (const table of TABLES) {
      const names = table.fields.map((f) => f.name);
      expect(new Set(names).size).toBe(names.length);
      for (const f of table.fields) {
        if (/(K|M|Hpa|Pct|KPerKm|Deg)$/.test(f.name) && f.type === "number") expect(f.unit, `${table.name}.${f.name}`).toBeTruthy();
      }
    }
  });

  // CF standard names used, each in the CF standard name table [S: REFERENCE.md §10 lists most; latitude,
  // longitude, solar_elevation_angle and tropopause_air_pressure are table entries too [Mem]].
  const CF_NAMES = new Set(["air_temperature", "air_pressure", "relative_humidity", "altitude", "tropopause_altitude", "tropopause_air_temperature", "tropopause_air_pressure", "air_temperature_lapse_rate", "latitude", "longitude", "solar_elevation_angle",
    // analysis 1.3.0 fields: dew_point_temperature (K), atmosphere_mass_content_of_water_vapor (kg m-2), freezing_level_altitude (m),
    // atmosphere_boundary_layer_thickness (m) are CF standard-name table entries [Mem]
    "dew_point_temperature", "atmosphere_mass_content_of_water_vapor", "freezing_level_altitude", "atmosphere_boundary_layer_thickness"]);
  test("CF standard names come from the known list and sit on fields with a matching unit", () => {
    const unitOf: Record<string, RegExp> = { air_temperature: /^K$/, tropopause_air_temperature: /^K$/, air_pressure: /^hPa$/, tropopause_air_pressure: /^hPa$/, altitude: /^m$/, tropopause_altitude: /^m$/, air_temperature_lapse_rate: /^K km-1$/, relative_humidity: /^%$/, latitude: /^degrees_north$/, longitude: /^degrees_east$/, solar_elevation_angle: /^degree$/, dew_point_temperature: /^K$/, atmosphere_mass_content_of_water_vapor: /^kg m-2$/, freezing_level_altitude: /^m$/, atmosphere_boundary_layer_thickness: /^m$/ };
    let count = 0;
    for (const table of TABLES) {
      for (const f of table.fields) {
        if (!f.cfStandardName) continue;
        count++;
        expect(CF_NAMES.has(f.cfStandardName), f.cfStandardName).toBe(true);
        expect(f.unit ?? "", `${table.name}.${f.name}`).toMatch(unitOf[f.cfStandardName] ?? /^$/);
      }
    }
    expect(count).toBeGreaterThan(10);
  });
});

describe("CITATION.cff and README", () => {
  test("CITATION.cff has the fields CFF 1.2.0 requires and type dataset", () => {
    // [S: Citation File Format 1.2.0 schema: cff-version, message, title, authors are required]
    const text = citationCff(facts());
    expect(text).toMatch(/^cff-version: 1\.2\.0$/m);
    expect(text).toMatch(/^message: ".+"$/m);
    expect(text).toMatch(/^title: "Test: \\"quoted\\" title"$/m);
    expect(text).toMatch(/^type: dataset$/m);
    expect(text).toMatch(/^authors:\n {2}- name: "Invented School"$/m);
    expect(text).toMatch(/^license: "CC-BY-4.0"$/m);
  });
  test("a package with no school still names an author (the program)", () => {
    expect(citationCff(facts({ schools: [] }))).toMatch(/^authors:\n {2}- name: "Invented Program"$/m);
  });
  test("README names every table, the licence and the guard rule", () => {
    const text = readmeText(facts());
    for (const t of TABLES) expect(text).toContain(`data/${t.name}.csv`);
    expect(text).toContain("CC-BY-4.0");
    expect(text).toContain("remove exactly one leading '");
  });

  test("invented flights are named as such in datapackage.json, CITATION.cff and the README; real-only packages say nothing", () => {
    const some = facts({ inventedFlightCount: 1 });
    const all = facts({ inventedFlightCount: 2 });
    const descriptor = dataPackageDescriptor(some) as { description: string; lapsebank: { inventedFlightCount: number } };
    expect(descriptor.description).toContain("1 of the 2 flights in this export is INVENTED");
    expect(descriptor.lapsebank.inventedFlightCount).toBe(1);
    const validate = frictionlessValidator();
    expect(validate(descriptor), JSON.stringify(validate.errors)).toBe(true);
    expect(citationCff(all)).toMatch(/^abstract: "A query\. All 2 flights in this export are INVENTED .*synthetic = true.*"$/m);
    expect(citationCff(all)).toContain(`  - "invented data"`);
    expect(readmeText(some)).toContain("**Invented data.** 1 of the 2 flights in this export is INVENTED");
    for (const text of [citationCff(facts()), readmeText(facts()), JSON.stringify(dataPackageDescriptor(facts()))]) expect(text).not.toMatch(/INVENTED|invented data|inventedFlightCount":[1-9]/);
  });
});
