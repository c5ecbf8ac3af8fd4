/**
 * NetCDF-4 export: the flights of an export scope as a CF discrete-sampling-geometry profile
 * collection (REFERENCE.md §16: CF-1.8 chapter 9, featureType "profile", contiguous ragged array).
 * One profile per flight: the ascent levels of its current analysis run, the same rows the data
 * package's levels table holds, read by the same readers with the same visibility rule. Flights
 * without a current run have no levels and so no profile.
 *
 * Written with h5wasm (the HDF5 library compiled to WebAssembly) into a temporary file, which is then
 * streamed and removed. Levels are appended a page of flights at a time to resizable, chunked
 * datasets, so memory holds one page of levels plus one small record per profile, however large
 * the archive; the limit is the temporary directory's free space.
 *
 * netCDF-4 conventions used on top of plain HDF5: a dimension is a dimension-scale dataset (named
 * with the netCDF "not a variable" marker so it shows as a dimension only); variables attach it.
 * Text attributes are fixed-length strings, which netCDF reads as ordinary text (char) attributes.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import type { Dataset, File as H5File, Group } from "h5wasm/node";
import type { Db } from "../db/index.ts";
import type { Viewer } from "../auth/visibility.ts";
import type { LevelReader } from "./level-reader.ts";
import { inventedDataSentence } from "./package-metadata.ts";
import { readFlightPages, readLevels, type ExportScope, type FlightRunRef } from "./read.ts";
import type { FlightExportRow, LevelExportRow } from "./tables.ts";

/** Marker in a dimension scale's NAME that netCDF-4 reads as "a dimension, not a variable". */
const DIMENSION_ONLY = "This is a netCDF dimension but not a netCDF variable.";

/** Missing values in floating-point variables (never NaN, never a physically possible value here). */
export const NETCDF_FILL_VALUE = -9999;

/** Elements per HDF5 chunk of an obs variable (8 bytes each: 32 KiB chunks). */
const OBS_CHUNK = 4096;

const TIME_UNITS = "seconds since 1970-01-01 00:00:00 UTC";

export interface NetcdfFacts {
  title: string;
  programName: string;
  lapsebankVersion: string;
  createdAtUtc: Date;
  licence: { id: string; title: string; path: string };
}

type Attribute = string | number | { int: number } | { byte: number[] };

function setAttributes(target: Group | Dataset, attributes: Record<string, Attribute | null | undefined>): void {
  for (const [name, value] of Object.entries(attributes)) {
    if (value === null || value === undefined) continue;
    if (typeof value === "string") target.create_attribute(name, value, null, `S${Math.max(1, Buffer.byteLength(value, "utf8"))}`);
    else if (typeof value === "number") target.create_attribute(name, new Float64Array([value]), [1], "<d");
    else if ("int" in value) target.create_attribute(name, new Int32Array([value.int]), [1], "<i");
    else target.create_attribute(name, new Int8Array(value.byte), [value.byte.length], "<b");
  }
}

/** A growable float64 variable along the obs dimension. */
class ObsVariable {
  private readonly dataset: Dataset;
  private length = 0;

  constructor(file: H5File, name: string, attributes: Record<string, Attribute | null | undefined>) {
    this.dataset = file.create_dataset({ name, data: new Float64Array(0), shape: [0], maxshape: [null], chunks: [OBS_CHUNK], dtype: "<d" });
    this.dataset.attach_scale(0, "obs");
    setAttributes(this.dataset, { ...attributes, _FillValue: NETCDF_FILL_VALUE });
  }

  append(values: Float64Array): void {
    if (values.length === 0) return;
    this.dataset.resize([this.length + values.length]);
    this.dataset.write_slice([[this.length, this.length + values.length]], values);
    this.length += values.length;
  }
}

interface ProfileRecord {
  flightId: string;
  runId: string;
  timeS: number;
  latitudeDeg: number;
  longitudeDeg: number;
  siteElevationM: number;
  tropopauseAltitudeM: number | null;
  tropopauseTemperatureK: number | null;
  troposphericLapseRateKPerKm: number | null;
  synthetic: boolean;
  analysisVersion: string;
  rowSize: number;
}

const orFill = (v: number | null | undefined) => (v === null || v === undefined || !Number.isFinite(v) ? NETCDF_FILL_VALUE : v);

const OBS_COORDINATES = "time latitude longitude altitude";

/**
 * Writes the NetCDF file of a scope to `filePath`. Returns how many profiles and observations it holds.
 * The level reader is closed here.
 */
export async function writeNetcdfFile(
  filePath: string,
  db: Db,
  viewer: Viewer,
  scope: ExportScope,
  facts: NetcdfFacts,
  reader: LevelReader,
  pageSize: number,
): Promise<{ profiles: number; observations: number }> {
  // Loaded here, not at the top: only a NetCDF export needs the 4 MB HDF5 module.
  const { default: h5wasm } = await import("h5wasm/node");
  await h5wasm.ready;
  const file = new h5wasm.File(filePath, "w", { track_order: true });
  try {
    const obsDim = file.create_dataset({ name: "obs", data: new Float32Array(0), shape: [0], maxshape: [null], chunks: [OBS_CHUNK], dtype: "<f" });
    obsDim.make_scale(DIMENSION_ONLY);
    const profileDim = file.create_dataset({ name: "profile", data: new Float32Array(0), shape: [0], maxshape: [null], chunks: [1024], dtype: "<f" });
    profileDim.make_scale(DIMENSION_ONLY);

    const altitude = new ObsVariable(file, "altitude", { standard_name: "altitude", long_name: "Altitude of the level (bin centre) above mean sea level", units: "m", positive: "up", axis: "Z" });
    const temperature = new ObsVariable(file, "air_temperature", { standard_name: "air_temperature", long_name: "Mean air temperature in the level's altitude bin", units: "K", coordinates: OBS_COORDINATES });
    const pressure = new ObsVariable(file, "air_pressure", { standard_name: "air_pressure", long_name: "Air pressure at the level (missing where the logger recorded none)", units: "hPa", coordinates: OBS_COORDINATES });
    const humidity = new ObsVariable(file, "relative_humidity", { standard_name: "relative_humidity", long_name: "Relative humidity at the level (missing where the logger recorded none)", units: "%", coordinates: OBS_COORDINATES });

    const profiles: ProfileRecord[] = [];
    const schools = new Map<string, string>();
    const analysisVersions = new Set<string>();
    const parameterSets = new Map<string, unknown>();
    const calibrationIds = new Set<string>();
    let flightCount = 0;
    let inventedFlightCount = 0;
    let observations = 0;

    for await (const page of readFlightPages(db, viewer, scope.flightIds, pageSize)) {
      const withRun = page.filter((f): f is FlightExportRow & { run: NonNullable<FlightExportRow["run"]> } => f.run !== null);
      for (const f of page) {
        flightCount++;
        if (f.synthetic) inventedFlightCount++;
        schools.set(f.schoolId, f.school.name);
      }
      const refs: FlightRunRef[] = withRun.map((f) => ({ id: f.id, synthetic: f.synthetic, run: { id: f.run.id } }));
      const levels = await readLevels(reader, refs);
      const ascentOf = new Map<string, LevelExportRow[]>();
      for (const level of levels) {
        if (level.phase !== "ascent") continue;
        const list = ascentOf.get(level.runId);
        if (list) list.push(level);
        else ascentOf.set(level.runId, [level]);
      }
      const pageRows: LevelExportRow[] = [];
      for (const f of withRun) {
        const rows = ascentOf.get(f.run.id) ?? [];
        if (rows.length === 0) continue;
        analysisVersions.add(f.run.analysisVersion);
        const key = JSON.stringify(f.run.parameters);
        if (!parameterSets.has(key)) parameterSets.set(key, f.run.parameters);
        if (f.run.calibrationId) calibrationIds.add(f.run.calibrationId);
        const summary = f.run.summary;
        profiles.push({
          flightId: f.id,
          runId: f.run.id,
          timeS: f.launchAtUtc.getTime() / 1000,
          latitudeDeg: f.site.latitudeDeg,
          longitudeDeg: f.site.longitudeDeg,
          siteElevationM: f.site.elevationM,
          tropopauseAltitudeM: summary?.tropopauseAltitudeM ?? null,
          tropopauseTemperatureK: summary?.tropopauseTemperatureK ?? null,
          troposphericLapseRateKPerKm: summary?.troposphericLapseRateKPerKm ?? null,
          synthetic: f.synthetic,
          analysisVersion: f.run.analysisVersion,
          rowSize: rows.length,
        });
        for (const row of rows) pageRows.push(row);
      }
      altitude.append(Float64Array.from(pageRows, (r) => r.altitudeM));
      temperature.append(Float64Array.from(pageRows, (r) => orFill(r.temperatureK)));
      pressure.append(Float64Array.from(pageRows, (r) => orFill(r.pressureHpa)));
      humidity.append(Float64Array.from(pageRows, (r) => orFill(r.relativeHumidityPct)));
      observations += pageRows.length;
    }
    obsDim.resize([observations]);

    // Per-profile variables: one small record per flight, written once.
    const n = profiles.length;
    profileDim.resize([n]);
    const profileVariable = (name: string, data: Float64Array | Int32Array | Int8Array | string[], dtype: string, attributes: Record<string, Attribute | null | undefined>) => {
      const dataset = file.create_dataset({ name, data, shape: [n], dtype });
      dataset.attach_scale(0, "profile");
      setAttributes(dataset, attributes);
    };
    const floats = (get: (p: ProfileRecord) => number | null) => Float64Array.from(profiles, (p) => orFill(get(p)));
    profileVariable("run_id", profiles.map((p) => p.runId), "S", { cf_role: "profile_id", long_name: "Lapsebank analysis run id (one profile per flight's current run)" });
    profileVariable("flight_id", profiles.map((p) => p.flightId), "S", { long_name: "Lapsebank flight id" });
    profileVariable("time", floats((p) => p.timeS), "<d", { standard_name: "time", long_name: "Launch time", units: TIME_UNITS, calendar: "standard", axis: "T" });
    profileVariable("latitude", floats((p) => p.latitudeDeg), "<d", { standard_name: "latitude", long_name: "Launch-site latitude, WGS 84", units: "degrees_north", axis: "Y" });
    profileVariable("longitude", floats((p) => p.longitudeDeg), "<d", { standard_name: "longitude", long_name: "Launch-site longitude, WGS 84", units: "degrees_east", axis: "X" });
    profileVariable("site_elevation", floats((p) => p.siteElevationM), "<d", { standard_name: "surface_altitude", long_name: "Launch-site elevation above mean sea level", units: "m" });
    profileVariable("tropopause_altitude", floats((p) => p.tropopauseAltitudeM), "<d", {
      standard_name: "tropopause_altitude", long_name: "First lapse-rate tropopause (WMO 1957 definition), ascent", units: "m", _FillValue: NETCDF_FILL_VALUE,
    });
    profileVariable("tropopause_air_temperature", floats((p) => p.tropopauseTemperatureK), "<d", {
      standard_name: "tropopause_air_temperature", long_name: "Air temperature at the first tropopause", units: "K", _FillValue: NETCDF_FILL_VALUE,
    });
    profileVariable("tropospheric_lapse_rate", floats((p) => p.troposphericLapseRateKPerKm), "<d", {
      standard_name: "air_temperature_lapse_rate", long_name: "Least-squares tropospheric lapse rate, -dT/dz (positive when temperature falls with height), ascent", units: "K km-1", _FillValue: NETCDF_FILL_VALUE,
    });
    profileVariable("synthetic", Int8Array.from(profiles, (p) => (p.synthetic ? 1 : 0)), "<b", {
      long_name: "Invented flight (demo or test data generated by code, not a measurement)", flag_values: { byte: [0, 1] }, flag_meanings: "measured invented",
    });
    profileVariable("analysis_version", profiles.map((p) => p.analysisVersion), "S", { long_name: "Lapsebank analysis version of the run" });
    profileVariable("rowSize", Int32Array.from(profiles, (p) => p.rowSize), "<i", { long_name: "Number of observations in this profile", sample_dimension: "obs" });

    const iso = facts.createdAtUtc.toISOString().replace(/\.\d{3}Z$/, "Z");
    const invented = profiles.filter((p) => p.synthetic).length;
    const description = scope.description;
    setAttributes(file, {
      Conventions: "CF-1.8",
      featureType: "profile",
      title: facts.title,
      institution: facts.programName,
      source: `Lapsebank ${facts.lapsebankVersion}`,
      history: `${iso} written by the Lapsebank ${facts.lapsebankVersion} NetCDF export`,
      date_created: iso,
      license: `${facts.licence.id}: ${facts.licence.title}, ${facts.licence.path}`,
      comment: "One profile per flight: the binned ascent levels of the flight's current analysis run (descent levels and flights without a current run are left out; the data package has them). Missing values are _FillValue.",
      lapsebank_query: description.summary,
      lapsebank_query_parameters: JSON.stringify(description.parameters),
      lapsebank_query_page: description.pagePath,
      lapsebank_query_groups: description.groups ? JSON.stringify(description.groups) : null,
      lapsebank_query_excluded: description.excluded ? JSON.stringify(description.excluded) : null,
      lapsebank_analysis_versions: [...analysisVersions].sort().join(", ") || "none",
      lapsebank_analysis_parameters: JSON.stringify([...parameterSets.values()]),
      lapsebank_calibrations: [...calibrationIds].sort().join(", ") || "none",
      lapsebank_schools: [...schools.entries()].sort((a, b) => a[1].localeCompare(b[1])).map(([id, name]) => `${name} (${id})`).join("; ") || "none",
      lapsebank_flight_count: { int: flightCount },
      lapsebank_profile_count: { int: n },
      lapsebank_invented_flight_count: { int: inventedFlightCount },
      invented_data: invented > 0 ? inventedDataSentence(invented, n) : null,
    });
    return { profiles: n, observations };
  } finally {
    file.close();
    await reader.close();
  }
}

/** Bytes of a NetCDF export: written to a temporary file, then streamed from it in 1 MiB chunks and removed. */
export async function* netcdfChunks(write: (filePath: string) => Promise<unknown>): AsyncGenerator<Uint8Array> {
  const dir = await fs.promises.mkdtemp(path.join(os.tmpdir(), "lapsebank-netcdf-"));
  try {
    const filePath = path.join(dir, "export.nc");
    await write(filePath);
    const stream = fs.createReadStream(filePath, { highWaterMark: 1 << 20 });
    for await (const chunk of stream) yield new Uint8Array(chunk as Buffer);
  } finally {
    await fs.promises.rm(dir, { recursive: true, force: true });
  }
}
