import { describe, expect, test } from "vitest";
import {
  describeCalibration, describeLayer, formatCelsius, formatKm, formatKmValue, formatLapseRate, formatLocalDateTime, formatLocalHour, formatStdErr, formatUtc,
} from "@/app/_lib/format";

describe("display formatting", () => {
  test.each([
    // 0 °C = 273.15 K by definition of the Celsius scale (SI Brochure, 9th ed., 2.3.1)
    [273.15, "0.0 °C"],
    [216.65, "-56.5 °C"], // U.S. Standard Atmosphere 1976, tropopause temperature 216.65 K
    [288.15, "15.0 °C"], // U.S. Standard Atmosphere 1976, sea-level temperature 288.15 K
    [273.1, "0.0 °C"], // [D] −0.05 °C rounds to 0.0 without a minus sign
    [null, "—"],
  ])("formatCelsius(%s) = %s", (kelvin, expected) => {
    expect(formatCelsius(kelvin)).toBe(expected);
  });

  test("altitudes in km, with and without the unit", () => {
    expect(formatKm(11019)).toBe("11.02 km"); // [D] 11019 m / 1000 to 2 decimals
    expect(formatKmValue(32165.85, 1)).toBe("32.2");
    expect(formatKm(null)).toBe("—");
  });

  test("lapse rate with its standard error keeps small errors visible", () => {
    expect(formatLapseRate(6.5, 0.12)).toBe("6.50 ± 0.12 K/km");
    expect(formatLapseRate(5.46, 0.0024)).toBe("5.46 ± 0.0024 K/km"); // [D] < 0.01 gets 4 decimals
    expect(formatStdErr(0.047)).toBe("0.047");
    expect(formatLapseRate(null)).toBe("—");
  });

  test("UTC and site-local times", () => {
    expect(formatUtc("2025-07-14T06:30:00.000Z")).toBe("2025-07-14 06:30 UTC");
    // Europe/Berlin is UTC+2 in July (CEST), Australia/Sydney UTC+10 in July (AEST) [P]
    expect(formatLocalDateTime("2025-07-14T06:30:00.000Z", "Europe/Berlin")).toBe("2025-07-14 08:30");
    expect(formatLocalDateTime("2025-07-14T20:30:00.000Z", "Australia/Sydney")).toBe("2025-07-15 06:30");
    expect(formatLocalDateTime("2025-07-14T06:30:00.000Z", "Not/AZone")).toBe("—");
  });

  test.each([
    [9.75, "09:45"],
    [0, "00:00"],
    [23.999, "00:00"], // [D] rounds to 24:00, shown as midnight
    [null, "—"],
  ])("formatLocalHour(%s) = %s", (hour, expected) => {
    expect(formatLocalHour(hour)).toBe(expected);
  });

  test("calibration in words", () => {
    const text = describeCalibration({ input: "counts", adc: { bits: 10, referenceV: 5, divisor: "2^N" }, sensor: { kind: "linear-voltage", scaleMvPerK: 10, offsetV: 0 } });
    expect(text).toBe("raw counts → 10-bit ADC (5 V reference, ÷2^N) → linear sensor 10 mV/K, offset 0 V");
    expect(describeCalibration({ input: "celsius", sensor: { kind: "direct" } })).toBe("°C → read directly");
    expect(describeCalibration(null)).toBe("—");
  });
});

describe("describeLayer", () => {
  test("a band says the limits it was asked in and their reference; other layers only their kind", () => {
    expect(describeLayer({ kind: "band", bandReference: "agl", bandBaseM: 0, bandTopM: 2000, groundElevationM: 1610 })).toBe("Fixed band 0–2000 m AGL (ground 1610 m MSL)");
    expect(describeLayer({ kind: "band", bandReference: "msl", bandBaseM: 2000, bandTopM: 5000, groundElevationM: null })).toBe("Fixed band 2000–5000 m MSL");
    expect(describeLayer({ kind: "troposphere", bandReference: null, bandBaseM: null, bandTopM: null, groundElevationM: null })).toBe("Troposphere");
  });
});
