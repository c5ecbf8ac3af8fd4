import { describe, expect, test } from "vitest";
import {
  adcCountsToVolts,
  assertValidCalibration,
  calibrateReading,
  dividerResistanceOhm,
  fitCalibration,
  fitTwoPointCorrection,
  thermistorTemperatureK,
  validateCalibration,
} from "../../lib/analysis/calibration";
import { CalibrationError, type TemperatureCalibration, type ThermistorEquation } from "../../lib/analysis/types";

// Common 10 kΩ NTC Steinhart–Hart set (REFERENCE.md §7 [S])
const SH: ThermistorEquation = { kind: "steinhart-hart", a: 1.129148e-3, b: 2.34125e-4, c: 8.76741e-8 };
const BETA: ThermistorEquation = { kind: "beta", beta: 3950, r0Ohm: 10000, t0K: 298.15 };

const ok = (r: ReturnType<typeof calibrateReading>): number => {
  if (!r.ok) throw new Error(`calibration failed: ${r.reason}`);
  return r.temperatureK;
};

describe("thermistor equations", () => {
  // REFERENCE.md §7: 10 kΩ → 25.00 °C, 32650 Ω → 0.00 °C [D] with the common S–H set
  test.each([
    [10000, 25.0],
    [32650, 0.0],
  ])("Steinhart–Hart R = %d Ω → %f °C", (r, c) => {
    expect((thermistorTemperatureK(r, SH) ?? 0) - 273.15).toBeCloseTo(c, 2);
  });

  // REFERENCE.md §7: beta model, β = 3950: 32650 Ω → 0.55 °C [D]
  test("beta R = 32650 Ω → 0.55 °C; R0 → T0", () => {
    expect((thermistorTemperatureK(32650, BETA) ?? 0) - 273.15).toBeCloseTo(0.55, 2);
    expect(thermistorTemperatureK(10000, BETA)).toBeCloseTo(298.15, 10);
  });

  test("non-positive resistance is null", () => {
    expect(thermistorTemperatureK(0, SH)).toBeNull();
    expect(thermistorTemperatureK(-5, BETA)).toBeNull();
  });
});

describe("ADC and divider", () => {
  // Microchip ADC docs (REFERENCE.md §7): V = counts·Vref/2^N or /(2^N − 1)
  test("both ADC divisors", () => {
    expect(adcCountsToVolts(512, { bits: 10, referenceV: 5, divisor: "2^N" })).toBeCloseTo(2.5, 12);
    expect(adcCountsToVolts(1023, { bits: 10, referenceV: 5, divisor: "2^N-1" })).toBeCloseTo(5, 12);
  });

  test("divider: thermistor on either side", () => {
    // [D] equal resistors split the supply in half on both sides
    expect(dividerResistanceOhm(1.65, 3.3, 10000, "low")).toBeCloseTo(10000, 6);
    expect(dividerResistanceOhm(1.65, 3.3, 10000, "high")).toBeCloseTo(10000, 6);
    // [D] low side: V = Vs·Rt/(Rs + Rt) with Rt = 32650 Ω
    const v = (3.3 * 32650) / (10000 + 32650);
    expect(dividerResistanceOhm(v, 3.3, 10000, "low")).toBeCloseTo(32650, 6);
    expect(dividerResistanceOhm(3.3 - v, 3.3, 10000, "high")).toBeCloseTo(32650, 6);
    expect(dividerResistanceOhm(0, 3.3, 10000, "low")).toBeNull();
    expect(dividerResistanceOhm(3.3, 3.3, 10000, "low")).toBeNull();
  });
});

describe("calibrateReading", () => {
  const lm: TemperatureCalibration = { input: "volts", sensor: { kind: "linear-voltage", scaleMvPerK: 10, offsetV: 0 } };

  // REFERENCE.md §7: 10 mV/K sensor, T = V/0.010 V/K; 2.9815 V → 298.15 K [D]
  test("10 mV/K sensor", () => {
    expect(ok(calibrateReading(lm, 2.9815))).toBeCloseTo(298.15, 10);
    expect(ok(calibrateReading({ ...lm, input: "millivolts" }, 2981.5))).toBeCloseTo(298.15, 10);
  });

  test("counts through the ADC to a 10 mV/K sensor", () => {
    // [D] 610 counts · 5 V / 1024 = 2.978515625 V → 297.8515625 K
    const cal: TemperatureCalibration = { ...lm, input: "counts", adc: { bits: 10, referenceV: 5, divisor: "2^N" } };
    expect(ok(calibrateReading(cal, 610))).toBeCloseTo(297.8515625, 10);
  });

  test("thermistor divider from counts", () => {
    const cal: TemperatureCalibration = {
      input: "counts",
      adc: { bits: 12, referenceV: 3.3, divisor: "2^N-1" },
      sensor: { kind: "thermistor-divider", supplyV: 3.3, seriesOhm: 10000, thermistorSide: "low", equation: SH },
    };
    // [D] equal resistors → half scale → R = 10 kΩ → 25 °C
    expect(ok(calibrateReading(cal, 4095 / 2)) - 273.15).toBeCloseTo(25, 2);
    expect(calibrateReading(cal, 0)).toEqual({ ok: false, reason: "divider-out-of-range" });
    expect(calibrateReading(cal, 4095)).toEqual({ ok: false, reason: "divider-out-of-range" });
  });

  test("direct columns and the field correction", () => {
    // [D] unit definitions: 0 °C = 273.15 K, 32 °F = 0 °C, 212 °F = 100 °C
    expect(ok(calibrateReading({ input: "celsius", sensor: { kind: "direct" } }, 0))).toBeCloseTo(273.15, 12);
    expect(ok(calibrateReading({ input: "fahrenheit", sensor: { kind: "direct" } }, 212))).toBeCloseTo(373.15, 10);
    expect(ok(calibrateReading({ input: "kelvin", sensor: { kind: "direct" }, correction: { gain: 1.01, offsetK: -2 } }, 300))).toBeCloseTo(301, 10);
  });

  test("polynomial in the raw reading", () => {
    // [D] T = 200 + 0.1·x + 0.001·x² at x = 100 → 220
    expect(ok(calibrateReading({ input: "counts", sensor: { kind: "polynomial", coefficients: [200, 0.1, 0.001] } }, 100))).toBeCloseTo(220, 10);
  });

  test("failures are typed, never NaN", () => {
    expect(calibrateReading(lm, Number.NaN)).toEqual({ ok: false, reason: "non-finite-reading" });
    expect(calibrateReading({ input: "celsius", sensor: { kind: "direct" } }, -300)).toEqual({ ok: false, reason: "non-physical-result" });
  });
});

describe("validateCalibration", () => {
  test.each([
    ["zero scale", { input: "volts", sensor: { kind: "linear-voltage", scaleMvPerK: 0, offsetV: 0 } }, "sensor.scaleMvPerK"],
    ["counts without ADC", { input: "counts", sensor: { kind: "linear-voltage", scaleMvPerK: 10, offsetV: 0 } }, "adc"],
    ["ADC bits 0", { input: "counts", adc: { bits: 0, referenceV: 5, divisor: "2^N" }, sensor: { kind: "linear-voltage", scaleMvPerK: 10, offsetV: 0 } }, "adc.bits"],
    ["negative series resistance", { input: "volts", sensor: { kind: "thermistor-divider", supplyV: 3.3, seriesOhm: -1, thermistorSide: "low", equation: SH } }, "sensor.seriesOhm"],
    ["beta ≤ 0", { input: "volts", sensor: { kind: "thermistor-divider", supplyV: 3.3, seriesOhm: 1e4, thermistorSide: "low", equation: { ...BETA, beta: 0 } } }, "sensor.equation.beta"],
    ["direct on volts", { input: "volts", sensor: { kind: "direct" } }, "input"],
    ["constant polynomial", { input: "counts", sensor: { kind: "polynomial", coefficients: [250] } }, "sensor.coefficients"],
    ["zero gain", { input: "kelvin", sensor: { kind: "direct" }, correction: { gain: 0, offsetK: 0 } }, "correction.gain"],
  ] as Array<[string, TemperatureCalibration, string]>)("%s", (_name, cal, field) => {
    const issues = validateCalibration(cal);
    expect(issues.map((i) => i.field)).toContain(field);
    expect(() => assertValidCalibration(cal)).toThrow(CalibrationError);
  });

  test("valid calibrations have no issues", () => {
    expect(validateCalibration({ input: "kelvin", sensor: { kind: "direct" } })).toEqual([]);
    expect(validateCalibration({ input: "counts", adc: { bits: 10, referenceV: 5, divisor: "2^N" }, sensor: { kind: "linear-voltage", scaleMvPerK: 10, offsetV: 0 } })).toEqual([]);
  });

  test("CalibrationError carries code and field", () => {
    try {
      assertValidCalibration({ input: "volts", sensor: { kind: "linear-voltage", scaleMvPerK: 0, offsetV: 0 } });
    } catch (e) {
      expect(e).toBeInstanceOf(CalibrationError);
      expect((e as CalibrationError).code).toBe("invalid-parameter");
      expect((e as CalibrationError).field).toBe("sensor.scaleMvPerK");
    }
  });
});

describe("fitting", () => {
  test("two-point correction is exact for two pairs and an offset for one", () => {
    // [D] measured 270→273.15, 300→303.45: gain = 30.3/30 = 1.01, offset = 273.15 − 1.01·270 = 0.45
    const fit = fitTwoPointCorrection([
      { measuredK: 270, referenceK: 273.15 },
      { measuredK: 300, referenceK: 303.45 },
    ]);
    expect(fit.gain).toBeCloseTo(1.01, 10);
    expect(fit.offsetK).toBeCloseTo(0.45, 8);
    expect(fitTwoPointCorrection([{ measuredK: 290, referenceK: 291.5 }])).toEqual({ gain: 1, offsetK: 1.5 });
    expect(() => fitTwoPointCorrection([])).toThrow(CalibrationError);
    expect(() => fitTwoPointCorrection([{ measuredK: 290, referenceK: 291 }, { measuredK: 290, referenceK: 292 }])).toThrow(CalibrationError);
  });

  const divider = (equation: ThermistorEquation): TemperatureCalibration => ({
    input: "volts",
    sensor: { kind: "thermistor-divider", supplyV: 3.3, seriesOhm: 10000, thermistorSide: "high", equation },
  });

  test("Steinhart–Hart coefficients are recovered from exact points", () => {
    const truth = divider(SH);
    const points = [0.4, 0.9, 1.5, 2.1, 2.8].map((v) => ({ raw: v, temperatureK: ok(calibrateReading(truth, v)) }));
    const fit = fitCalibration(divider({ kind: "steinhart-hart", a: 0, b: 1, c: 0 }), points);
    const eq = fit.calibration.sensor.kind === "thermistor-divider" ? fit.calibration.sensor.equation : null;
    expect(eq?.kind).toBe("steinhart-hart");
    if (eq?.kind === "steinhart-hart") {
      expect(eq.a).toBeCloseTo(SH.a, 9); // [D] exact data reproduce the generating coefficients
      expect(eq.b / SH.b).toBeCloseTo(1, 6);
      expect(eq.c / SH.c).toBeCloseTo(1, 3);
    }
    expect(fit.rmsResidualK).toBeLessThan(1e-6);
  });

  test("beta and R0 are recovered with T0 kept", () => {
    const truth = divider(BETA);
    const points = [0.6, 1.2, 1.9, 2.6].map((v) => ({ raw: v, temperatureK: ok(calibrateReading(truth, v)) }));
    const fit = fitCalibration(divider({ kind: "beta", beta: 3000, r0Ohm: 5000, t0K: 298.15 }), points);
    const eq = fit.calibration.sensor.kind === "thermistor-divider" ? fit.calibration.sensor.equation : null;
    if (eq?.kind !== "beta") throw new Error("expected beta");
    expect(eq.beta).toBeCloseTo(3950, 6);
    expect(eq.r0Ohm).toBeCloseTo(10000, 4);
  });

  test("linear-voltage and polynomial fits; residuals reported", () => {
    const lm: TemperatureCalibration = { input: "millivolts", sensor: { kind: "linear-voltage", scaleMvPerK: 10, offsetV: 0 } };
    // [D] a sensor reading 0.02 V high: V = 0.02 + 0.010·T
    const points = [250, 270, 290, 310].map((t) => ({ raw: (0.02 + 0.01 * t) * 1000, temperatureK: t }));
    const fit = fitCalibration(lm, points);
    expect(fit.calibration.sensor).toEqual({ kind: "linear-voltage", scaleMvPerK: expect.closeTo(10, 9), offsetV: expect.closeTo(0.02, 9) });
    expect(fit.residualsK.every((r) => r !== null && Math.abs(r) < 1e-9)).toBe(true);

    const poly = fitCalibration({ input: "counts", sensor: { kind: "polynomial", coefficients: [0, 0, 0] } }, [
      { raw: 0, temperatureK: 200 },
      { raw: 100, temperatureK: 220 },
      { raw: 200, temperatureK: 260 },
      { raw: 300, temperatureK: 320 },
    ]);
    // [D] exact quadratic T = 200 + 0.1x + 0.001x²
    const c = poly.calibration.sensor.kind === "polynomial" ? poly.calibration.sensor.coefficients : [];
    expect(c[0]).toBeCloseTo(200, 8);
    expect(c[1]).toBeCloseTo(0.1, 10);
    expect(c[2]).toBeCloseTo(0.001, 12);
  });

  test("direct sensor fit becomes a correction; too few points throw", () => {
    const fit = fitCalibration({ input: "celsius", sensor: { kind: "direct" } }, [
      { raw: 0, temperatureK: 274.15 },
      { raw: 10, temperatureK: 284.15 },
      { raw: 20, temperatureK: 294.15 },
    ]);
    expect(fit.calibration.correction?.gain).toBeCloseTo(1, 10);
    expect(fit.calibration.correction?.offsetK).toBeCloseTo(1, 8);
    expect(() => fitCalibration({ input: "celsius", sensor: { kind: "direct" } }, [{ raw: 0, temperatureK: 273 }])).toThrow(CalibrationError);
  });
});
