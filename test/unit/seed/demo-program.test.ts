import { DateTime, IANAZone } from "luxon";
import { findLocalSunrise } from "@/lib/analysis/launch-time";
import { describe, expect, test } from "vitest";
import { generateDemoProgram, type DemoProgram } from "@/seed/demo-program";
import { forwardTemperatureK } from "./forward-calibration";
import { readLoggerText } from "./logger-file-reader";

// CPU time, not wall time, so that a busy test machine does not fail the speed check.
const cpuBefore = process.cpuUsage();
const program = generateDemoProgram();
const cpuUsedMs = process.cpuUsage(cpuBefore).user / 1000;
const decoder = new TextDecoder();

type Flight = DemoProgram["flights"][number];

function siteOf(flight: Flight) {
  const site = program.sites.find((s) => s.key === flight.siteKey);
  if (!site) throw new Error(`flight ${flight.key} has unknown site`);
  return site;
}

function localLaunch(flight: Flight): DateTime {
  return DateTime.fromISO(flight.launchAtUtc, { zone: siteOf(flight).timeZone });
}

function hoursAfterSunrise(flight: Flight): number {
  const site = siteOf(flight);
  const noon = localLaunch(flight).set({ hour: 12, minute: 0 });
  const sunriseMs = findLocalSunrise(noon, site.latitudeDeg, site.longitudeDeg).sunriseUtc?.getTime() ?? Number.NaN;
  return (Date.parse(flight.launchAtUtc) - sunriseMs) / 3_600_000;
}

/** Meteorological season of a local month, hemisphere-aware (DJF is summer in the south) [P]. */
function seasonOf(month: number, latitudeDeg: number): string {
  const north = ["DJF", "DJF", "MAM", "MAM", "MAM", "JJA", "JJA", "JJA", "SON", "SON", "SON", "DJF"][month - 1] ?? "?";
  if (latitudeDeg >= 0) return north;
  return ({ DJF: "summer", MAM: "autumn", JJA: "winter", SON: "spring" } as const)[north as "DJF"] ?? "?";
}

function calibrationAt(flight: Flight) {
  const sensor = program.sensors.find((s) => s.key === flight.sensorKey);
  if (!sensor) throw new Error(`flight ${flight.key} has unknown sensor`);
  const launchMs = Date.parse(flight.launchAtUtc);
  const valid = sensor.calibrations.filter(
    (c) => Date.parse(c.validFromUtc) <= launchMs && (c.validToUtc === null || launchMs < Date.parse(c.validToUtc)),
  );
  return { sensor, valid };
}

function mean(values: readonly number[]): number {
  return values.reduce((sum, v) => sum + v, 0) / values.length;
}

describe("determinism", () => {
  test("the same seed gives identical structures and identical file bytes", () => {
    const again = generateDemoProgram();
    expect(again.flights.map((f) => f.key)).toEqual(program.flights.map((f) => f.key));
    const differing = again.flights.filter(
      (flight, i) => !Buffer.from(flight.content).equals(Buffer.from(program.flights[i]?.content ?? new Uint8Array())),
    );
    expect(differing.map((f) => f.key)).toEqual([]);
    // Deep equality of everything but the bytes (compared above, far faster as buffers).
    const withoutBytes = (p: DemoProgram) => ({ ...p, flights: p.flights.map((f) => ({ ...f, content: f.content.byteLength })) });
    expect(withoutBytes(again)).toEqual(withoutBytes(program));
  }, 60_000);

  test("another seed gives other flights", () => {
    const other = generateDemoProgram(99);
    expect(other.flights.map((f) => f.launchAtUtc)).not.toEqual(program.flights.map((f) => f.launchAtUtc));
  }, 60_000);
});

describe("size and speed", () => {
  test("generation is fast and the archive stays small", () => {
    // Brief: all flights well under 5 s, total under 40 MB.
    expect(cpuUsedMs).toBeLessThan(5_000);
    const totalBytes = program.flights.reduce((sum, f) => sum + f.content.byteLength, 0);
    expect(totalBytes).toBeLessThan(40_000_000);
  });
});

describe("the invented program", () => {
  test("at least 3 schools, 5 sites (one southern, valid IANA zones), 2 layouts, 120 flights", () => {
    expect(program.schools.length).toBeGreaterThanOrEqual(3);
    expect(program.sites.length).toBeGreaterThanOrEqual(5);
    expect(program.sites.some((s) => s.latitudeDeg < -30)).toBe(true);
    expect(program.sites.every((s) => IANAZone.isValidZone(s.timeZone))).toBe(true);
    expect(program.layouts.length).toBeGreaterThanOrEqual(2);
    expect(program.flights.length).toBeGreaterThanOrEqual(120);
  });

  test("keys are unique and every reference points at something of the same school", () => {
    const unique = (keys: string[]) => new Set(keys).size === keys.length;
    expect(unique(program.flights.map((f) => f.key))).toBe(true);
    expect(unique(program.flights.map((f) => `${f.schoolKey}/${f.fileName}`))).toBe(true);
    expect(unique(program.sensors.map((s) => s.serial))).toBe(true);
    for (const flight of program.flights) {
      expect(siteOf(flight).schoolKey).toBe(flight.schoolKey);
      const payload = program.payloads.find((p) => p.key === flight.payloadKey);
      expect(payload?.schoolKey).toBe(flight.schoolKey);
      expect(calibrationAt(flight).sensor.payloadKey).toBe(flight.payloadKey);
      expect(program.layouts.some((l) => l.key === flight.layoutKey)).toBe(true);
    }
  });

  test("each flight's sensor was mounted at launch, and sensors of one payload never overlap", () => {
    for (const flight of program.flights) {
      const { sensor } = calibrationAt(flight);
      expect(sensor.mountedFromUtc <= flight.launchAtUtc).toBe(true);
      if (sensor.mountedToUtc !== null) expect(flight.launchAtUtc < sensor.mountedToUtc).toBe(true);
    }
    for (const payload of program.payloads) {
      const mounts = program.sensors.filter((s) => s.payloadKey === payload.key).sort((a, b) => (a.mountedFromUtc < b.mountedFromUtc ? -1 : 1));
      mounts.slice(1).forEach((next, i) => expect(mounts[i]?.mountedToUtc).toBe(next.mountedFromUtc));
      expect(mounts.at(-1)?.mountedToUtc).toBeNull();
    }
  });

  test("exactly one calibration of the flight's sensor is valid at launch", () => {
    for (const flight of program.flights) expect(calibrationAt(flight).valid).toHaveLength(1);
  });

  test("flights span 2023–2025 and the logger starts 1–5 minutes before launch", () => {
    const years = new Set(program.flights.map((f) => localLaunch(f).year));
    expect([...years].sort()).toEqual([2023, 2024, 2025]);
    for (const flight of program.flights) {
      const leadS = (Date.parse(flight.launchAtUtc) - Date.parse(flight.fileStartUtc)) / 1000;
      expect(leadS).toBeGreaterThanOrEqual(60);
      expect(leadS).toBeLessThanOrEqual(300);
    }
  });

  test("all four seasons at every site, in both hemispheres", () => {
    for (const site of program.sites) {
      const seasons = new Set(
        program.flights.filter((f) => f.siteKey === site.key).map((f) => seasonOf(localLaunch(f).month, site.latitudeDeg)),
      );
      expect(seasons.size).toBe(4);
    }
    const southern = program.flights.filter((f) => siteOf(f).latitudeDeg < 0);
    expect(new Set(southern.map((f) => seasonOf(localLaunch(f).month, -37)))).toEqual(new Set(["summer", "autumn", "winter", "spring"]));
  });

  test("launches run from dawn to afternoon local time", () => {
    const hours = program.flights.map((f) => localLaunch(f).hour);
    const afterSunrise = program.flights.map(hoursAfterSunrise);
    expect(Math.min(...afterSunrise)).toBeGreaterThanOrEqual(-0.6);
    expect(afterSunrise.filter((h) => h < 1).length).toBeGreaterThanOrEqual(20);
    expect(afterSunrise.filter((h) => h > 5).length).toBeGreaterThanOrEqual(20);
    expect(Math.min(...hours)).toBeLessThanOrEqual(6);
    expect(Math.max(...hours)).toBeGreaterThanOrEqual(14);
    expect(Math.max(...hours)).toBeLessThanOrEqual(15);
  });
});

describe("truth follows the intended climatology", () => {
  test("surface inversions only in the first 3 h after sunrise, common at dawn", () => {
    for (const flight of program.flights) {
      if (hoursAfterSunrise(flight) >= 3) expect(flight.truth.surfaceInversionDepthM).toBe(0);
    }
    const dawn = program.flights.filter((f) => hoursAfterSunrise(f) < 1);
    expect(dawn.filter((f) => f.truth.surfaceInversionDepthM > 0).length / dawn.length).toBeGreaterThan(0.6);
  });

  test("northern summer lapse rates exceed late-autumn ones; summer tropopause is higher than winter", () => {
    const north = program.flights.filter((f) => siteOf(f).latitudeDeg > 0);
    const inMonths = (months: number[]) => north.filter((f) => months.includes(localLaunch(f).month));
    const jja = inMonths([6, 7, 8]);
    const octNov = inMonths([10, 11]);
    const djf = inMonths([12, 1, 2]);
    // Brief targets [P]: JJA ≈ 6.8 K/km, Oct–Nov ≈ 5.8 K/km; tropopause summer 12–13 km, winter 10–11 km.
    expect(mean(jja.map((f) => f.truth.lapseRateKPerKm)) - mean(octNov.map((f) => f.truth.lapseRateKPerKm))).toBeGreaterThan(0.6);
    expect(mean(jja.map((f) => f.truth.tropopauseAltitudeM)) - mean(djf.map((f) => f.truth.tropopauseAltitudeM))).toBeGreaterThan(1_000);
  });

  test("bursts at 25–33 km, some flights with descent and some without", () => {
    expect(program.flights.every((f) => f.truth.burstAltitudeM >= 25_000 && f.truth.burstAltitudeM <= 33_000)).toBe(true);
    const withDescent = program.flights.filter((f) => f.truth.hasDescent).length;
    expect(withDescent).toBeGreaterThan(30);
    expect(withDescent).toBeLessThan(program.flights.length - 30);
  });
});

describe("raw files decode back to the truth through the stored calibration", () => {
  test.each(program.flights.filter((_, i) => i % 9 === 0).map((f) => ({ key: f.key, flight: f })))("$key", ({ flight }) => {
    const layout = program.layouts.find((l) => l.key === flight.layoutKey)?.spec;
    if (!layout) throw new Error("unknown layout");
    const calibration = calibrationAt(flight).valid[0]?.spec;
    if (!calibration) throw new Error("no calibration");
    const rows = readLoggerText(decoder.decode(flight.content), layout);

    expect(rows.length).toBeGreaterThan(1_000);
    expect(rows.at(-1)?.timeS ?? Infinity).toBeLessThan(4 * 3600);
    const steps = new Set(rows.slice(1).map((r, i) => r.timeS - (rows[i]?.timeS ?? 0)));
    expect([...steps]).toEqual([2]);
    if (layout.columns.pressure) expect(rows.every((r) => r.pressureHpa !== null && r.pressureHpa > 0)).toBe(true);

    const altitudes = rows.map((r) => r.altitudeM ?? 0);
    const topIndex = altitudes.reduce((best, a, i) => (a > (altitudes[best] ?? 0) && a < flight.truth.burstAltitudeM + 100 ? i : best), 0);
    expect(altitudes[topIndex] ?? 0).toBeGreaterThan(flight.truth.burstAltitudeM - 50);
    expect(altitudes.filter((a) => a > flight.truth.burstAltitudeM + 100).length).toBeLessThanOrEqual(6);

    // Pre-launch rows sit at the surface air temperature; average out the 0.2 K noise.
    const leadRows = (Date.parse(flight.launchAtUtc) - Date.parse(flight.fileStartUtc)) / 2000;
    const groundK = rows.slice(0, leadRows).map((r) => forwardTemperatureK(calibration, r.temperatureRaw));
    expect(Math.abs(mean(groundK) - flight.truth.surfaceTemperatureK)).toBeLessThan(0.5);

    // Isothermal layer just above the tropopause, on the way up; allow half an ADC step
    // (coarse for the thermistor divider in the cold) plus lag and noise.
    const tropopauseM = flight.truth.tropopauseAltitudeM;
    const layer = rows
      .slice(0, topIndex)
      .filter((r) => (r.altitudeM ?? 0) > tropopauseM + 300 && (r.altitudeM ?? 0) < tropopauseM + 2_000);
    const layerK = layer.map((r) => forwardTemperatureK(calibration, r.temperatureRaw));
    const count = Math.round(mean(layer.map((r) => r.temperatureRaw)));
    const stepK = Math.abs(forwardTemperatureK(calibration, count + 1) - forwardTemperatureK(calibration, count));
    expect(Math.abs(mean(layerK) - flight.truth.tropopauseTemperatureK)).toBeLessThan(stepK / 2 + 0.4);
  });
});
