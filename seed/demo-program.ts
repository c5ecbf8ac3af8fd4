/**
 * The demo archive: an invented ballooning program (schools, sites, payloads, sensors,
 * calibrations, logger layouts) and 135 flights over 2023–2025 with their raw logger
 * files. Everything is drawn from a seeded generator, so one seed always yields the
 * same bytes. All names and places are fictional; the physics is plausible, not data.
 */
import { findLocalSunrise } from "../lib/analysis/launch-time.ts";
import { DateTime } from "luxon";
import type { TemperatureCalibration } from "../lib/analysis/types.ts";
import {
  DEMO_LAYOUTS,
  LINEAR_10BIT_CALIBRATION,
  THERMISTOR_12BIT_CALIBRATION,
  renderLoggerFile,
} from "./demo-files.ts";
import {
  drawAtmosphere,
  drawFlightParams,
  generateFlightProfile,
  type FlightTruth,
  type SiteClimate,
} from "./demo-profiles.ts";
import { rawReadingForTemperature } from "./demo-calibration.ts";
import type { LoggerLayoutSpec } from "./demo-types.ts";
import { createPrng, mixSeed, type Prng } from "./prng.ts";

export { generateFlightProfile } from "./demo-profiles.ts";
export { renderLoggerFile, generateBenchmarkFile } from "./demo-files.ts";
export type { LoggerLayoutSpec } from "./demo-types.ts";

export const DEFAULT_DEMO_SEED = 20230415;
export const DEMO_YEARS = [2023, 2024, 2025] as const;
const SAMPLE_INTERVAL_S = 2;

export interface DemoCalibration {
  validFromUtc: string;
  validToUtc: string | null;
  method: string;
  spec: TemperatureCalibration;
  notes: string;
  /** Field-check readings (mean raw reading in the bath, bath temperature); absent for nominal sets. */
  referenceReadings?: Array<{ raw: number; temperatureK: number }>;
}

interface CalibrationDef extends Omit<DemoCalibration, "referenceReadings"> {
  /** Bath or reference temperatures of the field check, K. */
  referenceTemperaturesK: number[];
}

export interface DemoProgram {
  schools: Array<{ key: string; name: string }>;
  sites: Array<{
    key: string;
    schoolKey: string;
    name: string;
    latitudeDeg: number;
    longitudeDeg: number;
    elevationM: number;
    timeZone: string;
  }>;
  layouts: Array<{ key: string; spec: LoggerLayoutSpec }>;
  payloads: Array<{ key: string; schoolKey: string; name: string }>;
  sensors: Array<{
    key: string;
    payloadKey: string;
    serial: string;
    kind: string;
    timeConstantS: number;
    /** When the sensor was fitted to its payload, and when it was replaced (null: still flying). */
    mountedFromUtc: string;
    mountedToUtc: string | null;
    calibrations: DemoCalibration[];
  }>;
  flights: Array<{
    key: string;
    schoolKey: string;
    siteKey: string;
    payloadKey: string;
    sensorKey: string;
    layoutKey: string;
    launchAtUtc: string;
    fileStartUtc: string;
    title: string;
    fileName: string;
    content: Uint8Array;
    truth: FlightTruth;
  }>;
}

const SCHOOLS = [
  { key: "brackenmere", name: "Brackenmere Upper School" },
  { key: "quillon-ridge", name: "Quillon Ridge High School" },
  { key: "southwind-bay", name: "Southwind Bay College" },
];

interface SiteDef {
  key: string;
  schoolKey: string;
  name: string;
  latitudeDeg: number;
  longitudeDeg: number;
  elevationM: number;
  timeZone: string;
  annualMeanK: number;
  annualAmplitudeK: number;
}

const SITES: SiteDef[] = [
  { key: "larchmoor-field", schoolKey: "brackenmere", name: "Larchmoor Field", latitudeDeg: 52.3174, longitudeDeg: 11.6208, elevationM: 95, timeZone: "Europe/Berlin", annualMeanK: 283.0, annualAmplitudeK: 9.0 },
  { key: "otterbeck-meadow", schoolKey: "brackenmere", name: "Otterbeck Meadow", latitudeDeg: 50.8731, longitudeDeg: 12.9406, elevationM: 310, timeZone: "Europe/Berlin", annualMeanK: 282.0, annualAmplitudeK: 9.5 },
  { key: "sagebrush-flats", schoolKey: "quillon-ridge", name: "Sagebrush Flats Pad", latitudeDeg: 39.9214, longitudeDeg: -104.3127, elevationM: 1560, timeZone: "America/Denver", annualMeanK: 284.0, annualAmplitudeK: 11.0 },
  { key: "cinderknoll-pasture", schoolKey: "quillon-ridge", name: "Cinderknoll Pasture", latitudeDeg: 40.6093, longitudeDeg: -105.0218, elevationM: 1610, timeZone: "America/Denver", annualMeanK: 283.0, annualAmplitudeK: 11.5 },
  { key: "wattlegrove-paddock", schoolKey: "southwind-bay", name: "Wattlegrove Paddock", latitudeDeg: -37.4188, longitudeDeg: 144.1835, elevationM: 420, timeZone: "Australia/Melbourne", annualMeanK: 287.5, annualAmplitudeK: 5.5 },
];

interface PayloadDef {
  key: string;
  schoolKey: string;
  name: string;
  layoutKey: string;
}

const PAYLOADS: PayloadDef[] = [
  { key: "heron-gondola", schoolKey: "brackenmere", name: "Heron gondola", layoutKey: "semicolon-thermistor" },
  { key: "wren-gondola", schoolKey: "brackenmere", name: "Wren gondola", layoutKey: "comma-counts-met" },
  { key: "capsule-a", schoolKey: "quillon-ridge", name: "Capsule A", layoutKey: "comma-counts-met" },
  { key: "capsule-b", schoolKey: "quillon-ridge", name: "Capsule B", layoutKey: "semicolon-thermistor" },
  { key: "pod-one", schoolKey: "southwind-bay", name: "Pod One", layoutKey: "comma-counts" },
  { key: "pod-two", schoolKey: "southwind-bay", name: "Pod Two", layoutKey: "comma-counts-met" },
];

interface SensorDef {
  key: string;
  payloadKey: string;
  serial: string;
  kind: "linear-voltage" | "ntc-thermistor";
  timeConstantS: number;
  /** Flown from this instant until the next sensor of the payload takes over. */
  installedUtc: string;
  calibrations: CalibrationDef[];
}

function withCorrection(base: TemperatureCalibration, gain: number, offsetK: number): TemperatureCalibration {
  return { ...base, correction: { gain, offsetK } };
}

const PROGRAM_START_UTC = "2022-10-01T00:00:00Z";

const SENSORS: SensorDef[] = [
  {
    key: "heron-ntc-1", payloadKey: "heron-gondola", serial: "NTC10K-2207-A14", kind: "ntc-thermistor", timeConstantS: 3,
    installedUtc: PROGRAM_START_UTC,
    calibrations: [
      { validFromUtc: PROGRAM_START_UTC, validToUtc: "2023-09-01T00:00:00Z", method: "nominal", spec: THERMISTOR_12BIT_CALIBRATION, notes: "Datasheet Steinhart–Hart set, no field check yet.", referenceTemperaturesK: [] },
      { validFromUtc: "2023-09-01T00:00:00Z", validToUtc: null, method: "two-point field", spec: withCorrection(THERMISTOR_12BIT_CALIBRATION, 1.0075, -1.76), notes: "Ice bath and freezer check against a reference thermometer.", referenceTemperaturesK: [273.15, 255.15] },
    ],
  },
  {
    key: "heron-ntc-2", payloadKey: "heron-gondola", serial: "NTC10K-2405-B02", kind: "ntc-thermistor", timeConstantS: 2.5,
    installedUtc: "2024-07-01T00:00:00Z",
    calibrations: [
      { validFromUtc: "2024-07-01T00:00:00Z", validToUtc: null, method: "two-point field", spec: withCorrection(THERMISTOR_12BIT_CALIBRATION, 0.9962, 1.12), notes: "Replacement bead after a hard landing; checked in ice bath and dry-ice chest.", referenceTemperaturesK: [273.15, 194.65] },
    ],
  },
  {
    key: "wren-lv-1", payloadKey: "wren-gondola", serial: "LV10-23-0117", kind: "linear-voltage", timeConstantS: 6,
    installedUtc: PROGRAM_START_UTC,
    calibrations: [
      { validFromUtc: PROGRAM_START_UTC, validToUtc: "2024-03-15T00:00:00Z", method: "one-point field", spec: withCorrection(LINEAR_10BIT_CALIBRATION, 1, -2.1), notes: "Room-temperature comparison; sensor read 2.1 K high.", referenceTemperaturesK: [294.15] },
      { validFromUtc: "2024-03-15T00:00:00Z", validToUtc: null, method: "two-point field", spec: withCorrection(LINEAR_10BIT_CALIBRATION, 1.012, -5.05), notes: "Ice bath and warm water bath.", referenceTemperaturesK: [273.15, 313.15] },
    ],
  },
  {
    key: "capsule-a-lv-1", payloadKey: "capsule-a", serial: "LV10-22-0871", kind: "linear-voltage", timeConstantS: 7,
    installedUtc: PROGRAM_START_UTC,
    calibrations: [
      { validFromUtc: PROGRAM_START_UTC, validToUtc: null, method: "one-point field", spec: withCorrection(LINEAR_10BIT_CALIBRATION, 1, 1.4), notes: "Compared with the school weather station before the first flight.", referenceTemperaturesK: [288.15] },
    ],
  },
  {
    key: "capsule-b-ntc-1", payloadKey: "capsule-b", serial: "NTC10K-2301-Q07", kind: "ntc-thermistor", timeConstantS: 3,
    installedUtc: PROGRAM_START_UTC,
    calibrations: [
      { validFromUtc: PROGRAM_START_UTC, validToUtc: "2025-01-10T00:00:00Z", method: "nominal", spec: THERMISTOR_12BIT_CALIBRATION, notes: "Datasheet Steinhart–Hart set.", referenceTemperaturesK: [] },
      { validFromUtc: "2025-01-10T00:00:00Z", validToUtc: null, method: "two-point field", spec: withCorrection(THERMISTOR_12BIT_CALIBRATION, 1.004, -0.9), notes: "Ice bath and boiling-point check, corrected for site pressure.", referenceTemperaturesK: [273.15, 368.05] },
    ],
  },
  {
    key: "pod-one-lv-1", payloadKey: "pod-one", serial: "LV10-22-5530", kind: "linear-voltage", timeConstantS: 8,
    installedUtc: PROGRAM_START_UTC,
    calibrations: [
      { validFromUtc: PROGRAM_START_UTC, validToUtc: "2024-10-01T00:00:00Z", method: "one-point field", spec: withCorrection(LINEAR_10BIT_CALIBRATION, 1, -0.8), notes: "Room-temperature comparison.", referenceTemperaturesK: [294.15] },
    ],
  },
  {
    key: "pod-one-lv-2", payloadKey: "pod-one", serial: "LV10-24-6102", kind: "linear-voltage", timeConstantS: 8,
    installedUtc: "2024-10-01T00:00:00Z",
    calibrations: [
      { validFromUtc: "2024-10-01T00:00:00Z", validToUtc: null, method: "two-point field", spec: withCorrection(LINEAR_10BIT_CALIBRATION, 0.994, 1.9), notes: "Replacement sensor; ice bath and warm water bath.", referenceTemperaturesK: [273.15, 313.15] },
    ],
  },
  {
    key: "pod-two-lv-1", payloadKey: "pod-two", serial: "LV10-23-5987", kind: "linear-voltage", timeConstantS: 6,
    installedUtc: PROGRAM_START_UTC,
    calibrations: [
      { validFromUtc: PROGRAM_START_UTC, validToUtc: null, method: "two-point field", spec: withCorrection(LINEAR_10BIT_CALIBRATION, 1.005, -2.6), notes: "Ice bath and warm water bath.", referenceTemperaturesK: [273.15, 313.15] },
    ],
  },
];

const SEASON_MONTHS = [
  [12, 1, 2],
  [3, 4, 5],
  [6, 7, 8],
  [9, 10, 11],
] as const;

type LaunchSlot = "dawn" | "morning" | "afternoon";

interface ScheduledFlight {
  site: SiteDef;
  year: number;
  month: number;
  day: number;
  slot: LaunchSlot;
  seed: number;
}

/** Two months per meteorological season per site-year, plus one day with a dawn and an afternoon flight. */
function scheduleFlights(rng: Prng): ScheduledFlight[] {
  const scheduled: ScheduledFlight[] = [];
  SITES.forEach((site, siteIndex) => {
    for (const year of DEMO_YEARS) {
      const siteYear: ScheduledFlight[] = [];
      for (const months of SEASON_MONTHS) {
        const dropped = rng.int(0, 2);
        months.forEach((month, i) => {
          if (i === dropped) return;
          const slot = rng.pick<LaunchSlot>(["dawn", "dawn", "morning", "afternoon", "afternoon"]);
          siteYear.push({ site, year, month, day: rng.int(1, 28), slot, seed: 0 });
        });
      }
      const paired = rng.pick(siteYear);
      paired.slot = "dawn";
      siteYear.push({ ...paired, slot: "afternoon" });
      siteYear.forEach((flight, i) => {
        flight.seed = mixSeed(mixSeed(siteIndex, year), i);
        scheduled.push(flight);
      });
    }
  });
  return scheduled;
}

function hoursAfterSunriseFor(slot: LaunchSlot, rng: Prng): number {
  switch (slot) {
    case "dawn":
      return rng.uniform(-0.5, 1);
    case "morning":
      return rng.uniform(1, 4);
    case "afternoon":
      return rng.uniform(5, 9.5);
  }
}

function sensorFor(payloadKey: string, atMs: number): SensorDef {
  let chosen: SensorDef | undefined;
  for (const sensor of SENSORS) {
    if (sensor.payloadKey !== payloadKey) continue;
    if (Date.parse(sensor.installedUtc) > atMs) continue;
    if (!chosen || Date.parse(sensor.installedUtc) > Date.parse(chosen.installedUtc)) chosen = sensor;
  }
  if (!chosen) throw new Error(`no sensor on payload ${payloadKey} at ${new Date(atMs).toISOString()}`);
  return chosen;
}

/**
 * Readings the field check would have produced: the raw reading the sensor gives at each
 * bath temperature under the stored calibration (a bath mean, so not rounded to whole counts).
 */
function toDemoCalibration(def: CalibrationDef): DemoCalibration {
  const { referenceTemperaturesK, ...calibration } = def;
  const copy: DemoCalibration = structuredClone(calibration);
  if (referenceTemperaturesK.length > 0) {
    copy.referenceReadings = referenceTemperaturesK.map((temperatureK) => ({
      raw: Math.round(rawReadingForTemperature(def.spec, temperatureK) * 100) / 100,
      temperatureK,
    }));
  }
  return copy;
}

/** Installation time of the next sensor on the same payload, if any. */
function replacementOf(sensorKey: string, payloadKey: string, installedUtc: string): string | null {
  const later = SENSORS.filter((s) => s.payloadKey === payloadKey && s.key !== sensorKey && s.installedUtc > installedUtc)
    .map((s) => s.installedUtc)
    .sort();
  return later[0] ?? null;
}

function calibrationFor(sensor: SensorDef, atMs: number): CalibrationDef {
  const found = sensor.calibrations.find(
    (c) => Date.parse(c.validFromUtc) <= atMs && (c.validToUtc === null || atMs < Date.parse(c.validToUtc)),
  );
  if (!found) throw new Error(`no calibration for sensor ${sensor.key} at ${new Date(atMs).toISOString()}`);
  return found;
}

function layoutSpec(layoutKey: string): LoggerLayoutSpec {
  const layout = DEMO_LAYOUTS.find((l) => l.key === layoutKey);
  if (!layout) throw new Error(`unknown layout ${layoutKey}`);
  return layout.spec;
}

function isoSeconds(ms: number): string {
  return `${new Date(ms).toISOString().slice(0, 19)}Z`;
}

function slotWord(hoursAfterSunrise: number): string {
  if (hoursAfterSunrise < 1.5) return "dawn";
  if (hoursAfterSunrise < 4.5) return "morning";
  if (hoursAfterSunrise < 6.5) return "midday";
  return "afternoon";
}

/**
 * Builds the whole invented program. Deterministic: the same seed returns identical
 * structures and byte-identical files. Flights are sorted by launch time.
 */
export function generateDemoProgram(seed: number = DEFAULT_DEMO_SEED): DemoProgram {
  const root = createPrng(seed);
  const scheduled = scheduleFlights(root.fork(1));
  const encoder = new TextEncoder();

  const flights: DemoProgram["flights"] = scheduled.map((plan) => {
    const rng = root.fork(plan.seed);
    const site = plan.site;
    const localNoon = DateTime.fromObject({ year: plan.year, month: plan.month, day: plan.day, hour: 12 }, { zone: site.timeZone });
    // Demo sites lie well inside the polar circles, so every date has a sunrise; local noon stands in otherwise.
    const sunriseMs = findLocalSunrise(localNoon, site.latitudeDeg, site.longitudeDeg).sunriseUtc?.getTime() ?? localNoon.toMillis();
    const latestMs = localNoon.set({ hour: 15, minute: 45 }).toMillis();
    const wantedMs = sunriseMs + hoursAfterSunriseFor(plan.slot, rng) * 3_600_000;
    // Short winter days: an afternoon launch that would fall after 15:45 moves into early afternoon.
    const earlierMs = latestMs - rng.uniform(0, 2.5) * 3_600_000;
    const launchMs = Math.round((wantedMs > latestMs ? earlierMs : wantedMs) / 60_000) * 60_000;
    const hoursAfterSunrise = (launchMs - sunriseMs) / 3_600_000;

    const payload = rng.pick(PAYLOADS.filter((p) => p.schoolKey === site.schoolKey));
    const sensor = sensorFor(payload.key, launchMs);
    const calibration = calibrationFor(sensor, launchMs);
    const layout = layoutSpec(payload.layoutKey);

    const climate: SiteClimate = {
      latitudeDeg: site.latitudeDeg,
      elevationM: site.elevationM,
      annualMeanK: site.annualMeanK,
      annualAmplitudeK: site.annualAmplitudeK,
    };
    const dayRng = root.fork(mixSeed(SITES.indexOf(site), plan.year * 10_000 + plan.month * 100 + plan.day));
    const atmosphere = drawAtmosphere(
      { climate, month: plan.month, dayOfYear: localNoon.ordinal, hoursAfterSunrise },
      dayRng,
      rng,
    );
    const params = drawFlightParams(
      atmosphere,
      site,
      {
        sensorTimeConstantS: sensor.timeConstantS,
        hasPressure: layout.columns.pressure !== undefined,
        hasHumidity: layout.columns.humidity !== undefined,
        sampleIntervalS: SAMPLE_INTERVAL_S,
      },
      rng,
    );
    const profile = generateFlightProfile(params, rng.int(0, 2 ** 31 - 1));
    const fileStartMs = launchMs - profile.launchElapsedS * 1000;

    const localLaunch = DateTime.fromMillis(launchMs, { zone: site.timeZone });
    const localStamp = localLaunch.toFormat("yyyyMMdd-HHmm");
    const content = renderLoggerFile(layout, profile.samples, {
      calibration: calibration.spec,
      fileStartUtcMs: fileStartMs,
      commentLines: [
        `payload: ${payload.name}`,
        `sensor serial: ${sensor.serial}`,
        `logging started: ${isoSeconds(fileStartMs)}`,
        `sample interval: ${SAMPLE_INTERVAL_S} s`,
      ],
    });
    const extension = layout.delimiter === "semicolon" ? "txt" : "csv";
    return {
      key: `${site.key}-${localStamp}`,
      schoolKey: site.schoolKey,
      siteKey: site.key,
      payloadKey: payload.key,
      sensorKey: sensor.key,
      layoutKey: payload.layoutKey,
      launchAtUtc: isoSeconds(launchMs),
      fileStartUtc: isoSeconds(fileStartMs),
      title: `${site.name}, ${localLaunch.toFormat("d LLL yyyy")}, ${slotWord(hoursAfterSunrise)} launch`,
      fileName: `${payload.key}-${localStamp}.${extension}`,
      content: encoder.encode(content),
      truth: profile.truth,
    };
  });
  flights.sort((a, b) => (a.launchAtUtc < b.launchAtUtc ? -1 : a.launchAtUtc > b.launchAtUtc ? 1 : a.key < b.key ? -1 : 1));

  return { ...generateDemoSetup(), flights };
}

/** Schools, sites, layouts, payloads and sensors of the demo program, without flights (cheap). Fresh copies on every call. */
export function generateDemoSetup(): Omit<DemoProgram, "flights"> {
  return {
    schools: SCHOOLS.map((s) => ({ ...s })),
    sites: SITES.map(({ key, schoolKey, name, latitudeDeg, longitudeDeg, elevationM, timeZone }) => ({
      key, schoolKey, name, latitudeDeg, longitudeDeg, elevationM, timeZone,
    })),
    layouts: DEMO_LAYOUTS.map((l) => ({ key: l.key, spec: structuredClone(l.spec) })),
    payloads: PAYLOADS.map(({ key, schoolKey, name }) => ({ key, schoolKey, name })),
    sensors: SENSORS.map(({ key, payloadKey, serial, kind, timeConstantS, installedUtc, calibrations }) => ({
      key, payloadKey, serial, kind, timeConstantS,
      mountedFromUtc: installedUtc,
      mountedToUtc: replacementOf(key, payloadKey, installedUtc),
      calibrations: calibrations.map(toDemoCalibration),
    })),
  };
}
