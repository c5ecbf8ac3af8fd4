import { describe, expect, test } from "vitest";
import type { TemperatureCalibration } from "@/lib/analysis/types";
import type { LoggerLayoutSpec } from "@/lib/ingest/layout";
import { parseLoggerFile } from "@/lib/ingest/parse";
import {
  COMMA_COUNTS_MET_LAYOUT,
  LINEAR_10BIT_CALIBRATION,
  SEMICOLON_THERMISTOR_LAYOUT,
  THERMISTOR_12BIT_CALIBRATION,
  formatFixed,
  generateBenchmarkFile,
  renderLoggerFile,
} from "@/seed/demo-files";
import type { ProfileSample } from "@/seed/demo-profiles";
import { forwardTemperatureK } from "./forward-calibration";

const SAMPLES: ProfileSample[] = [
  { elapsedS: 0, altitudeM: 100, trueAltitudeM: 100, temperatureK: 288.15, airTemperatureK: 288.15, pressureHpa: 1001.5, humidityPct: 71.25, latitudeDeg: 45.5, longitudeDeg: -7.25, phase: "ground" },
  { elapsedS: 2, altitudeM: 110.04, trueAltitudeM: 110, temperatureK: 250, airTemperatureK: 250, pressureHpa: null, humidityPct: null, latitudeDeg: 45.500001, longitudeDeg: -7.250002, phase: "ascent" },
];

describe("formatFixed", () => {
  test.each([
    { value: 1.005, decimals: 1, separator: ".", expected: "1.0" },
    { value: -0.04, decimals: 1, separator: ".", expected: "0.0" },
    { value: -12.345, decimals: 2, separator: ",", expected: "-12,35" },
    { value: 0.5, decimals: 3, separator: ".", expected: "0.500" },
    { value: 1234.6, decimals: 0, separator: ".", expected: "1235" },
  ] as const)("$value to $decimals places → $expected", ({ value, decimals, separator, expected }) => {
    expect(formatFixed(value, decimals, separator)).toBe(expected);
  });
});

describe("renderLoggerFile", () => {
  test("layout A: comments, header, elapsed seconds, metres, counts, pressure, humidity", () => {
    const text = renderLoggerFile(COMMA_COUNTS_MET_LAYOUT, SAMPLES, {
      calibration: LINEAR_10BIT_CALIBRATION,
      fileStartUtcMs: Date.UTC(2024, 0, 1),
      commentLines: ["note one"],
    });
    const lines = text.trimEnd().split("\n");
    expect(lines[0]).toBe("# note one");
    expect(lines[1]).toBe("seconds,gps_alt_m,lat_deg,lon_deg,temp_counts,pressure_hpa,humidity_pct");
    // [D] 288.15 K · 10 mV/K = 2.8815 V; 2.8815/5 · 1024 = 590.1 → 590
    expect(lines[2]).toBe("0,100.0,45.500000,-7.250000,590,1001.50,71.3");
    // Missing pressure/humidity leave empty cells; [D] 2.5 V/5 · 1024 = 512
    expect(lines[3]).toBe("2,110.0,45.500001,-7.250002,512,,");
  });

  test("layout B: ISO UTC times, feet, decimal comma, 12-bit thermistor counts", () => {
    const text = renderLoggerFile(SEMICOLON_THERMISTOR_LAYOUT, SAMPLES, {
      calibration: THERMISTOR_12BIT_CALIBRATION,
      fileStartUtcMs: Date.UTC(2024, 0, 1, 6, 30, 0),
      commentLines: ["dropped: this layout has no comment prefix"],
    });
    const lines = text.trimEnd().split("\n");
    expect(lines[0]).toBe("utc_time;altitude_ft;latitude;longitude;thermistor_counts;pressure_hpa");
    const cells = (lines[1] ?? "").split(";");
    // [D] 100 m / 0.3048 = 328.08 ft
    expect(cells.slice(0, 4)).toEqual(["2024-01-01T06:30:00Z", "328", "45,500000", "-7,250000"]);
    expect(forwardTemperatureK(THERMISTOR_12BIT_CALIBRATION, Number(cells[4]))).toBeCloseTo(288.15, 1);
    expect(cells[5]).toBe("1001,50");
    expect(lines[2]?.startsWith("2024-01-01T06:30:02Z;361;")).toBe(true);
  });

  test("headerless tab layout ordered by column number, clock time, volts, pascals", () => {
    const layout: LoggerLayoutSpec = {
      name: "test",
      delimiter: "tab",
      hasHeader: false,
      commentPrefix: null,
      decimalSeparator: ".",
      columns: {
        temperature: { column: 1, unit: "V" },
        time: { column: 2, format: "clock-time" },
        pressure: { column: 3, unit: "Pa" },
      },
    };
    const calibration: TemperatureCalibration = { input: "volts", sensor: { kind: "linear-voltage", scaleMvPerK: 10, offsetV: 0 } };
    const text = renderLoggerFile(layout, SAMPLES.slice(0, 1), { calibration, fileStartUtcMs: Date.UTC(2024, 0, 1, 23, 59, 59) });
    // [D] 288.15 K → 2.8815 V; 1001.5 hPa = 100150 Pa
    expect(text).toBe("2.8815\t23:59:59\t100150\n");
  });
});

describe("benchmark file", () => {
  const bench = generateBenchmarkFile();

  test("14,400 data rows of layout A at 1 Hz", async () => {
    const lines = bench.content.trimEnd().split("\n");
    const dataLines = lines.filter((l) => !l.startsWith("#")).slice(1);
    expect(dataLines).toHaveLength(14_400);
    expect(dataLines[14_399]?.startsWith("14399,")).toBe(true);
    const parsed = await parseLoggerFile(new TextEncoder().encode(bench.content), bench.layout, { fileName: "bench.csv", mode: "strict" });
    expect(parsed.samples).toHaveLength(14_400);
  });

  test("is deterministic and seed-dependent", () => {
    expect(generateBenchmarkFile().content).toBe(bench.content);
    expect(generateBenchmarkFile(14_400, 2).content).not.toBe(bench.content);
    expect(generateBenchmarkFile(500).samples).toHaveLength(500);
  });
});
