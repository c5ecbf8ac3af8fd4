import { describe, expect, test } from "vitest";
import {
  PLANETARY_BODIES,
  bodyDryAdiabaticLapseRateKPerKm,
  marsEngineeringPressureHpa,
  marsEngineeringTemperatureK,
  referenceCurve,
  venusReferenceTemperatureK,
} from "../../lib/analysis/bodies";
import { ituMidLatitudeSummerTemperatureK, ituMidLatitudeWinterTemperatureK } from "../../lib/analysis/reference-profiles";

describe("dry adiabatic lapse rate by body", () => {
  // NASA PDS Atmospheres node, adiabatic lapse rate table (REFERENCE.md §8)
  test.each([
    ["earth", 9.76],
    ["mars", 4.5],
    ["venus", 10.47],
    ["titan", 1.3],
  ] as const)("%s Γd = %f K/km", (id, expected) => {
    expect(bodyDryAdiabaticLapseRateKPerKm(id)).toBeCloseTo(expected, 2);
  });

  test("custom g and cp; Venus near 735 K with cp ≈ 1140", () => {
    expect(bodyDryAdiabaticLapseRateKPerKm({ gravityMPerS2: PLANETARY_BODIES.venus.gravityMPerS2, specificHeatJPerKgK: 1140 })).toBeCloseTo(7.8, 1); // REFERENCE.md §8 [Mem]
    expect(bodyDryAdiabaticLapseRateKPerKm({ gravityMPerS2: 9.8, specificHeatJPerKgK: 0 })).toBeNull();
  });
});

describe("reference curves", () => {
  // Mars engineering model, NASA Glenn Research Center (REFERENCE.md §8): T(°C) = −31 − 0.000998 h below 7000 m
  test("Mars", () => {
    expect(marsEngineeringTemperatureK(0)).toBeCloseTo(-31 + 273.15, 10);
    expect(marsEngineeringTemperatureK(5000)).toBeCloseTo(-31 - 4.99 + 273.15, 10);
    expect(marsEngineeringTemperatureK(10000)).toBeCloseTo(-23.4 - 22.2 + 273.15, 10);
    expect(marsEngineeringPressureHpa(0)).toBeCloseTo(6.99, 10); // 0.699 kPa
  });

  // Venus International Reference Atmosphere, Seiff et al. 1985 (REFERENCE.md §8)
  test.each([
    [0, 735.3],
    [50000, 350.5],
    [70000, 229.8],
    [55000, (350.5 + 262.8) / 2], // [D] linear interpolation
  ])("Venus T(%d m) = %f K", (z, t) => {
    expect(venusReferenceTemperatureK(z)).toBeCloseTo(t, 6);
  });

  test("out of range is null", () => {
    expect(venusReferenceTemperatureK(80000)).toBeNull();
    expect(referenceCurve("venus")?.temperatureAtAltitude(-10)).toBeNull();
    expect(referenceCurve("titan")).toBeNull();
    expect(referenceCurve("earth")?.temperatureAtAltitude(11000)).toBeCloseTo(216.774, 3); // REFERENCE.md §1
  });

  // ITU-R P.835 mid-latitude profiles (REFERENCE.md §6); mean 0–10 km lapse rates 5.93 and 5.38 K/km [D]
  test("ITU-R P.835 summer and winter", () => {
    const s0 = ituMidLatitudeSummerTemperatureK(0) ?? 0;
    const s10 = ituMidLatitudeSummerTemperatureK(10000) ?? 0;
    const w0 = ituMidLatitudeWinterTemperatureK(0) ?? 0;
    const w10 = ituMidLatitudeWinterTemperatureK(10000) ?? 0;
    expect((s0 - s10) / 10).toBeCloseTo(5.93, 2);
    expect((w0 - w10) / 10).toBeCloseTo(5.38, 2);
    expect(ituMidLatitudeSummerTemperatureK(15000)).toBe(215.15);
    expect(ituMidLatitudeWinterTemperatureK(20000)).toBe(218);
    expect(ituMidLatitudeSummerTemperatureK(20000)).toBeNull();
  });
});
