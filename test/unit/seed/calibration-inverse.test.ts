import { describe, expect, test } from "vitest";
import type { TemperatureCalibration } from "@/lib/analysis/types";
import { calibrateReading } from "@/lib/analysis/calibration";
import {
  quantizeRawReading,
  rawReadingForTemperature,
  thermistorResistanceOhm,
} from "@/seed/demo-calibration";
import { LINEAR_10BIT_CALIBRATION, THERMISTOR_12BIT_CALIBRATION } from "@/seed/demo-files";
import { generateDemoSetup } from "@/seed/demo-program";
import { forwardTemperatureK } from "./forward-calibration";

const STEINHART_HART_10K = { kind: "steinhart-hart", a: 1.129148e-3, b: 2.34125e-4, c: 8.76741e-8 } as const; // REFERENCE.md §7 [S]

describe("thermistor resistance for a temperature", () => {
  test.each([
    // REFERENCE.md §7 [D]: the common 10 kΩ Steinhart–Hart set gives 10 kΩ → 25.00 °C, 32650 Ω → 0.00 °C
    { temperatureK: 298.15, expectedOhm: 10_000 },
    { temperatureK: 273.15, expectedOhm: 32_650 },
  ])("Steinhart–Hart at $temperatureK K is about $expectedOhm Ω", ({ temperatureK, expectedOhm }) => {
    const resistanceOhm = thermistorResistanceOhm(STEINHART_HART_10K, temperatureK);
    // Two-decimal °C in the source ≈ ±0.005 K ≈ ±0.03 % of R; allow 0.1 %.
    expect(Math.abs(resistanceOhm / expectedOhm - 1)).toBeLessThan(1e-3);
  });

  test("beta model: 32650 Ω reads 0.55 °C with β = 3950, so 0.55 °C maps back near 32650 Ω", () => {
    // REFERENCE.md §7 [D]: β = 3950, R0 = 10 kΩ at 25 °C, 32650 Ω → 0.55 °C
    const resistanceOhm = thermistorResistanceOhm({ kind: "beta", beta: 3950, r0Ohm: 10_000, t0K: 298.15 }, 273.15 + 0.55);
    expect(Math.abs(resistanceOhm / 32_650 - 1)).toBeLessThan(2e-3);
  });
});

describe("raw readings from temperatures", () => {
  test("10 mV/K sensor: 298.15 K is 2.9815 V", () => {
    // REFERENCE.md §7 [D]: T = V / 0.010 V/K; 2.9815 V → 298.15 K
    const cal: TemperatureCalibration = { ...LINEAR_10BIT_CALIBRATION, input: "volts", adc: undefined };
    expect(rawReadingForTemperature(cal, 298.15)).toBeCloseTo(2.9815, 9);
  });

  test("10 mV/K sensor on a 10-bit 5 V ADC (2^N): 298.15 K is 610.6 counts, stored as 611", () => {
    // [D] 2.9815 V / 5.0 V · 1024 = 610.6112 (REFERENCE.md §7 ADC formula with divisor 2^N)
    const raw = rawReadingForTemperature(LINEAR_10BIT_CALIBRATION, 298.15);
    expect(raw).toBeCloseTo((2.9815 / 5) * 1024, 9);
    expect(quantizeRawReading(LINEAR_10BIT_CALIBRATION, raw)).toBe(611);
  });

  test("thermistor on a 12-bit divider (2^N − 1): 25 °C sits at half scale", () => {
    // [D] R = Rs = 10 kΩ at 25 °C, so V = 3.3/2 and counts = 4095/2 (REFERENCE.md §7)
    expect(rawReadingForTemperature(THERMISTOR_12BIT_CALIBRATION, 298.15)).toBeCloseTo(4095 / 2, 0);
  });

  test("a correction is undone: the raw reading encodes (T − offsetK)/gain", () => {
    const corrected: TemperatureCalibration = { ...LINEAR_10BIT_CALIBRATION, correction: { gain: 1.01, offsetK: -2 } };
    // [D] (250 + 2)/1.01 K → V = T/100 → counts = V/5·1024
    expect(rawReadingForTemperature(corrected, 250)).toBeCloseTo((((250 + 2) / 1.01) / 100 / 5) * 1024, 9);
  });

  test("counts are clipped to the ADC range", () => {
    expect(quantizeRawReading(LINEAR_10BIT_CALIBRATION, 2000)).toBe(1023);
    expect(quantizeRawReading(LINEAR_10BIT_CALIBRATION, -3)).toBe(0);
  });

  test("polynomial calibrations are refused rather than guessed", () => {
    expect(() => rawReadingForTemperature({ input: "counts", sensor: { kind: "polynomial", coefficients: [1, 2] } }, 250)).toThrow();
  });
});

const demoCalibrations = generateDemoSetup().sensors.flatMap((sensor) =>
  sensor.calibrations.map((c) => ({ name: `${sensor.serial} ${c.method} from ${c.validFromUtc}`, spec: c.spec })),
);
// Range of air temperatures a flight meets, surface summer to cold tropopause [P].
const temperaturesK = Array.from({ length: 25 }, (_, i) => 195 + i * 5);

describe.each(demoCalibrations)("round trip through calibration $name", ({ spec }) => {
  test("unrounded raw reading inverts to the intended temperature (formula of REFERENCE.md §7)", () => {
    for (const temperatureK of temperaturesK) {
      const raw = rawReadingForTemperature(spec, temperatureK);
      expect(Math.abs(forwardTemperatureK(spec, raw) - temperatureK)).toBeLessThan(1e-6);
    }
  });

  test("stored counts invert within half a count step, and within 0.1 K where a count is finer than 0.2 K", () => {
    for (const temperatureK of temperaturesK) {
      const counts = quantizeRawReading(spec, rawReadingForTemperature(spec, temperatureK));
      const errorK = Math.abs(forwardTemperatureK(spec, counts) - temperatureK);
      const stepK = Math.abs(forwardTemperatureK(spec, counts + 0.5) - forwardTemperatureK(spec, counts - 0.5));
      expect(errorK).toBeLessThanOrEqual(stepK / 2 + 1e-9);
      if (stepK <= 0.2) expect(errorK).toBeLessThan(0.1);
    }
  });

  test("agrees with the analysis core's calibrateReading", () => {
    for (const temperatureK of temperaturesK) {
      const result = calibrateReading(spec, rawReadingForTemperature(spec, temperatureK));
      expect(result.ok).toBe(true);
      if (result.ok) expect(result.temperatureK).toBeCloseTo(temperatureK, 6);
    }
  });
});

test("the demo uses both sensor families and corrected calibrations", () => {
  const kinds = new Set(demoCalibrations.map((c) => c.spec.sensor.kind));
  expect(kinds).toEqual(new Set(["linear-voltage", "thermistor-divider"]));
  expect(demoCalibrations.some((c) => c.spec.correction && c.spec.correction.gain !== 1)).toBe(true);
});

describe("field-check reference readings", () => {
  const withReadings = generateDemoSetup().sensors.flatMap((sensor) =>
    sensor.calibrations.map((c) => ({ name: `${sensor.serial} ${c.method}`, calibration: c })),
  );

  test.each(withReadings)("$name: readings map to their bath temperatures", ({ calibration }) => {
    const readings = calibration.referenceReadings ?? [];
    const expectedCount = calibration.method === "two-point field" ? 2 : calibration.method === "one-point field" ? 1 : 0;
    expect(readings).toHaveLength(expectedCount);
    for (const reading of readings) {
      // A 0.005-count rounding of the mean reading is worth < 0.01 K on either sensor [D].
      expect(forwardTemperatureK(calibration.spec, reading.raw)).toBeCloseTo(reading.temperatureK, 2);
    }
  });
});

test.each(
  generateDemoSetup()
    .sensors.flatMap((sensor) => sensor.calibrations.map((c) => ({ name: `${sensor.serial} from ${c.validFromUtc}`, calibration: c })))
    .filter(({ calibration }) => calibration.method === "two-point field"),
)("$name: a two-point fit of the readings gives back the stored correction", ({ calibration }) => {
  const { correction, ...uncorrected } = calibration.spec;
  const [first, second] = calibration.referenceReadings ?? [];
  if (!correction || !first || !second) throw new Error("two-point calibration without correction or readings");
  // [D] straight line through (measured, reference) pairs: T_ref = gain · T_measured + offsetK
  const measured1 = forwardTemperatureK(uncorrected, first.raw);
  const measured2 = forwardTemperatureK(uncorrected, second.raw);
  const gain = (second.temperatureK - first.temperatureK) / (measured2 - measured1);
  const offsetK = first.temperatureK - gain * measured1;
  expect(gain).toBeCloseTo(correction.gain, 3);
  expect(Math.abs(offsetK - correction.offsetK)).toBeLessThan(0.2);
});
