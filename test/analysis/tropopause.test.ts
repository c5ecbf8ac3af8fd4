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

/**
 * Data gaps (logger dropouts) in the WMO search: a gap is never evidence for either answer; levels on
 * both sides of it are. Profiles are generated [D]; the expected outcomes follow from the WMO rule as
 * stated in REFERENCE.md §2, plus the stated assumption that no inversion hides inside a gap [P].
 */
describe("WMO tropopause across data gaps (REFERENCE.md §2)", () => {
  const without = (levels: ReturnType<typeof levelsFromProfile>, fromM: number, toM: number) =>
    levels.filter((l) => l.altitudeM < fromM || l.altitudeM > toM);

  test("1. levels after a gap reject a low candidate, so the search goes on to the real tropopause", () => {
    // [D] 6.5 K/km, a thin isothermal layer 6.0–6.4 km, 6.5 K/km again to 11 km, isothermal to 20 km
    const f = piecewiseProfile([[0, 288.15], [6000, 249.15], [6400, 249.15], [11000, 219.25], [20000, 219.25]]);
    const complete = findTropopauses(levelsFromProfile(f, 0, 20000), 5000).first;
    expect(complete.status === "found" && Math.abs(complete.altitudeM - 11000) < 100).toBe(true);
    const gapped = findTropopauses(without(levelsFromProfile(f, 0, 20000), 6500, 7100), 5000).first;
    if (gapped.status !== "found") throw new Error(`expected found, got ${gapped.status}`);
    expect(gapped.altitudeM).toBeCloseTo(complete.status === "found" ? complete.altitudeM : 0, 6);
  });

  test("2. a second tropopause needs levels in the 1 km above: a gap over 1 km is no evidence of a steep layer", () => {
    // [D] 6.5 K/km to 11 km, isothermal, a 1 K step (5 K/km) at 14.6–14.8 km, isothermal to 22 km; levels
    // 13.2–14.6 km missing. Nothing measured shows a layer steeper than 3 K/km over 1 km above the first.
    const f = piecewiseProfile([[0, 288.15], [11000, 216.65], [14600, 216.65], [14800, 215.65], [22000, 215.65]]);
    const levels = without(levelsFromProfile(f, 0, 22000), 13200, 14600);
    const { first, second } = findTropopauses(levels, 5000);
    expect(first.status === "found" && Math.abs(first.altitudeM - 11000) < 100).toBe(true);
    expect(second.status).not.toBe("found");
    expect(findTropopauses(levelsFromProfile(f, 0, 22000), 5000).second.status).toBe("not-found");
  });

  test("3. a gap that starts inside the 2 km window and ends above it leaves the candidate undetermined", () => {
    const levels = without(levelsFromProfile(standardAtmosphereTemperatureK, 0, 20000), 12600, 13600);
    const { first } = findTropopauses(levels, 5000);
    expect(first.status).toBe("undetermined");
    if (first.status === "undetermined") {
      expect(first.reason).toMatch(/gap/);
      expect(Math.abs((first.candidateAltitudeM ?? 0) - 11050)).toBeLessThan(100);
    }
  });

  test("4. a gap below the candidate that may hide the tropopause is noticed even when a level lies between", () => {
    // [D] 6.5 K/km to 10.8 km (tropopause), isothermal to 11.3 km, 5 K/km to 11.5 km, isothermal to 20 km;
    // levels 10.5–11.3 km are missing, so the first level above the gap (11.35 km) is not a candidate.
    const t0 = 288.15 - 6.5 * 10.8;
    const f = piecewiseProfile([[0, 288.15], [10800, t0], [11300, t0], [11500, t0 - 1], [20000, t0 - 1]]);
    const levels = without(levelsFromProfile(f, 0, 20000), 10500, 11300);
    const { first } = findTropopauses(levels, 5000);
    expect(first.status).toBe("undetermined");
    if (first.status === "undetermined") expect(first.reason).toMatch(/gap/);
  });

  test("a gap in the troposphere that the levels above rule out does not stop the search", () => {
    const levels = without(levelsFromProfile(standardAtmosphereTemperatureK, 0, 20000), 7000, 8500);
    const { first } = findTropopauses(levels, 5000);
    expect(first.status === "found" && Math.abs(first.altitudeM - 11019) < 100).toBe(true); // REFERENCE.md §2 [D]
  });

  test("a gap straddling the tropopause itself stays undetermined", () => {
    const levels = without(levelsFromProfile(standardAtmosphereTemperatureK, 0, 20000), 10500, 11800);
    expect(findTropopauses(levels, 5000).first.status).toBe("undetermined");
  });
});
