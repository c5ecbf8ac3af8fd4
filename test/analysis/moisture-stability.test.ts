import { describe, expect, test } from "vitest";
import {
  mixingRatioKgPerKg,
  saturationVapourPressureBoltonHpa,
  saturationVapourPressureMagnusHpa,
  virtualTemperatureK,
} from "../../lib/analysis/moisture";
import { classifyStability, dryAdiabaticLapseRateKPerKm, moistAdiabaticLapseRateKPerKm } from "../../lib/analysis/stability";

describe("saturation vapour pressure", () => {
  // Bolton (1980) formula; values REFERENCE.md §3 [D]
  test.each([
    [0, 6.112],
    [20, 23.37],
    [25, 31.67],
  ])("Bolton es(%f °C) = %f hPa", (c, es) => {
    expect(saturationVapourPressureBoltonHpa(c + 273.15)).toBeCloseTo(es, 2);
  });

  test("Magnus (Sonntag 1990) agrees with Bolton within 0.5 % from −40 to 40 °C", () => {
    // [D] both are fits to the same saturation curve; their published forms differ only slightly
    expect(saturationVapourPressureMagnusHpa(273.15)).toBeCloseTo(6.112, 6); // Sonntag 1990 form at 0 °C
    for (let c = -40; c <= 40; c += 5) {
      const b = saturationVapourPressureBoltonHpa(c + 273.15);
      const m = saturationVapourPressureMagnusHpa(c + 273.15);
      expect(Math.abs(m / b - 1)).toBeLessThan(0.005);
    }
  });

  test("mixing ratio and virtual temperature", () => {
    // [D] r = ε e/(p − e) = 0.622·10/990; Tv = T(1 + r/ε)/(1 + r) (AMS Glossary)
    const r = mixingRatioKgPerKg(10, 1000) ?? Number.NaN;
    expect(r).toBeCloseTo((0.622 * 10) / 990, 12);
    expect(virtualTemperatureK(300, r)).toBeCloseTo((300 * (1 + r / 0.622)) / (1 + r), 12);
    expect(virtualTemperatureK(300, 0)).toBe(300);
    expect(mixingRatioKgPerKg(1000, 900)).toBeNull();
  });
});

describe("adiabatic lapse rates", () => {
  // REFERENCE.md §3: Γd = g/cp (AMS Glossary); g = 9.80665 with cp = 1004 → 9.768, cp = 1005 → 9.758 [D]
  test.each([
    [1004, 9.768],
    [1005, 9.758],
  ])("Γd with cp = %d is %f K/km", (cp, expected) => {
    expect(dryAdiabaticLapseRateKPerKm(9.80665, cp)).toBeCloseTo(expected, 3);
  });

  test("Γd is null for non-physical input", () => {
    expect(dryAdiabaticLapseRateKPerKm(9.8, 0)).toBeNull();
    expect(dryAdiabaticLapseRateKPerKm(Number.NaN, 1004)).toBeNull();
  });

  // REFERENCE.md §3 check values [D with Bolton es], AMS Glossary moist-adiabatic lapse rate
  test.each([
    [20, 1000, 4.22],
    [0, 1000, 6.48],
    [0, 700, 5.76],
    [-20, 500, 7.74],
    [-40, 500, 9.31],
    [15, 1013.25, 4.73],
  ])("Γm(%f °C, %f hPa) = %f K/km", (c, p, expected) => {
    expect(moistAdiabaticLapseRateKPerKm(c + 273.15, p)).toBeCloseTo(expected, 2);
  });

  test("Γm falls back to Γd when saturation is impossible (es ≥ p)", () => {
    expect(moistAdiabaticLapseRateKPerKm(380, 50)).toBeCloseTo(9.768, 3); // [D] no saturation possible
  });
});

describe("stability classes", () => {
  // REFERENCE.md §4 (standard texts; FAA-H-8083-28): stable Γe < Γm, conditional Γm < Γe < Γd, absolute Γe > Γd
  test.each([
    [-5, "absolutely-stable"],
    [0, "absolutely-stable"],
    [3, "absolutely-stable"],
    [6.5, "conditionally-unstable"],
    [9.7, "conditionally-unstable"],
    [11, "absolutely-unstable"],
  ] as const)("Γe = %f K/km with Γm = 4, Γd = 9.77 → %s", (gammaE, cls) => {
    expect(classifyStability(gammaE, 9.77, 4)).toBe(cls);
  });
});
