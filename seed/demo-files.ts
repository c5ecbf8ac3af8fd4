/**
 * Logger files for the demo archive: invented layouts and a renderer that writes
 * profile samples the way a logger of that layout would, temperatures turned into raw
 * readings by inverting the sensor's stored calibration.
 */
import type { TemperatureCalibration } from "../lib/analysis/types.ts";
import { quantizeRawReading, rawReadingForTemperature } from "./demo-calibration.ts";
import type { ColumnRef, LoggerLayoutSpec } from "./demo-types.ts";
import { airTemperatureK, generateFlightProfile, type FlightProfileParams, type ProfileSample } from "./demo-profiles.ts";
import { createPrng } from "./prng.ts";

const METRES_PER_FOOT = 0.3048;

/** Layout A: comma-separated, '#' comments, elapsed seconds, metres, 10-bit counts, lat/lon. */
export const COMMA_COUNTS_LAYOUT: LoggerLayoutSpec = {
  name: "Comma logger, counts",
  delimiter: "comma",
  hasHeader: true,
  commentPrefix: "#",
  decimalSeparator: ".",
  columns: {
    time: { column: "seconds", format: "elapsed-seconds" },
    altitude: { column: "gps_alt_m", unit: "m" },
    latitude: { column: "lat_deg" },
    longitude: { column: "lon_deg" },
    temperature: { column: "temp_counts", unit: "counts" },
  },
};

/** Layout A with the pressure and humidity board fitted. */
export const COMMA_COUNTS_MET_LAYOUT: LoggerLayoutSpec = {
  name: "Comma logger, counts, pressure and humidity",
  delimiter: "comma",
  hasHeader: true,
  commentPrefix: "#",
  decimalSeparator: ".",
  columns: {
    time: { column: "seconds", format: "elapsed-seconds" },
    altitude: { column: "gps_alt_m", unit: "m" },
    latitude: { column: "lat_deg" },
    longitude: { column: "lon_deg" },
    temperature: { column: "temp_counts", unit: "counts" },
    pressure: { column: "pressure_hpa", unit: "hPa" },
    humidity: { column: "humidity_pct" },
  },
};

/** Layout B: semicolon-separated, decimal comma, ISO 8601 UTC time, feet, 12-bit thermistor counts, pressure. */
export const SEMICOLON_THERMISTOR_LAYOUT: LoggerLayoutSpec = {
  name: "Semicolon logger, thermistor counts, feet",
  delimiter: "semicolon",
  hasHeader: true,
  commentPrefix: null,
  decimalSeparator: ",",
  columns: {
    time: { column: "utc_time", format: "iso-datetime" },
    altitude: { column: "altitude_ft", unit: "ft" },
    latitude: { column: "latitude" },
    longitude: { column: "longitude" },
    temperature: { column: "thermistor_counts", unit: "counts" },
    pressure: { column: "pressure_hpa", unit: "hPa" },
  },
};

export const DEMO_LAYOUTS: ReadonlyArray<{ key: string; spec: LoggerLayoutSpec }> = [
  { key: "comma-counts", spec: COMMA_COUNTS_LAYOUT },
  { key: "comma-counts-met", spec: COMMA_COUNTS_MET_LAYOUT },
  { key: "semicolon-thermistor", spec: SEMICOLON_THERMISTOR_LAYOUT },
];

/** Nominal 10 mV/K voltage-output sensor on a 10-bit ADC with a 5.0 V reference (REFERENCE.md §7). */
export const LINEAR_10BIT_CALIBRATION: TemperatureCalibration = {
  input: "counts",
  adc: { bits: 10, referenceV: 5.0, divisor: "2^N" },
  sensor: { kind: "linear-voltage", scaleMvPerK: 10, offsetV: 0 },
};

/** 10 kΩ NTC (common Steinhart–Hart set, REFERENCE.md §7), low side of a 10 kΩ divider on 3.3 V, 12-bit ADC. */
export const THERMISTOR_12BIT_CALIBRATION: TemperatureCalibration = {
  input: "counts",
  adc: { bits: 12, referenceV: 3.3, divisor: "2^N-1" },
  sensor: {
    kind: "thermistor-divider",
    supplyV: 3.3,
    seriesOhm: 10_000,
    thermistorSide: "low",
    equation: { kind: "steinhart-hart", a: 1.129148e-3, b: 2.34125e-4, c: 8.76741e-8 },
  },
};

export interface RenderOptions {
  /** Turns sample temperatures into the layout's raw unit. */
  calibration: TemperatureCalibration;
  /** UTC instant of elapsedS = 0, epoch milliseconds (clock and ISO time columns). */
  fileStartUtcMs: number;
  /** Written at the top when the layout has a comment prefix. */
  commentLines?: readonly string[];
}

type FieldName = "time" | "altitude" | "latitude" | "longitude" | "temperature" | "pressure" | "humidity";
const FIELD_ORDER: readonly FieldName[] = ["time", "altitude", "latitude", "longitude", "temperature", "pressure", "humidity"];

const DELIMITERS: Record<LoggerLayoutSpec["delimiter"], string> = {
  comma: ",",
  semicolon: ";",
  tab: "\t",
  whitespace: " ",
};

/** Like toFixed, with a chosen decimal separator; integer arithmetic keeps it fast for large files. */
export function formatFixed(value: number, decimals: number, separator: "." | ","): string {
  const scaled = Math.round(Math.abs(value) * 10 ** decimals);
  const sign = value < 0 && scaled !== 0 ? "-" : "";
  if (decimals === 0) return sign + String(scaled);
  const digits = String(scaled).padStart(decimals + 1, "0");
  const cut = digits.length - decimals;
  return `${sign}${digits.slice(0, cut)}${separator}${digits.slice(cut)}`;
}

/**
 * Writes samples as a logger file of the given layout. Header columns come out in a
 * fixed order (time, altitude, lat, lon, temperature, pressure, humidity); headerless
 * layouts are ordered by their column numbers. Null pressure/humidity values leave the cell empty.
 */
export function renderLoggerFile(layout: LoggerLayoutSpec, samples: readonly ProfileSample[], options: RenderOptions): string {
  const delimiter = DELIMITERS[layout.delimiter];
  const decimalComma = layout.decimalSeparator === ",";
  const separator = decimalComma ? "," : ".";
  const num = (value: number, decimals: number): string => formatFixed(value, decimals, separator);
  const columns = layout.columns;

  const present: Array<{ field: FieldName; column: ColumnRef }> = [];
  for (const field of FIELD_ORDER) {
    const spec = columns[field];
    if (spec) present.push({ field, column: spec.column });
  }
  if (!layout.hasHeader) {
    present.sort((x, y) => Number(x.column) - Number(y.column));
  }

  const tempUnit = columns.temperature.unit;
  const formatTemperature = (temperatureK: number): string => {
    const raw = quantizeRawReading(options.calibration, rawReadingForTemperature(options.calibration, temperatureK));
    switch (tempUnit) {
      case "counts":
        return String(raw);
      case "V":
        return num(raw, 4);
      case "mV":
        return num(raw, 1);
      default:
        return num(raw, 2);
    }
  };

  const formatTime = (elapsedS: number): string => {
    const format = columns.time.format;
    if (format === "elapsed-seconds") return Number.isInteger(elapsedS) ? String(elapsedS) : num(elapsedS, 1);
    const iso = new Date(options.fileStartUtcMs + elapsedS * 1000).toISOString();
    if (format === "iso-datetime") return `${iso.slice(0, 19)}Z`;
    return iso.slice(11, 19);
  };

  const cell = (field: FieldName, sample: ProfileSample): string => {
    switch (field) {
      case "time":
        return formatTime(sample.elapsedS);
      case "altitude":
        return columns.altitude?.unit === "ft" ? num(sample.altitudeM / METRES_PER_FOOT, 0) : num(sample.altitudeM, 1);
      case "latitude":
        return num(sample.latitudeDeg, 6);
      case "longitude":
        return num(sample.longitudeDeg, 6);
      case "temperature":
        return formatTemperature(sample.temperatureK);
      case "pressure": {
        if (sample.pressureHpa === null) return "";
        const unit = columns.pressure?.unit;
        return unit === "Pa" ? num(sample.pressureHpa * 100, 0) : num(sample.pressureHpa, 2);
      }
      case "humidity":
        return sample.humidityPct === null ? "" : num(sample.humidityPct, 1);
    }
  };

  const lines: string[] = [];
  if (layout.commentPrefix !== null) {
    for (const comment of options.commentLines ?? []) lines.push(`${layout.commentPrefix} ${comment}`);
  }
  if (layout.hasHeader) lines.push(present.map((p) => String(p.column)).join(delimiter));
  for (const sample of samples) {
    lines.push(present.map((p) => cell(p.field, sample)).join(delimiter));
  }
  lines.push("");
  return lines.join("\n");
}

export interface BenchmarkFile {
  layout: LoggerLayoutSpec;
  calibration: TemperatureCalibration;
  samples: ProfileSample[];
  content: string;
}

/**
 * A long layout-A file for benchmarks: one flight sampled every second, trimmed or
 * padded with post-landing rows to exactly rowCount rows (default 14,400 = 4 h at 1 Hz).
 */
export function generateBenchmarkFile(rowCount = 14_400, seed = 1): BenchmarkFile {
  const rng = createPrng(seed);
  const params: FlightProfileParams = {
    atmosphere: {
      surfaceAltitudeM: 250,
      surfaceTemperatureK: 288,
      lapseRateKPerKm: 6.5,
      tropopauseAltitudeM: 11_500,
      isothermalDepthM: 4_000,
      stratosphereWarmingKPerKm: 1.5,
      surfaceInversion: { depthM: 300, strengthK: 3 },
      elevatedInversion: null,
      surfacePressureHpa: 985,
      surfaceHumidityPct: 70,
      windEastMPerS: 4,
      windNorthMPerS: 1,
      jetEastMPerS: 25,
    },
    latitudeDeg: 45.3,
    longitudeDeg: 7.9,
    ascentRateMPerS: 4.6,
    burstAltitudeM: 33_000,
    descent: { topRateMPerS: 12, landingRateMPerS: 7.5, landingAltitudeM: 300 },
    preLaunchS: 300,
    // Long enough that the padded file always reaches rowCount rows.
    postLandingS: Math.max(600, rowCount),
    sampleIntervalS: 1,
    sensorTimeConstantS: 4,
    sensorNoiseK: 0.2,
    gpsSpikeCount: 2,
    hasPressure: true,
    hasHumidity: true,
  };
  const profile = generateFlightProfile(params, rng.int(0, 2 ** 31));
  const samples = profile.samples.slice(0, rowCount);
  const calibration = LINEAR_10BIT_CALIBRATION;
  const content = renderLoggerFile(COMMA_COUNTS_MET_LAYOUT, samples, {
    calibration,
    fileStartUtcMs: Date.UTC(2024, 5, 1, 6, 0, 0),
    commentLines: ["benchmark flight, synthetic", `surface air ${airTemperatureK(params.atmosphere, 250).toFixed(2)} K`],
  });
  return { layout: COMMA_COUNTS_MET_LAYOUT, calibration, samples, content };
}
