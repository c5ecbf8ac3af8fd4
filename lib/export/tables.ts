/**
 * The export's tables: one tidy table per resource, each field with its Table Schema type, unit,
 * description and CF standard name where one exists. The same definitions write the CSV header and
 * cells, the JSON records and the data package's Table Schemas, so the three never disagree.
 * Column names are the names used everywhere else in Lapsebank (schema, code, UI).
 */
import type { AnalysisRun, Calibration, FlightSummary, LayerStat, ProfileLevel } from "../db/index.ts";

export type FieldType = "string" | "number" | "integer" | "boolean" | "datetime" | "object" | "array";

export interface ExportField<R> {
  name: string;
  type: FieldType;
  description: string;
  /** UDUNITS-style unit text ("K", "K km-1", "m", "hPa", "%"); absent for unitless fields. */
  unit?: string;
  /** CF standard name [S: CF standard name table], only where one fits the quantity. */
  cfStandardName?: string;
  /** The value is never missing. */
  required?: boolean;
  enum?: readonly string[];
  get(row: R): unknown;
}

export interface ForeignKey {
  fields: string | string[];
  reference: { resource: string; fields: string | string[] };
}

export interface ExportTable<R> {
  /** Frictionless resource name: lower case, digits, "-", "_", "." only. */
  name: string;
  title: string;
  description: string;
  fields: ReadonlyArray<ExportField<R>>;
  primaryKey: string[];
  foreignKeys: ForeignKey[];
}

/** A flight with its site, school, raw-file facts and current run (if any) with its summary. */
export interface FlightExportRow {
  id: string;
  title: string;
  notes: string;
  schoolId: string;
  siteId: string;
  payloadId: string | null;
  sensorId: string | null;
  layoutId: string;
  launchAtUtc: Date;
  visibility: string;
  synthetic: boolean;
  school: { name: string };
  site: { name: string; latitudeDeg: number; longitudeDeg: number; elevationM: number; timeZone: string };
  sensor: { serial: string } | null;
  rawFile: { id: string; name: string; sha256: string; sizeBytes: number };
  run: (AnalysisRun & { summary: FlightSummary | null }) | null;
}

export interface LevelExportRow extends Omit<ProfileLevel, "id"> {
  flightId: string;
}

export interface LayerExportRow extends LayerStat {
  flightId: string;
}

export interface CalibrationExportRow extends Calibration {
  sensor: { serial: string; kind: string; schoolId: string };
}

export interface RawFileExportRow {
  flightId: string;
  rawFileId: string;
  name: string;
  sha256: string;
  sizeBytes: number;
  path: string;
}

export interface QueryValueRow {
  flightId: string;
  groupKey: string;
  groupLabel: string;
  value: number;
}

const LAPSE_RATE_NOTE = "lapse rate in the trade's sense, −dT/dz: positive when temperature falls with height";

function summaryField(
  name: keyof FlightSummary & string,
  type: FieldType,
  description: string,
  extra: Partial<Pick<ExportField<FlightExportRow>, "unit" | "cfStandardName" | "enum">> = {},
): ExportField<FlightExportRow> {
  return { name, type, description: `${description} (current analysis run, ascent)`, ...extra, get: (row) => row.run?.summary?.[name] ?? null };
}

export const FLIGHTS_TABLE: ExportTable<FlightExportRow> = {
  name: "flights",
  title: "Flights",
  description: "One row per flight: where and when it flew, its raw file, and the flight summary of its current analysis run.",
  primaryKey: ["flightId"],
  foreignKeys: [],
  fields: [
    { name: "flightId", type: "string", required: true, description: "Lapsebank flight id", get: (r) => r.id },
    { name: "title", type: "string", required: true, description: "Flight title as given by the school", get: (r) => r.title },
    { name: "notes", type: "string", description: "Free-text notes on the flight", get: (r) => r.notes },
    { name: "schoolId", type: "string", required: true, description: "Id of the school that flew it", get: (r) => r.schoolId },
    { name: "schoolName", type: "string", required: true, description: "Name of the school", get: (r) => r.school.name },
    { name: "siteId", type: "string", required: true, description: "Id of the launch site", get: (r) => r.siteId },
    { name: "siteName", type: "string", required: true, description: "Name of the launch site", get: (r) => r.site.name },
    { name: "latitudeDeg", type: "number", required: true, unit: "degrees_north", cfStandardName: "latitude", description: "Launch-site latitude, WGS 84", get: (r) => r.site.latitudeDeg },
    { name: "longitudeDeg", type: "number", required: true, unit: "degrees_east", cfStandardName: "longitude", description: "Launch-site longitude, WGS 84", get: (r) => r.site.longitudeDeg },
    { name: "siteElevationM", type: "number", required: true, unit: "m", description: "Launch-site elevation above mean sea level", get: (r) => r.site.elevationM },
    { name: "siteTimeZone", type: "string", required: true, description: "IANA time zone of the site (local hours and seasons use it)", get: (r) => r.site.timeZone },
    { name: "launchAtUtc", type: "datetime", required: true, description: "Launch time, UTC (ISO 8601)", get: (r) => r.launchAtUtc },
    { name: "visibility", type: "string", required: true, enum: ["school", "program", "public"], description: "Who may see the flight in Lapsebank", get: (r) => r.visibility },
    { name: "synthetic", type: "boolean", required: true, description: "true for an invented flight (demo or test data generated by code, not a measurement); false for a real upload", get: (r) => r.synthetic },
    { name: "payloadId", type: "string", description: "Id of the payload flown", get: (r) => r.payloadId },
    { name: "sensorId", type: "string", description: "Id of the temperature sensor flown", get: (r) => r.sensorId },
    { name: "sensorSerial", type: "string", description: "Serial of the temperature sensor flown", get: (r) => r.sensor?.serial ?? null },
    { name: "layoutId", type: "string", required: true, description: "Id of the logger layout used to read the raw file", get: (r) => r.layoutId },
    { name: "rawFileName", type: "string", required: true, description: "Name of the raw logger file as uploaded", get: (r) => r.rawFile.name },
    { name: "rawFileSha256", type: "string", required: true, description: "SHA-256 of the raw file's bytes (hex)", get: (r) => r.rawFile.sha256 },
    { name: "rawFileSizeBytes", type: "integer", required: true, unit: "byte", description: "Size of the raw file", get: (r) => r.rawFile.sizeBytes },
    { name: "runId", type: "string", description: "Id of the current analysis run (see the runs table)", get: (r) => r.run?.id ?? null },
    { name: "analysisVersion", type: "string", description: "Lapsebank analysis version of the current run", get: (r) => r.run?.analysisVersion ?? null },
    { name: "calibrationId", type: "string", description: "Id of the calibration the current run applied (see the calibrations table)", get: (r) => r.run?.calibrationId ?? null },
    summaryField("season", "string", "Meteorological season code of the local launch month", { enum: ["DJF", "MAM", "JJA", "SON"] }),
    summaryField("seasonName", "string", "Hemisphere-aware season name", { enum: ["winter", "spring", "summer", "autumn"] }),
    summaryField("year", "integer", "Local launch year"),
    summaryField("month", "integer", "Local launch month, 1–12"),
    summaryField("dayOfYear", "integer", "Local launch day of year, 1–366"),
    summaryField("localHour", "number", "Local launch time as decimal hours", { unit: "h" }),
    summaryField("hoursAfterSunrise", "number", "Hours from local sunrise to launch (missing in polar day or night)", { unit: "h" }),
    summaryField("solarElevationDeg", "number", "Solar elevation angle at launch", { unit: "degree", cfStandardName: "solar_elevation_angle" }),
    summaryField("launchAltitudeM", "number", "Altitude at launch above mean sea level", { unit: "m", cfStandardName: "altitude" }),
    summaryField("burstAltitudeM", "number", "Burst altitude above mean sea level", { unit: "m", cfStandardName: "altitude" }),
    summaryField("maxAltitudeM", "number", "Highest altitude reached", { unit: "m", cfStandardName: "altitude" }),
    summaryField("minAltitudeM", "number", "Lowest altitude recorded", { unit: "m", cfStandardName: "altitude" }),
    summaryField("surfaceTemperatureK", "number", "Air temperature at the lowest level", { unit: "K", cfStandardName: "air_temperature" }),
    summaryField("troposphericLapseRateKPerKm", "number", `Least-squares tropospheric lapse rate; ${LAPSE_RATE_NOTE}`, { unit: "K km-1", cfStandardName: "air_temperature_lapse_rate" }),
    summaryField("troposphericLapseRateStdErrKPerKm", "number", "Standard error of the tropospheric lapse rate", { unit: "K km-1" }),
    summaryField("tropopauseAltitudeM", "number", "First lapse-rate tropopause (WMO 1957 definition)", { unit: "m", cfStandardName: "tropopause_altitude" }),
    summaryField("tropopauseTemperatureK", "number", "Air temperature at the first tropopause", { unit: "K", cfStandardName: "tropopause_air_temperature" }),
    summaryField("tropopausePressureHpa", "number", "Air pressure at the first tropopause", { unit: "hPa", cfStandardName: "tropopause_air_pressure" }),
    summaryField("tropopauseStatus", "string", "Whether the tropopause was found, not reached or undetermined"),
    summaryField("secondTropopauseAltitudeM", "number", "Second lapse-rate tropopause (WMO 1957 definition)", { unit: "m" }),
    summaryField("hasSurfaceInversion", "boolean", "Temperature rises from the lowest level"),
    summaryField("surfaceInversionDepthM", "number", "Depth of the surface-based inversion", { unit: "m" }),
    summaryField("surfaceInversionStrengthK", "number", "Temperature at the inversion top minus temperature at the surface", { unit: "K" }),
    summaryField("stratosphericLapseRateKPerKm", "number", `Lapse rate above the first tropopause; ${LAPSE_RATE_NOTE}`, { unit: "K km-1", cfStandardName: "air_temperature_lapse_rate" }),
    summaryField("hasDescent", "boolean", "The file holds a usable descent"),
    summaryField("qcFlags", "string", "Comma-separated quality-control flags of the run"),
    summaryField("qcFlagged", "boolean", "A quality-control flag marks the flight as doubtful"),
  ],
};

export const RUNS_TABLE: ExportTable<AnalysisRun> = {
  name: "runs",
  title: "Analysis runs",
  description: "Provenance of every number: the current analysis run of each exported flight, with the analysis version and parameters, the calibration and logger layout exactly as applied.",
  primaryKey: ["runId"],
  foreignKeys: [
    { fields: "flightId", reference: { resource: "flights", fields: "flightId" } },
  ],
  fields: [
    { name: "runId", type: "string", required: true, description: "Analysis run id", get: (r) => r.id },
    { name: "flightId", type: "string", required: true, description: "Flight analysed", get: (r) => r.flightId },
    { name: "analysisVersion", type: "string", required: true, description: "Lapsebank analysis version", get: (r) => r.analysisVersion },
    { name: "createdAt", type: "datetime", required: true, description: "When the run was made, UTC", get: (r) => r.createdAt },
    { name: "reason", type: "string", required: true, description: "Why the run was made (upload, reprocess …)", get: (r) => r.reason },
    { name: "parameters", type: "object", required: true, description: "Analysis parameters (JSON)", get: (r) => r.parameters },
    { name: "calibrationId", type: "string", description: "Calibration record applied (see the calibrations table)", get: (r) => r.calibrationId },
    { name: "calibrationSpec", type: "object", required: true, description: "Calibration exactly as applied (JSON)", get: (r) => r.calibrationSpec },
    { name: "layoutSpec", type: "object", required: true, description: "Logger layout exactly as applied to read the raw file (JSON)", get: (r) => r.layoutSpec },
    { name: "warnings", type: "array", required: true, description: "Analysis warnings (JSON)", get: (r) => r.warnings },
    { name: "qcFlags", type: "string", description: "Comma-separated quality-control flags", get: (r) => r.qcFlags },
    { name: "removedCounts", type: "object", required: true, description: "Samples removed by each cleaning step (JSON)", get: (r) => r.removedCounts },
    { name: "rowCount", type: "integer", required: true, description: "Data rows read from the raw file", get: (r) => r.rowCount },
    { name: "skippedRowCount", type: "integer", required: true, description: "Rows skipped as unreadable", get: (r) => r.skippedRowCount },
  ],
};

export const LAYERS_TABLE: ExportTable<LayerExportRow> = {
  name: "layers",
  title: "Layer statistics",
  description: "Layers found by the current analysis run: surface and elevated inversions, troposphere, stratosphere and fixed bands, with their fitted lapse rates and stability class.",
  primaryKey: ["layerId"],
  foreignKeys: [
    { fields: "flightId", reference: { resource: "flights", fields: "flightId" } },
    { fields: "runId", reference: { resource: "runs", fields: "runId" } },
  ],
  fields: [
    { name: "layerId", type: "string", required: true, description: "Layer id", get: (r) => r.id },
    { name: "flightId", type: "string", required: true, description: "Flight", get: (r) => r.flightId },
    { name: "runId", type: "string", required: true, description: "Analysis run", get: (r) => r.runId },
    { name: "kind", type: "string", required: true, enum: ["surface-inversion", "elevated-inversion", "troposphere", "stratosphere", "band"], description: "Layer kind", get: (r) => r.kind },
    { name: "phase", type: "string", required: true, enum: ["ascent", "descent"], description: "Flight phase the layer comes from", get: (r) => r.phase },
    { name: "baseM", type: "number", required: true, unit: "m", cfStandardName: "altitude", description: "Layer base above mean sea level", get: (r) => r.baseM },
    { name: "topM", type: "number", required: true, unit: "m", cfStandardName: "altitude", description: "Layer top above mean sea level", get: (r) => r.topM },
    { name: "lapseRateKPerKm", type: "number", required: true, unit: "K km-1", cfStandardName: "air_temperature_lapse_rate", description: `Least-squares lapse rate of the layer; ${LAPSE_RATE_NOTE}`, get: (r) => r.lapseRateKPerKm },
    { name: "lapseRateStdErrKPerKm", type: "number", unit: "K km-1", description: "Standard error of the lapse rate", get: (r) => r.lapseRateStdErrKPerKm },
    { name: "rSquared", type: "number", unit: "1", description: "Coefficient of determination of the fit", get: (r) => r.rSquared },
    { name: "theilSenLapseRateKPerKm", type: "number", unit: "K km-1", description: "Theil–Sen (median of pairwise slopes) lapse rate", get: (r) => r.theilSenLapseRateKPerKm },
    { name: "levelCount", type: "integer", required: true, description: "Binned levels in the layer", get: (r) => r.levelCount },
    { name: "strengthK", type: "number", unit: "K", description: "Inversion strength: temperature at the top minus at the base", get: (r) => r.strengthK },
    { name: "meanTemperatureK", type: "number", required: true, unit: "K", cfStandardName: "air_temperature", description: "Mean air temperature of the layer", get: (r) => r.meanTemperatureK },
    { name: "meanPressureHpa", type: "number", required: true, unit: "hPa", cfStandardName: "air_pressure", description: "Mean air pressure of the layer", get: (r) => r.meanPressureHpa },
    { name: "pressureFromStandardAtmosphere", type: "boolean", required: true, description: "The mean pressure comes from the U.S. Standard Atmosphere 1976, not a measurement", get: (r) => r.pressureFromStandardAtmosphere },
    { name: "dryAdiabaticLapseRateKPerKm", type: "number", required: true, unit: "K km-1", description: "Dry adiabatic lapse rate g/cp used for the stability class", get: (r) => r.dryAdiabaticLapseRateKPerKm },
    { name: "moistAdiabaticLapseRateKPerKm", type: "number", required: true, unit: "K km-1", description: "Saturated adiabatic lapse rate at the layer's mean temperature and pressure", get: (r) => r.moistAdiabaticLapseRateKPerKm },
    { name: "stability", type: "string", required: true, description: "Stability class against the dry and saturated adiabatic lapse rates", get: (r) => r.stability },
  ],
};

export const LEVELS_TABLE: ExportTable<LevelExportRow> = {
  name: "levels",
  title: "Binned levels",
  description: "The current run's profile binned to fixed altitude steps, ascent and descent.",
  primaryKey: ["runId", "phase", "altitudeM"],
  foreignKeys: [
    { fields: "flightId", reference: { resource: "flights", fields: "flightId" } },
    { fields: "runId", reference: { resource: "runs", fields: "runId" } },
  ],
  fields: [
    { name: "flightId", type: "string", required: true, description: "Flight", get: (r) => r.flightId },
    { name: "runId", type: "string", required: true, description: "Analysis run", get: (r) => r.runId },
    { name: "phase", type: "string", required: true, enum: ["ascent", "descent"], description: "Flight phase", get: (r) => r.phase },
    { name: "altitudeM", type: "number", required: true, unit: "m", cfStandardName: "altitude", description: "Mean altitude of the level's samples, geometric, above mean sea level", get: (r) => r.altitudeM },
    { name: "baseM", type: "number", required: true, unit: "m", description: "Bin base", get: (r) => r.baseM },
    { name: "topM", type: "number", required: true, unit: "m", description: "Bin top", get: (r) => r.topM },
    { name: "sampleCount", type: "integer", required: true, description: "Samples averaged into the level", get: (r) => r.sampleCount },
    { name: "temperatureK", type: "number", required: true, unit: "K", cfStandardName: "air_temperature", description: "Mean calibrated air temperature", get: (r) => r.temperatureK },
    { name: "temperatureSdK", type: "number", unit: "K", description: "Standard deviation of the samples' temperature", get: (r) => r.temperatureSdK },
    { name: "pressureHpa", type: "number", unit: "hPa", cfStandardName: "air_pressure", description: "Mean air pressure (when the logger measured it)", get: (r) => r.pressureHpa },
    { name: "relativeHumidityPct", type: "number", unit: "%", cfStandardName: "relative_humidity", description: "Mean relative humidity (when the logger measured it)", get: (r) => r.relativeHumidityPct },
  ],
};

export const CALIBRATIONS_TABLE: ExportTable<CalibrationExportRow> = {
  name: "calibrations",
  title: "Calibrations",
  description: "Every calibration record an exported run applied.",
  primaryKey: ["calibrationId"],
  foreignKeys: [],
  fields: [
    { name: "calibrationId", type: "string", required: true, description: "Calibration id", get: (r) => r.id },
    { name: "sensorId", type: "string", required: true, description: "Sensor calibrated", get: (r) => r.sensorId },
    { name: "sensorSerial", type: "string", required: true, description: "Sensor serial", get: (r) => r.sensor.serial },
    { name: "sensorKind", type: "string", required: true, description: "Kind of sensor", get: (r) => r.sensor.kind },
    { name: "method", type: "string", required: true, description: "How the calibration was made (datasheet, two-point …)", get: (r) => r.method },
    { name: "validFromUtc", type: "datetime", required: true, description: "Start of validity, UTC", get: (r) => r.validFromUtc },
    { name: "validToUtc", type: "datetime", description: "End of validity, UTC (missing: still valid)", get: (r) => r.validToUtc },
    { name: "spec", type: "object", required: true, description: "Calibration model and coefficients (JSON)", get: (r) => r.spec },
    { name: "referenceReadings", type: "array", description: "Field-check reference readings (JSON)", get: (r) => r.referenceReadings },
    { name: "notes", type: "string", description: "Notes", get: (r) => r.notes },
  ],
};

export const RAW_FILES_TABLE: ExportTable<RawFileExportRow> = {
  name: "raw-files",
  title: "Raw files",
  description: "The raw logger files exactly as uploaded, stored in this package under raw/.",
  primaryKey: ["flightId"],
  foreignKeys: [{ fields: "flightId", reference: { resource: "flights", fields: "flightId" } }],
  fields: [
    { name: "flightId", type: "string", required: true, description: "Flight", get: (r) => r.flightId },
    { name: "rawFileId", type: "string", required: true, description: "Raw file id", get: (r) => r.rawFileId },
    { name: "name", type: "string", required: true, description: "File name as uploaded", get: (r) => r.name },
    { name: "sha256", type: "string", required: true, description: "SHA-256 of the bytes (hex)", get: (r) => r.sha256 },
    { name: "sizeBytes", type: "integer", required: true, unit: "byte", description: "Size", get: (r) => r.sizeBytes },
    { name: "path", type: "string", required: true, description: "Path of the file inside this package", get: (r) => r.path },
  ],
};

/** The per-flight values of the climatology metric the query used, with each flight's group. */
export function queryValuesTable(metricLabel: string, unit: string): ExportTable<QueryValueRow> {
  return {
    name: "query-values",
    title: "Query values",
    description: `The ${metricLabel} of each flight that contributed to the query, and the group it fell in.`,
    primaryKey: ["flightId"],
    foreignKeys: [{ fields: "flightId", reference: { resource: "flights", fields: "flightId" } }],
    fields: [
      { name: "flightId", type: "string", required: true, description: "Flight", get: (r) => r.flightId },
      { name: "groupKey", type: "string", required: true, description: "Group key as the query computed it", get: (r) => r.groupKey },
      { name: "groupLabel", type: "string", required: true, description: "Group label", get: (r) => r.groupLabel },
      { name: "value", type: "number", required: true, unit: unit === "K/km" ? "K km-1" : unit, description: `${metricLabel} (${unit})`, get: (r) => r.value },
    ],
  };
}

export type TableName = "flights" | "runs" | "layers" | "levels" | "calibrations" | "raw-files" | "query-values";

/** Tables a CSV or JSON export can ask for by name. */
export const TABLE_NAMES: readonly TableName[] = ["flights", "runs", "layers", "levels", "calibrations", "raw-files", "query-values"];
