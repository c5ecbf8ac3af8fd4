import { describe, expect, test } from "vitest";
import { buildProfileChartData, niceTicks, referenceSlope, saturatedAdiabatCurve, type LayerInput, type LevelInput } from "@/app/_lib/profile-series";
import { pseudoAdiabatTemperaturesK } from "@/lib/analysis/stability";
import { standardAtmosphereAt } from "@/lib/analysis/standard-atmosphere";

// An idealised sounding: 288.15 K at the ground falling 6.5 K/km to 11 km, isothermal above
// (U.S. Standard Atmosphere 1976, layers 0 and 1), binned every 500 m.
function standardLevels(phase: "ascent" | "descent", topM: number): LevelInput[] {
  const levels: LevelInput[] = [];
  for (let z = 250; z <= topM; z += 500) levels.push({ phase, altitudeM: z, temperatureK: 288.15 - 6.5 * (Math.min(z, 11000) / 1000) });
  return levels;
}

const troposphere: LayerInput = {
  kind: "troposphere", phase: "ascent", baseM: 250, topM: 11000, strengthK: null,
  dryAdiabaticLapseRateKPerKm: 9.77,
};
const inversion: LayerInput = { ...troposphere, kind: "surface-inversion", baseM: 100, topM: 400, strengthK: 2.34 };

describe("buildProfileChartData", () => {
  const data = buildProfileChartData(
    [...standardLevels("descent", 15000), ...standardLevels("ascent", 20000)],
    [troposphere, inversion, { ...inversion, phase: "descent" }],
    { tropopauseAltitudeM: 11000, secondTropopauseAltitudeM: null },
  );

  test("ascent bottom-up in °C and km, descent top-down, phases kept apart", () => {
    expect(data.ascent[0]).toEqual({ temperatureC: 13.375, altitudeKm: 0.25 }); // [D] 288.15 − 6.5·0.25 − 273.15
    expect(data.ascent.every((p, i, a) => i === 0 || p.altitudeKm > (a[i - 1]?.altitudeKm ?? -1))).toBe(true);
    expect(data.descent[0]?.altitudeKm).toBe(14.75);
    expect(data.descent.every((p, i, a) => i === 0 || p.altitudeKm < (a[i - 1]?.altitudeKm ?? Infinity))).toBe(true);
  });

  test("only ascent inversions are shaded, with their strength", () => {
    expect(data.inversions).toEqual([{ baseKm: 0.1, topKm: 0.4, label: "surface inversion +2.3 K" }]);
  });

  test("tropopause marker", () => {
    expect(data.tropopauses).toEqual([{ altitudeKm: 11, label: "tropopause 11.00 km" }]);
  });

  test("adiabats start at the lowest ascent level with the stored slopes", () => {
    const dry = data.dryAdiabat;
    expect(dry?.points[0]).toEqual(data.ascent[0]);
    expect(dry?.lapseRateKPerKm).toBe(9.77);
    const [start, end] = dry?.points ?? [];
    // [D] slope of the drawn segment equals Γd; end points are rounded to 0.001 °C and 0.1 m, so 3 decimals
    expect(((start?.temperatureC ?? 0) - (end?.temperatureC ?? 0)) / ((end?.altitudeKm ?? 0) - (start?.altitudeKm ?? 0))).toBeCloseTo(9.77, 3);
  });

  test("the saturated adiabat is a curve from the lowest ascent level, up to the tropopause", () => {
    const points = data.saturatedAdiabat?.points ?? [];
    expect(points[0]).toEqual(data.ascent[0]);
    expect(points.length).toBeGreaterThan(10);
    expect(points[points.length - 1]?.altitudeKm).toBeLessThanOrEqual(11);
    // No measured pressure in these levels: the label says the standard atmosphere's was used.
    expect(data.saturatedAdiabat?.label).toMatch(/^saturated adiabat \(Γm \d\.\d\d K\/km at the start; standard-atmosphere pressure\)$/);
    // [D] Γm grows as the parcel cools: the curve's slope in the top kilometres is steeper than near the ground.
    const slope = (a: number, b: number) => ((points[a]?.temperatureC ?? 0) - (points[b]?.temperatureC ?? 0)) / ((points[b]?.altitudeKm ?? 0) - (points[a]?.altitudeKm ?? 1));
    expect(slope(points.length - 3, points.length - 1)).toBeGreaterThan(slope(0, 2) + 1);
  });

  test("domains enclose the data on round values", () => {
    expect(data.temperatureDomainC).toEqual([-60, 20]); // [D] min −58.35 °C, max 13.4 °C, padded 2 K and rounded to 10
    expect(data.altitudeDomainKm).toEqual([0, 20]);
    expect(data.temperatureTicksC).toEqual([-60, -50, -40, -30, -20, -10, 0, 10, 20]);
  });

  test("no levels gives empty series and no reference lines, never NaN", () => {
    const empty = buildProfileChartData([], [], null);
    expect(empty.ascent).toEqual([]);
    expect(empty.dryAdiabat).toBeNull();
    expect(JSON.stringify(empty)).not.toMatch(/NaN|Infinity|null,null/);
  });

  test("non-finite levels are dropped", () => {
    const d = buildProfileChartData([{ phase: "ascent", altitudeM: Number.NaN, temperatureK: 280 }, { phase: "ascent", altitudeM: 100, temperatureK: 280 }], [], null);
    expect(d.ascent).toHaveLength(1);
  });
});

describe("saturatedAdiabatCurve", () => {
  // Levels of the U.S. Standard Atmosphere 1976 (temperature and pressure from lib/analysis), as if measured.
  const measured: LevelInput[] = [0, 1000, 2000, 3000, 4000, 5000, 6000].map((z) => {
    const state = standardAtmosphereAt(z);
    return { phase: "ascent", altitudeM: z, temperatureK: state?.temperatureK ?? Number.NaN, pressureHpa: (state?.pressurePa ?? Number.NaN) / 100 };
  });

  test("follows the pseudo-adiabat at each level's measured pressure", () => {
    const curve = saturatedAdiabatCurve(measured, 10, -80);
    const expected = pseudoAdiabatTemperaturesK(288.15, 1013.25, measured.map((l) => l.pressureHpa as number));
    expect(curve?.points.map((p) => p.altitudeKm)).toEqual([0, 1, 2, 3, 4, 5, 6]);
    for (const [i, p] of (curve?.points ?? []).entries()) expect(p.temperatureC).toBeCloseTo((expected[i] as number) - 273.15, 3);
    expect(curve?.label).toBe("saturated adiabat (Γm 4.73 K/km at the start)"); // REFERENCE.md §3: Γm(15 °C, 1013.25 hPa) = 4.73
  });

  test("skips a level whose pressure does not fall, stops at the chart's cold edge and at the top", () => {
    const noisy = measured.map((l, i) => (i === 3 ? { ...l, pressureHpa: 900 } : l));
    expect(saturatedAdiabatCurve(noisy, 10, -80)?.points.map((p) => p.altitudeKm)).toEqual([0, 1, 2, 4, 5, 6]);
    expect(saturatedAdiabatCurve(measured, 3, -80)?.points.map((p) => p.altitudeKm)).toEqual([0, 1, 2, 3]);
    const cut = saturatedAdiabatCurve(measured, 10, 0)?.points ?? [];
    expect(cut.every((p) => p.temperatureC >= 0)).toBe(true);
    expect(cut.length).toBeLessThan(7);
    expect(saturatedAdiabatCurve(measured.slice(0, 1), 10, -80)).toBeNull();
  });
});

describe("referenceSlope", () => {
  test("is cut where it leaves the cold edge of the chart", () => {
    // [D] from 10 °C at 0 km falling 10 K/km reaches −40 °C at 5 km, before the 12 km top
    const slope = referenceSlope({ temperatureC: 10, altitudeKm: 0 }, 10, 12, -40, "x");
    expect(slope?.points[1]).toEqual({ temperatureC: -40, altitudeKm: 5 });
  });
  test.each([[0], [-2], [Number.NaN]])("refuses a non-positive or non-finite rate %s", (rate) => {
    expect(referenceSlope({ temperatureC: 10, altitudeKm: 0 }, rate, 12, -40, "x")).toBeNull();
  });
});

describe("niceTicks", () => {
  test.each([
    [-60, 20, [5, 10, 20], [-60, -50, -40, -30, -20, -10, 0, 10, 20]],
    [0, 32, [0.5, 1, 2, 5, 10], [0, 5, 10, 15, 20, 25, 30]],
    [0, 3, [0.5, 1, 2, 5, 10], [0, 0.5, 1, 1.5, 2, 2.5, 3]],
  ])("niceTicks(%s, %s)", (min, max, steps, expected) => {
    expect(niceTicks(min, max, steps)).toEqual(expected);
  });
});
