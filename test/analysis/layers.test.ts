import { describe, expect, test } from "vitest";
import { computeBandLapseRate, computePhaseLayers, detectInversions } from "../../lib/analysis/layers";
import { DEFAULT_ANALYSIS_PARAMETERS } from "../../lib/analysis/types";
import { levelsFromProfile, piecewiseProfile } from "../support/synthetic-profiles";

const params = DEFAULT_ANALYSIS_PARAMETERS;

describe("inversions (Kahl 1990 definitions, REFERENCE.md §5)", () => {
  test("surface-based and elevated inversions with strength T(top) − T(base)", () => {
    const pts = [
      [0, 270], [100, 272], [200, 274], [300, 273], [400, 271], [500, 269], [600, 270.5], [700, 272], [800, 271],
    ].map(([altitudeM, temperatureK]) => ({ altitudeM: altitudeM as number, temperatureK: temperatureK as number, pressureHpa: null }));
    const inv = detectInversions(pts, 0, 0.3);
    expect(inv).toHaveLength(2);
    expect(inv[0]).toMatchObject({ surfaceBased: true, baseM: 0, topM: 200, strengthK: 4 });
    expect(inv[1]).toMatchObject({ surfaceBased: false, baseM: 500, topM: 700, strengthK: 3 });
  });

  test("layers separated by a thin non-inversion stretch merge; weak ones are dropped", () => {
    // [P] merge gaps ≤ 100 m (REFERENCE.md §5)
    const pts = [[0, 270], [100, 271], [200, 272], [300, 271.8], [400, 273], [500, 272], [600, 271], [700, 271.2]]
      .map(([altitudeM, temperatureK]) => ({ altitudeM: altitudeM as number, temperatureK: temperatureK as number, pressureHpa: null }));
    const inv = detectInversions(pts, 100, 0.3);
    expect(inv).toHaveLength(1);
    expect(inv[0]).toMatchObject({ baseM: 0, topM: 400, strengthK: 3 });
  });
});

describe("band lapse rate", () => {
  const f = piecewiseProfile([[0, 290], [10000, 225]]); // 6.5 K/km
  const levels = levelsFromProfile(f, 0, 10000);

  test("a covered band gives its lapse rate", () => {
    const r = computeBandLapseRate(levels, 2000, 5000);
    expect(r.layer?.lapseRateKPerKm).toBeCloseTo(6.5, 9); // [D] linear profile
    expect(r.layer?.rSquared).toBeCloseTo(1, 9);
    expect(r.layer?.kind).toBe("band");
  });

  test("uncovered bands return null with a reason", () => {
    expect(computeBandLapseRate(levels, 8000, 15000)).toMatchObject({ layer: null, reason: expect.stringMatching(/up to/) });
    expect(computeBandLapseRate(levels.filter((l) => l.altitudeM > 3000), 2000, 5000)).toMatchObject({ layer: null, reason: expect.stringMatching(/down to/) });
    expect(computeBandLapseRate(levels.filter((l) => l.altitudeM < 3000 || l.altitudeM > 3500), 2000, 5000).reason).toMatch(/gap/);
    expect(computeBandLapseRate(levels, 5000, 4000).layer).toBeNull();
  });

  test("a band starting below ground is not covered above sea level; above ground level it starts at the ground", () => {
    const elevated = levelsFromProfile(f, 600, 10000);
    // MSL 0–2000 m at a 600 m site: the levels start 650 m above the band base (more than one bin).
    expect(computeBandLapseRate(elevated, 0, 2000).reason).toMatch(/down to 0 m/);
    expect(computeBandLapseRate(elevated, 0, 2000, { reference: "msl", groundElevationM: 600 }).layer).toBeNull();
    const r = computeBandLapseRate(elevated, 0, 2000, { reference: "agl", groundElevationM: 600 });
    expect(r.layer).toMatchObject({ baseM: 600, topM: 2600, fittedBaseM: 650, fittedTopM: 2550, band: { baseM: 0, topM: 2000, reference: "agl", groundElevationM: 600 } });
    expect(r.layer?.lapseRateKPerKm).toBeCloseTo(6.5, 9); // [D] linear profile
    expect(computeBandLapseRate(elevated, 0, 2000, { reference: "agl" }).reason).toMatch(/ground elevation is unknown/);
  });
});

describe("fixed bands at a 1,600 m site (issue 12)", () => {
  // [D] a linear 6.5 K/km profile binned in 100 m steps from the ground at 1,600 m
  const f = piecewiseProfile([[0, 290], [12000, 212]]);
  const levels = levelsFromProfile(f, 1600, 12000);
  const layersWith = (fixedBandsM: Parameters<typeof computePhaseLayers>[0]["fixedBandsM"]) =>
    computePhaseLayers({
      phase: "ascent", levels, surface: { altitudeM: 1600, temperatureK: f(1600), pressureHpa: null }, tropopause: { status: "not-found" },
      fixedBandsM, groundElevationM: 1600, binSizeM: 100, inversionMergeGapM: 100, inversionMinStrengthK: 0.3,
    }).layers.filter((l) => l.kind === "band");

  test("0–2000 m AGL is fitted over 1600–3600 m MSL from 20 levels and says so", () => {
    const [band] = layersWith([{ baseM: 0, topM: 2000, reference: "agl" }]);
    expect(band).toMatchObject({ baseM: 1600, topM: 3600, fittedBaseM: 1650, fittedTopM: 3550, levelCount: 20 });
    expect(band?.band).toEqual({ baseM: 0, topM: 2000, reference: "agl", groundElevationM: 1600 });
    expect(band?.lapseRateKPerKm).toBeCloseTo(6.5, 9);
  });

  test("0–2000 m MSL there is not covered (the levels start 1,650 m above its base), so no layer", () => {
    expect(layersWith([{ baseM: 0, topM: 2000, reference: "msl" }])).toEqual([]);
    expect(computeBandLapseRate(levels, 0, 2000, { reference: "msl", groundElevationM: 1600 }).reason).toMatch(/does not reach down to 0 m .*lowest level 1650 m/);
  });

  test("2000–5000 m MSL is covered from 2050 m and keeps its limits", () => {
    const [band] = layersWith([{ baseM: 2000, topM: 5000, reference: "msl" }]);
    expect(band).toMatchObject({ baseM: 2000, topM: 5000, fittedBaseM: 2050, fittedTopM: 4950, levelCount: 30, band: { reference: "msl", groundElevationM: null } });
  });

  test("the default bands: 0–2 km above ground, 2–5 and 5–10 km above sea level", () => {
    expect(params.fixedBandsM).toEqual([
      { baseM: 0, topM: 2000, reference: "agl" },
      { baseM: 2000, topM: 5000, reference: "msl" },
      { baseM: 5000, topM: 10000, reference: "msl" },
    ]);
    expect(layersWith(params.fixedBandsM).map((l) => [l.baseM, l.topM])).toEqual([[1600, 3600], [2000, 5000], [5000, 10000]]);
  });

  test("non-band layers carry no band and the range they were fitted over", () => {
    const all = computePhaseLayers({
      phase: "ascent", levels, surface: { altitudeM: 1600, temperatureK: f(1600), pressureHpa: null }, tropopause: { status: "not-found" },
      fixedBandsM: [], groundElevationM: 1600, binSizeM: 100, inversionMergeGapM: 100, inversionMinStrengthK: 0.3,
    }).layers;
    const trop = all.find((l) => l.kind === "troposphere");
    expect(trop).toMatchObject({ band: null, fittedBaseM: 1600, fittedTopM: 11950 });
  });
});

describe("phase layers", () => {
  test("stability, adiabatic rates and standard-atmosphere pressure flags", () => {
    const f = piecewiseProfile([[0, 290], [11000, 218.5], [20000, 218.5]]);
    const res = computePhaseLayers({
      phase: "ascent",
      levels: levelsFromProfile(f, 0, 20000),
      surface: null,
      tropopause: { status: "found", altitudeM: 11000, temperatureK: 218.5, pressureHpa: null },
      fixedBandsM: params.fixedBandsM,
      groundElevationM: 0,
      binSizeM: 100,
      inversionMergeGapM: 100,
      inversionMinStrengthK: 0.3,
    });
    const trop = res.layers.find((l) => l.kind === "troposphere");
    expect(trop?.lapseRateKPerKm).toBeCloseTo(6.5, 6);
    expect(trop?.dryAdiabaticLapseRateKPerKm).toBeCloseTo(9.768, 3); // REFERENCE.md §3 [D] g0/1004
    expect(trop?.pressureFromStandardAtmosphere).toBe(true);
    expect(trop?.stability).toBe(trop && trop.lapseRateKPerKm > trop.moistAdiabaticLapseRateKPerKm ? "conditionally-unstable" : "absolutely-stable");
    const strat = res.layers.find((l) => l.kind === "stratosphere");
    expect(strat?.lapseRateKPerKm).toBeCloseTo(0, 6);
    expect(strat?.stability).toBe("absolutely-stable");
    expect(res.layers.filter((l) => l.kind === "band")).toHaveLength(3);
    expect(res.surfaceInversion).toBeNull();
  });

  test("without a tropopause the troposphere runs to the top with a warning", () => {
    const f = piecewiseProfile([[0, 290], [8000, 238]]);
    const res = computePhaseLayers({
      phase: "ascent", levels: levelsFromProfile(f, 0, 8000), surface: null, tropopause: { status: "not-found" },
      fixedBandsM: [], groundElevationM: 0, binSizeM: 100, inversionMergeGapM: 100, inversionMinStrengthK: 0.3,
    });
    expect(res.warnings.map((w) => w.code)).toContain("troposphere-to-top");
    expect(res.layers.find((l) => l.kind === "troposphere")?.topM).toBeCloseTo(7950, 6);
  });

  test("an undetermined tropopause: the warming stratosphere above the candidate is not an elevated inversion", () => {
    // [D] 6.5 K/km to 11 km, then warming at 2 K/km to 20 km (a stratosphere, not an inversion layer);
    // the tropopause search is undetermined (a gap in its window), candidate at 11 km.
    const f = piecewiseProfile([[0, 288.15], [11000, 216.65], [20000, 234.65]]);
    const res = computePhaseLayers({
      phase: "ascent", levels: levelsFromProfile(f, 0, 20000), surface: null,
      tropopause: { status: "undetermined", reason: "a data gap", candidateAltitudeM: 11000 },
      fixedBandsM: [], groundElevationM: null, binSizeM: 100, inversionMergeGapM: 100, inversionMinStrengthK: 0.3,
    });
    expect(res.layers.filter((l) => l.kind === "elevated-inversion")).toEqual([]);
    expect(res.layers.filter((l) => l.kind === "stratosphere")).toEqual([]);
    expect(res.layers.find((l) => l.kind === "troposphere")?.lapseRateKPerKm).toBeCloseTo(6.5, 6);
  });
});
