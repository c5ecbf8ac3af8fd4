import { describe, expect, test } from "vitest";
import {
  geometricToGeopotentialM,
  geopotentialToGeometricM,
  pressureAltitudeM,
  standardAtmosphereAltitudeForPressureM,
  standardAtmosphereAt,
  standardAtmosphereAtGeopotential,
  standardAtmosphereLayerBases,
} from "../../lib/analysis/standard-atmosphere";
import { USSA76_SPECIFIC_GAS_CONSTANT_J_PER_KG_K } from "../../lib/analysis/constants";

describe("USSA76 constants", () => {
  test("R = R*/M0", () => {
    expect(USSA76_SPECIFIC_GAS_CONSTANT_J_PER_KG_K).toBeCloseTo(287.053, 3); // REFERENCE.md §1 [D] from R* = 8.31432, M0 = 28.9644
  });
});

describe("layer base values chained from p0 reproduce the published table", () => {
  // U.S. Standard Atmosphere 1976, table 4 (REFERENCE.md §1 layer table)
  test.each([
    [0, 288.15, 101325],
    [11000, 216.65, 22632.1],
    [20000, 216.65, 5474.89],
    [32000, 228.65, 868.019],
    [47000, 270.65, 110.906],
    [51000, 270.65, 66.9389],
    [71000, 214.65, 3.95642],
  ])("H = %d m: %f K, %f Pa", (h, temperatureK, pressurePa) => {
    const base = standardAtmosphereLayerBases().find((b) => b.baseGeopotentialM === h);
    expect(base).toBeDefined();
    expect(base?.temperatureK).toBeCloseTo(temperatureK, 6);
    // The table prints 6 significant figures, i.e. a rounding of up to 5e-6 relative.
    expect(Math.abs((base?.pressurePa ?? 0) / pressurePa - 1)).toBeLessThan(5e-6);
  });
});

describe("check values", () => {
  // REFERENCE.md §1 check values [D, agree with the published USSA76 tables]
  test.each([
    ["geopotential", 5000, 255.65, 54019.9],
    ["geopotential", 10000, 223.15, 26436.3],
    ["geometric", 11000, 216.774, 22700.0],
    ["geometric", 20000, 216.65, 5529.3],
  ])("%s %d m → %f K, %f Pa", (kind, altitudeM, temperatureK, pressurePa) => {
    const s = kind === "geometric" ? standardAtmosphereAt(altitudeM) : standardAtmosphereAtGeopotential(altitudeM);
    expect(s).not.toBeNull();
    expect(s?.temperatureK).toBeCloseTo(temperatureK, 3);
    expect(s?.pressurePa).toBeCloseTo(pressurePa, 0);
    expect(s?.pressureHpa).toBeCloseTo(pressurePa / 100, 2);
  });

  // REFERENCE.md §1 pressure altitudes [D]
  test.each([
    [500, 5574.4, 0.1],
    [226.32, 11000, 0.5],
    [100, 16180, 1],
  ])("pressure altitude of %f hPa is %f m", (pressureHpa, altitudeM, tolerance) => {
    expect(Math.abs((pressureAltitudeM(pressureHpa) ?? Number.NaN) - altitudeM)).toBeLessThan(tolerance);
  });

  test("pressure altitude inverts the model in every layer", () => {
    for (const h of [-2000, 0, 3000, 11000, 15000, 25000, 40000, 49000, 60000, 80000]) {
      const p = standardAtmosphereAtGeopotential(h)?.pressureHpa ?? Number.NaN;
      expect(pressureAltitudeM(p)).toBeCloseTo(h, 3); // [D] round trip
    }
  });

  test("geometric/geopotential conversion round-trips and matches Z = 11 km → H ≈ 10981 m", () => {
    expect(geometricToGeopotentialM(11000)).toBeCloseTo(10981.0, 0); // [D] H = r0 Z/(r0 + Z), r0 = 6356.766 km
    for (const z of [0, 1234.5, 30000, 86000]) expect(geopotentialToGeometricM(geometricToGeopotentialM(z))).toBeCloseTo(z, 6);
    expect(standardAtmosphereAltitudeForPressureM(standardAtmosphereAt(30000)?.pressureHpa ?? 0)).toBeCloseTo(30000, 3);
  });

  test("outside the model: null, never NaN", () => {
    expect(standardAtmosphereAt(90000)).toBeNull();
    expect(standardAtmosphereAt(Number.NaN)).toBeNull();
    expect(pressureAltitudeM(0)).toBeNull();
    expect(pressureAltitudeM(-5)).toBeNull();
    expect(pressureAltitudeM(1e-6)).toBeNull();
  });
});
