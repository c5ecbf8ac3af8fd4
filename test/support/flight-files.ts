import { COMMA_COUNTS_LAYOUT, COMMA_COUNTS_MET_LAYOUT, LINEAR_10BIT_CALIBRATION, renderLoggerFile } from "../../seed/demo-files.ts";
import { generateFlightProfile, type FlightProfileParams } from "../../seed/demo-profiles.ts";
import type { Db } from "../../lib/db/index.ts";
import { createCalibration, createLayout, createPayload, createSchool, createSensor, createSite } from "../../lib/ingest/index.ts";

/**
 * Invented flight (fixture data, not a real sounding): layout A, 10 mV/K sensor on a 10-bit ADC;
 * with `withPressure`, layout A with its pressure and humidity board (COMMA_COUNTS_MET_LAYOUT).
 */
export function makeFlightFile(options: { seed?: number; burstAltitudeM?: number; tropopauseAltitudeM?: number; withPressure?: boolean; preLaunchS?: number } = {}) {
  const params: FlightProfileParams = {
    atmosphere: {
      surfaceAltitudeM: 200, surfaceTemperatureK: 290, lapseRateKPerKm: 6.5,
      tropopauseAltitudeM: options.tropopauseAltitudeM ?? 11_000, isothermalDepthM: 4000, stratosphereWarmingKPerKm: 1,
      surfaceInversion: null, elevatedInversion: null, surfacePressureHpa: 990, surfaceHumidityPct: 60,
      windEastMPerS: 3, windNorthMPerS: 1, jetEastMPerS: 20,
    },
    latitudeDeg: 48.1, longitudeDeg: 9.2, ascentRateMPerS: 5, burstAltitudeM: options.burstAltitudeM ?? 20_000,
    descent: null, preLaunchS: options.preLaunchS ?? 60, postLandingS: 0, sampleIntervalS: 2, sensorTimeConstantS: 1, sensorNoiseK: 0.1,
    gpsSpikeCount: 0, hasPressure: options.withPressure === true, hasHumidity: options.withPressure === true,
  };
  const profile = generateFlightProfile(params, options.seed ?? 7);
  const layout = options.withPressure ? COMMA_COUNTS_MET_LAYOUT : COMMA_COUNTS_LAYOUT;
  const text = renderLoggerFile(layout, profile.samples, { calibration: LINEAR_10BIT_CALIBRATION, fileStartUtcMs: Date.UTC(2024, 6, 10, 6, 0, 0) });
  return { text, layout, bytes: new TextEncoder().encode(text), truth: profile.truth, launchAtUtc: new Date(Date.UTC(2024, 6, 10, 6, 1, 0)) };
}

/** One invented school with a site, payload, sensor + calibration and layout A. */
export async function setUpSchool(db: Db, name = "Test School North") {
  const school = await createSchool(db, { name });
  const site = await createSite(db, { schoolId: school.id, name: "Test Field", latitudeDeg: 48.1, longitudeDeg: 9.2, elevationM: 200, timeZone: "Europe/Berlin" });
  const payload = await createPayload(db, { schoolId: school.id, name: "Box 1" });
  const sensor = await createSensor(db, { schoolId: school.id, serial: "T-001", kind: "10 mV/K voltage sensor", timeConstantS: 1, payloadId: payload.id });
  const calibration = await createCalibration(db, { sensorId: sensor.id, spec: LINEAR_10BIT_CALIBRATION, validFromUtc: new Date("2020-01-01T00:00:00Z"), method: "datasheet" });
  const layout = await createLayout(db, { schoolId: school.id, spec: COMMA_COUNTS_LAYOUT });
  return { school, site, payload, sensor, calibration, layout };
}
