import { describe, expect, test } from "vitest";
import { analyseFlight } from "../../lib/analysis/index";
import type { FlightAnalysis, RawSample, TemperatureCalibration } from "../../lib/analysis/types";
import { KELVIN_DIRECT, SEA_LEVEL_SITE, standardAtmosphereTemperatureK, syntheticFlight } from "../support/synthetic-profiles";
import { assertAllFinite } from "./assert-finite";

const row = (i: number, altitudeM: number | null, rawTemperature: number | null): RawSample => ({
  elapsedS: i, altitudeM, rawTemperature, pressureHpa: null, relativeHumidityPct: null, latitudeDeg: null, longitudeDeg: null, sourceLine: i + 2,
});

const analyse = (samples: RawSample[], calibration: TemperatureCalibration = KELVIN_DIRECT): FlightAnalysis => {
  const a = analyseFlight({ samples, calibration, site: SEA_LEVEL_SITE });
  assertAllFinite(a);
  expect(a.qc.flags).not.toContain("internal-error");
  return a;
};

describe("bad input gives a typed result with warnings, never a throw or NaN", () => {
  test("empty input", () => {
    const a = analyse([]);
    expect(a.ok).toBe(false);
    expect(a.qc.flags).toContain("empty-input");
  });

  test("a few points", () => {
    const a = analyse([row(0, 100, 280), row(1, 105, 280), row(2, 110, 280)]);
    expect(a.ok).toBe(false);
    expect(a.qc.flags).toContain("no-ascent");
    expect(a.qc.warnings.length).toBeGreaterThan(0);
  });

  test("constant altitude (no ascent)", () => {
    const a = analyse(Array.from({ length: 600 }, (_, i) => row(i, 250, 280 + Math.sin(i))));
    expect(a.ok).toBe(false);
    expect(a.qc.flags).toContain("no-ascent");
  });

  test("descent only (logger started at burst) has no ascent to analyse", () => {
    const a = analyse(Array.from({ length: 600 }, (_, i) => row(i, 20000 - i * 20, 220 + i * 0.1)));
    expect(a.ok).toBe(false);
  });

  test("all-NaN columns", () => {
    const a = analyse(Array.from({ length: 100 }, (_, i) => ({ ...row(i, Number.NaN, Number.NaN), elapsedS: i % 2 ? Number.NaN : i })));
    expect(a.ok).toBe(false);
    expect(a.qc.removed.missingValues).toBe(100);
  });

  test("−300 °C (below 0 K), 500 K and 200 km rows are dropped; the flight still analyses", () => {
    const base = syntheticFlight({ temperatureAtAltitudeK: standardAtmosphereTemperatureK, topM: 15000 });
    const samples = base.map((s, i) =>
      i === 500 ? { ...s, rawTemperature: -300 + 273.15 } : i === 600 ? { ...s, rawTemperature: 500 } : i === 800 ? { ...s, altitudeM: 200000 } : s,
    );
    const a = analyse(samples);
    expect(a.ok).toBe(true);
    expect(a.qc.removed.missingValues).toBe(1); // below absolute zero: the reading cannot be converted
    expect(a.qc.removed.outOfRange).toBe(2);
    expect(a.qc.warnings.map((w) => w.code)).toContain("out-of-range");
  });

  test("−300 °C through a celsius calibration fails conversion (below 0 K) and counts as missing", () => {
    const a = analyse([row(0, 0, -300), row(1, 10, 20)], { input: "celsius", sensor: { kind: "direct" } });
    expect(a.qc.removed.missingValues).toBe(1);
    expect(a.ok).toBe(false);
  });

  test("every row out of range", () => {
    const a = analyse(Array.from({ length: 50 }, (_, i) => row(i, 200000 + i, 500)));
    expect(a.ok).toBe(false);
    expect(a.qc.removed.outOfRange).toBe(50);
  });

  test("invalid calibration returns ok: false with a warning instead of throwing", () => {
    const samples = syntheticFlight({ temperatureAtAltitudeK: standardAtmosphereTemperatureK, topM: 5000 });
    const a = analyse(samples, { input: "volts", sensor: { kind: "linear-voltage", scaleMvPerK: 0, offsetV: 0 } });
    expect(a.ok).toBe(false);
    expect(a.qc.flags).toContain("invalid-calibration");
    expect(a.qc.warnings[0]?.message).toMatch(/scaleMvPerK/);
  });

  test("invalid parameters fall back to defaults with a warning", () => {
    const samples = syntheticFlight({ temperatureAtAltitudeK: standardAtmosphereTemperatureK, topM: 5000 });
    const a = analyseFlight({ samples, calibration: KELVIN_DIRECT, site: SEA_LEVEL_SITE, parameters: { binSizeM: 0, hampelThresholdSigmas: Number.NaN } });
    assertAllFinite(a);
    expect(a.parameters.binSizeM).toBe(100);
    expect(a.qc.warnings.filter((w) => w.code === "invalid-parameter")).toHaveLength(2);
  });

  test("readings outside a thermistor divider's range become missing values", () => {
    const cal: TemperatureCalibration = {
      input: "volts",
      sensor: { kind: "thermistor-divider", supplyV: 3.3, seriesOhm: 10000, thermistorSide: "low", equation: { kind: "beta", beta: 3950, r0Ohm: 10000, t0K: 298.15 } },
    };
    const a = analyse([row(0, 0, 5), row(1, 5, -1), row(2, 10, 1.65)], cal);
    expect(a.qc.removed.missingValues).toBe(2);
    expect(a.qc.warnings.map((w) => w.code)).toContain("calibration-failures");
  });
});
