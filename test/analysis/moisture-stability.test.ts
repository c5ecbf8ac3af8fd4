import { describe, expect, test } from "vitest";
import {
  mixingRatioKgPerKg,
  saturationVapourPressureBoltonHpa,
  saturationVapourPressureMagnusHpa,
  virtualTemperatureK,
} from "../../lib/analysis/moisture";
import { classifyStability, dryAdiabaticLapseRateKPerKm, moistAdiabaticLapseRateKPerKm, pseudoAdiabatTemperaturesK } from "../../lib/analysis/stability";

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
  test.each([[Number.NaN, 9.77, 4], [Number.POSITIVE_INFINITY, 9.77, 4], [6.5, 9.77, Number.NaN]])(
    "a lapse rate or adiabat that is not a number gets no class (Γe = %f, Γd = %f, Γm = %f)",
    (gammaE, gammaD, gammaM) => {
      expect(classifyStability(gammaE, gammaD, gammaM)).toBeNull();
    },
  );
});

/**
 * Equivalent potential temperature, K, of saturated air at T (K) and p (hPa): Bolton (1980),
 * Mon. Wea. Rev. 108, eq. 43, with T_L = T for saturated air and r in g/kg. Transcribed from memory.
 */
function equivalentPotentialTemperatureBoltonK(temperatureK: number, pressureHpa: number): number {
  const es = saturationVapourPressureBoltonHpa(temperatureK);
  const r = (1000 * 0.622 * es) / (pressureHpa - es);
  const theta = temperatureK * (1000 / pressureHpa) ** (0.2854 * (1 - 0.28e-3 * r));
  return theta * Math.exp((3.376 / temperatureK - 0.00254) * r * (1 + 0.81e-3 * r));
}

describe("saturated adiabat (pseudo-adiabat)", () => {
  const pressures = [950, 850, 700, 500, 400, 300, 250, 200];

  // θe is conserved along a pseudo-adiabat (Bolton 1980). Our Γm (AMS Glossary form) leaves out the
  // heat capacity of the condensed water, so the match is close but not exact: within 1 K for
  // parcels starting at 20 °C or colder [D: measured 0.6 K at most], within 3 K from 30 °C.
  test.each([
    [-10, 1],
    [0, 1],
    [10, 1],
    [20, 1],
    [30, 3],
  ])("from %f °C at 1000 hPa, θe stays within %f K up to 200 hPa", (startC, toleranceK) => {
    const start = equivalentPotentialTemperatureBoltonK(startC + 273.15, 1000);
    const temperatures = pseudoAdiabatTemperaturesK(startC + 273.15, 1000, pressures);
    for (const [i, p] of pressures.entries()) {
      const t = temperatures[i] as number;
      expect(Number.isFinite(t)).toBe(true);
      expect(Math.abs(equivalentPotentialTemperatureBoltonK(t, p) - start)).toBeLessThan(toleranceK);
    }
  });

  test("its first metres fall at Γm (20 °C, 1000 hPa → 4.22 K/km, REFERENCE.md §3)", () => {
    const [t] = pseudoAdiabatTemperaturesK(293.15, 1000, [999]);
    // Hypsometric thickness of 1000 → 999 hPa at the layer's mean temperature (AMS Glossary) [D]
    const meanK = (293.15 + (t as number)) / 2;
    const thicknessKm = ((287.04 * meanK) / 9.80665) * Math.log(1000 / 999) / 1000;
    expect((293.15 - (t as number)) / thicknessKm).toBeCloseTo(4.22, 2);
  });

  test("cools monotonically, faster than Γm near the ground and towards Γd aloft", () => {
    const temperatures = pseudoAdiabatTemperaturesK(293.15, 1000, pressures);
    expect(temperatures.every((t, i) => i === 0 || t < (temperatures[i - 1] as number))).toBe(true);
    // [D] cold air holds little vapour: between 250 and 200 hPa the curve runs within 3 % of the dry adiabat (θ constant)
    const t250 = temperatures[6] as number;
    const dry200 = t250 * (200 / 250) ** (287.04 / 1004);
    expect(Math.abs((temperatures[7] as number) - dry200)).toBeLessThan(0.03 * (t250 - dry200));
  });

  test("answers in the order asked, ignores pressures above the start, NaN for bad input", () => {
    const [a, b, c] = pseudoAdiabatTemperaturesK(283.15, 900, [500, 1000, 700]);
    const [d, e] = pseudoAdiabatTemperaturesK(283.15, 900, [700, 500]);
    expect(a).toBe(e);
    expect(c).toBe(d);
    expect(b).toBeNaN();
    expect(pseudoAdiabatTemperaturesK(Number.NaN, 900, [800])).toEqual([Number.NaN]);
  });
});
