import { describe, expect, test } from "vitest";
import { analyseFlight } from "../../lib/analysis/index";
import { dewPointK, liftingCondensationLevel } from "../../lib/analysis/humidity";
import { KELVIN_DIRECT, SEA_LEVEL_SITE, piecewiseProfile, syntheticFlight } from "../support/synthetic-profiles";
import { assertAllFinite } from "./assert-finite";

// Surface 293.15 K, a dry-adiabatic mixed layer (9.77 K/km) to 1500 m, a 3 K inversion to 1700 m, 6.5 K/km above [D].
const temperatureK = piecewiseProfile([
  [0, 293.15],
  [1500, 293.15 - 14.65],
  [1700, 293.15 - 11.65],
  [12000, 293.15 - 11.65 - 66.95],
]);
// 50 % at the ground, a 95 % cloud layer 2000–2600 m, 30 % above [D]
const rh = (z: number) => (z < 2000 ? 50 : z <= 2600 ? 95 : 30);

describe("analyseFlight humidity, freezing level and mixed layer (REFERENCE.md §14–§19)", () => {
  const samples = syntheticFlight({ temperatureAtAltitudeK: temperatureK, topM: 12000, withPressure: true, relativeHumidityAtAltitudePct: rh, seed: 7 });
  const a = analyseFlight({ samples, calibration: KELVIN_DIRECT, site: SEA_LEVEL_SITE });
  const s = a.summary;

  test("surface dew point and LCL follow Bolton (REFERENCE.md §14, §15)", () => {
    expect(a.ok).toBe(true);
    // 20 °C, 50 % → Td 9.27 °C [D] (REFERENCE.md §14); the surface point averages the lowest 20 m
    expect(Math.abs((s.surfaceDewPointK as number) - 282.42)).toBeLessThan(0.1);
    const lcl = liftingCondensationLevel(s.surfaceTemperatureK as number, dewPointK(s.surfaceTemperatureK as number, 50) as number);
    expect(s.lclAltitudeM).toBeCloseTo(lcl!.heightM, 0);
    expect(Math.abs((s.lclAltitudeM as number) - 1341)).toBeLessThan(30); // Bolton eq. 15 check ≈ 1341 m (REFERENCE.md §15)
  });

  test("one saturated layer near 2000–2600 m; precipitable water positive and plausible", () => {
    expect(s.saturatedLayerCount).toBe(1);
    expect(Math.abs((s.lowestSaturatedLayerBaseM as number) - 2050)).toBeLessThan(100);
    // a mid-latitude column with 50 % near the ground: between 5 and 40 mm [P]
    expect(s.precipitableWaterMm as number).toBeGreaterThan(5);
    expect(s.precipitableWaterMm as number).toBeLessThan(40);
  });

  test("freezing level and mixed-layer heights (REFERENCE.md §18, §19)", () => {
    // 0 °C: 281.5 K at 1700 m, 6.5 K/km → 1700 + 8.35/6.5 km ≈ 2984.6 m [D]
    expect(Math.abs((s.freezingLevelAltitudeM as number) - 2984.6)).toBeLessThan(60);
    expect(s.freezingLevelCount).toBe(1);
    // θ nearly constant to 1500 m, then the inversion: parcel height just above 1500 m [D]
    expect(s.mixedLayerHeightM as number).toBeGreaterThan(1450);
    expect(s.mixedLayerHeightM as number).toBeLessThan(1650);
    expect(s.mixedLayerHeightGradientM as number).toBeGreaterThan(1450);
    expect(s.mixedLayerHeightGradientM as number).toBeLessThan(1750);
    expect(a.qc.flags).not.toContain("standard-atmosphere-pressure");
    assertAllFinite(a);
  });

  test("without pressure and humidity: humidity metrics null, mixed layer from standard pressure, flagged", () => {
    const dry = analyseFlight({ samples: syntheticFlight({ temperatureAtAltitudeK: temperatureK, topM: 12000, seed: 7 }), calibration: KELVIN_DIRECT, site: SEA_LEVEL_SITE });
    expect(dry.summary.surfaceDewPointK).toBeNull();
    expect(dry.summary.lclAltitudeM).toBeNull();
    expect(dry.summary.precipitableWaterMm).toBeNull();
    expect(dry.summary.saturatedLayerCount).toBeNull();
    expect(dry.summary.mixedLayerHeightM as number).toBeGreaterThan(1400);
    expect(dry.qc.flags).toContain("standard-atmosphere-pressure");
  });
});
