import { describe, expect, test } from "vitest";
import { findTropopauses } from "../../lib/analysis/tropopause";
import { levelsFromProfile, piecewiseProfile, standardAtmosphereTemperatureK } from "../support/synthetic-profiles";

describe("WMO lapse-rate tropopause (REFERENCE.md §2)", () => {
  test("USSA76 ascent: first tropopause near Z ≈ 11.02 km, 216.65 K", () => {
    const levels = levelsFromProfile(standardAtmosphereTemperatureK, 0, 30000);
    const { first, second } = findTropopauses(levels, 5000);
    if (first.status !== "found") throw new Error(`expected found, got ${first.status}`);
    expect(Math.abs(first.altitudeM - 11019)).toBeLessThan(100); // REFERENCE.md §2 [D]: Z ≈ 11.02 km
    expect(first.temperatureK).toBeCloseTo(216.65, 0); // REFERENCE.md §2 [D]
    expect(second.status).toBe("not-found");
  });

  test("input order does not matter", () => {
    const levels = levelsFromProfile(standardAtmosphereTemperatureK, 0, 30000);
    expect(findTropopauses(levels.slice().reverse(), 5000)).toEqual(findTropopauses(levels, 5000));
  });

  test("a second tropopause above a 1 km layer steeper than 3 K/km is found", () => {
    // [D] 6.5 K/km to 11 km, isothermal to 14 km, 5 K/km to 17 km, isothermal to 25 km
    const f = piecewiseProfile([[0, 288.15], [11000, 216.65], [14000, 216.65], [17000, 201.65], [25000, 201.65]]);
    const { first, second } = findTropopauses(levelsFromProfile(f, 0, 25000), 5000);
    expect(first.status === "found" && Math.abs(first.altitudeM - 11000) < 100).toBe(true);
    if (second.status !== "found") throw new Error(`expected a second tropopause, got ${second.status}`);
    expect(Math.abs(second.altitudeM - 17000)).toBeLessThan(100);
  });

  test("a 2 km-window violation rejects a candidate: a thin isothermal layer is not the tropopause", () => {
    // [D] isothermal 8.0–8.5 km, then 6.5 K/km again to 12 km: the 2 km mean above 8 km is > 2 K/km
    const f = piecewiseProfile([[0, 288], [8000, 236], [8500, 236], [12000, 213.25], [20000, 213.25]]);
    const { first } = findTropopauses(levelsFromProfile(f, 0, 20000), 5000);
    expect(first.status === "found" && Math.abs(first.altitudeM - 12000) < 100).toBe(true);
  });

  test("a profile ending inside the 2 km window above a candidate is undetermined", () => {
    const levels = levelsFromProfile(standardAtmosphereTemperatureK, 0, 12000);
    const { first, second } = findTropopauses(levels, 5000);
    expect(first.status).toBe("undetermined");
    if (first.status === "undetermined") {
      expect(first.reason).toMatch(/profile ends/);
      expect(Math.abs((first.candidateAltitudeM ?? 0) - 11050)).toBeLessThan(100);
    }
    expect(second.status).toBe("undetermined");
  });

  test("a data gap inside the window is undetermined", () => {
    const levels = levelsFromProfile(standardAtmosphereTemperatureK, 0, 20000).filter((l) => l.altitudeM < 11500 || l.altitudeM > 12200);
    const { first } = findTropopauses(levels, 5000);
    expect(first.status).toBe("undetermined");
    if (first.status === "undetermined") expect(first.reason).toMatch(/gap/);
  });

  test("the floor keeps a surface isothermal layer from counting; profiles below the tropopause give not-found", () => {
    const f = piecewiseProfile([[0, 280], [3000, 280], [12000, 221.5], [20000, 221.5]]);
    const withFloor = findTropopauses(levelsFromProfile(f, 0, 20000), 5000).first;
    expect(withFloor.status === "found" && Math.abs(withFloor.altitudeM - 12000) < 100).toBe(true);
    const noFloor = findTropopauses(levelsFromProfile(f, 0, 20000), 0).first;
    expect(noFloor.status === "found" && noFloor.altitudeM < 3000).toBe(true);
    expect(findTropopauses(levelsFromProfile(standardAtmosphereTemperatureK, 0, 8000), 5000).first.status).toBe("not-found");
    expect(findTropopauses([], 5000).first.status).toBe("not-found");
  });
});
