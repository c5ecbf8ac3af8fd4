import { describe, expect, test } from "vitest";
import { analyseFlight } from "../../lib/analysis/index";
import { ituMidLatitudeSummerTemperatureK, ituMidLatitudeWinterTemperatureK } from "../../lib/analysis/reference-profiles";
import { computeBandLapseRate } from "../../lib/analysis/layers";
import type { FlightAnalysis, RawSample } from "../../lib/analysis/types";
import {
  KELVIN_DIRECT,
  SEA_LEVEL_SITE,
  piecewiseProfile,
  standardAtmosphereTemperatureK,
  syntheticFlight,
} from "../support/synthetic-profiles";

const run = (samples: RawSample[], elevationM = 0, parameters = {}): FlightAnalysis =>
  analyseFlight({ samples, calibration: KELVIN_DIRECT, site: { ...SEA_LEVEL_SITE, elevationM }, parameters });

describe("synthetic USSA76 ascent 0–30 km, 1 Hz, 5 m/s, 0.2 K noise, GPS spikes", () => {
  const samples = syntheticFlight({
    temperatureAtAltitudeK: standardAtmosphereTemperatureK,
    topM: 30000,
    noiseK: 0.2,
    seed: 20240611,
    withPressure: true,
    descentRateMPerS: 12,
    gpsSpikes: [
      { index: 900, offsetM: 2500 },
      { index: 2400, offsetM: -700 },
      { index: 2401, offsetM: -700 },
      { index: 4100, offsetM: 400 },
    ],
  });
  const a = run(samples);

  test("first tropopause 11.0 ± 0.15 km and tropospheric lapse rate 6.5 ± 0.15 K/km", () => {
    expect(a.ok).toBe(true);
    expect(a.tropopause.first.status).toBe("found");
    expect(Math.abs((a.summary.tropopauseAltitudeM ?? 0) - 11000)).toBeLessThan(150); // REFERENCE.md §2 [D] Z ≈ 11.02 km
    expect(Math.abs((a.summary.troposphericLapseRateKPerKm ?? 0) - 6.5)).toBeLessThan(0.15); // USSA76 gradient, REFERENCE.md §1
    expect(a.summary.tropopauseTemperatureK).toBeCloseTo(216.65, 0); // REFERENCE.md §2 [D]
    expect(a.summary.secondTropopauseAltitudeM).toBeNull();
  });

  test("spikes are removed, flight phases and QC are reported", () => {
    expect(a.qc.removed.gpsJumps).toBeGreaterThanOrEqual(4);
    expect(a.qc.removed.gpsJumps).toBeLessThan(10);
    expect(a.qc.removed.preLaunch).toBeGreaterThanOrEqual(55);
    expect(a.qc.removed.postLanding).toBeGreaterThan(0);
    expect(a.summary.launchElapsedS).toBeCloseTo(60, -1);
    expect(a.summary.burstAltitudeM).toBeCloseTo(30000, 0);
    expect(a.summary.hasDescent).toBe(true);
    expect(a.summary.hasPressure).toBe(true);
    expect(a.summary.hasSurfaceInversion).toBe(false);
    expect(a.summary.surfaceInversionDepthM).toBeNull();
    expect(a.qc.timeOrder).toBe("monotonic");
  });

  test("levels, layers and stratosphere", () => {
    const ascent = a.levels.filter((l) => l.phase === "ascent");
    // [D] 300 full 100 m bins from 0 to 30 km, plus the burst sample itself at exactly 30 000 m
    expect(ascent.length).toBe(301);
    expect(a.levels.some((l) => l.phase === "descent")).toBe(true);
    // [D] USSA76: isothermal 11–20 km, then +1 K/km (geopotential): the stratosphere mean lapse rate is slightly negative
    expect(a.summary.stratosphericLapseRateKPerKm).toBeLessThan(0);
    expect(a.summary.stratosphericLapseRateKPerKm).toBeGreaterThan(-1);
    const band = a.layers.find((l) => l.kind === "band" && l.phase === "ascent" && l.baseM === 2000);
    expect(band?.lapseRateKPerKm).toBeCloseTo(6.5, 1);
    expect(a.layers.every((l) => l.meanPressureHpa > 0 && !l.pressureFromStandardAtmosphere)).toBe(true);
    expect(a.summary.tropopausePressureHpa).toBeCloseTo(226.3, -1); // [D] USSA76 near 11 km (≈ 226 hPa)
  });
});

describe("ITU-R P.835 mid-latitude profiles (REFERENCE.md §6)", () => {
  test.each([
    ["summer", ituMidLatitudeSummerTemperatureK, 17000, 13000, 5.93],
    ["winter", ituMidLatitudeWinterTemperatureK, 25000, 10000, 5.38],
  ] as const)("%s: tropopause near the profile's break and the 0–10 km lapse rate", (_name, profile, topM, tropopauseM, lapse) => {
    const a = run(syntheticFlight({ temperatureAtAltitudeK: (z) => profile(z) ?? Number.NaN, topM, noiseK: 0.2, seed: 11 }));
    expect(a.ok).toBe(true);
    expect(Math.abs((a.summary.tropopauseAltitudeM ?? 0) - tropopauseM)).toBeLessThan(200); // REFERENCE.md §6 [D]
    const ascent = a.levels.filter((l) => l.phase === "ascent");
    const band = computeBandLapseRate(ascent, 0, 10000);
    expect(Math.abs((band.layer?.lapseRateKPerKm ?? 0) - lapse)).toBeLessThan(0.05); // REFERENCE.md §6 [D] mean 0–10 km lapse
  });

  test("summer lapse rate exceeds winter lapse rate below 10 km", () => {
    const s = run(syntheticFlight({ temperatureAtAltitudeK: (z) => ituMidLatitudeSummerTemperatureK(z) ?? Number.NaN, topM: 17000 }));
    const w = run(syntheticFlight({ temperatureAtAltitudeK: (z) => ituMidLatitudeWinterTemperatureK(z) ?? Number.NaN, topM: 25000 }));
    const band = (x: FlightAnalysis) => x.layers.find((l) => l.kind === "band" && l.baseM === 5000)?.lapseRateKPerKm ?? 0;
    expect(band(s)).toBeGreaterThan(band(w));
  });
});

describe("surface inversion", () => {
  test("a 400 m, 5 K surface inversion is recovered within one bin", () => {
    // [D] ground at 300 m: +5 K over 400 m, then 6.5 K/km
    const f = piecewiseProfile([[300, 275], [700, 280], [12000, 280 - 6.5 * 11.3], [20000, 280 - 6.5 * 11.3]]);
    const a = run(syntheticFlight({ temperatureAtAltitudeK: f, groundM: 300, topM: 20000, noiseK: 0.2, seed: 5 }), 300);
    expect(a.summary.hasSurfaceInversion).toBe(true);
    expect(Math.abs((a.summary.surfaceInversionDepthM ?? 0) - 400)).toBeLessThanOrEqual(100);
    // one bin of the inversion's gradient is 5 K · 100/400 = 1.25 K [D]
    expect(Math.abs((a.summary.surfaceInversionStrengthK ?? 0) - 5)).toBeLessThanOrEqual(1.25);
    const inv = a.layers.find((l) => l.kind === "surface-inversion");
    expect(inv?.lapseRateKPerKm).toBeLessThan(0);
    expect(inv?.stability).toBe("absolutely-stable"); // REFERENCE.md §4: inversions are absolutely stable
    const trop = a.layers.find((l) => l.kind === "troposphere" && l.phase === "ascent");
    expect(trop?.baseM).toBeGreaterThanOrEqual(600);
    expect(Math.abs((trop?.lapseRateKPerKm ?? 0) - 6.5)).toBeLessThan(0.15);
  });

  test("an elevated inversion is reported with base, top and strength", () => {
    const f = piecewiseProfile([[0, 288], [2000, 275], [2300, 278], [12000, 278 - 6.5 * 9.7], [18000, 278 - 6.5 * 9.7]]);
    const a = run(syntheticFlight({ temperatureAtAltitudeK: f, topM: 18000, noiseK: 0.1, seed: 9 }));
    const elevated = a.layers.filter((l) => l.kind === "elevated-inversion" && l.phase === "ascent");
    expect(elevated).toHaveLength(1);
    expect(Math.abs((elevated[0]?.baseM ?? 0) - 2000)).toBeLessThanOrEqual(100);
    expect(Math.abs((elevated[0]?.topM ?? 0) - 2300)).toBeLessThanOrEqual(100);
    expect(a.summary.hasSurfaceInversion).toBe(false);
  });
});

describe("second tropopause through the full pipeline", () => {
  test("found above a 3 K/km layer", () => {
    const f = piecewiseProfile([[0, 288.15], [11000, 216.65], [14000, 216.65], [17000, 201.65], [25000, 201.65]]);
    const a = run(syntheticFlight({ temperatureAtAltitudeK: f, topM: 25000, noiseK: 0.2, seed: 3 }));
    expect(Math.abs((a.summary.secondTropopauseAltitudeM ?? 0) - 17000)).toBeLessThan(200); // [D] from the constructed profile
  });
});

describe("sensor lag correction (REFERENCE.md §7)", () => {
  // [D] at 5 m/s through 6.5 K/km the warm bias is τ·w·Γ = 10 · 5 · 0.0065 = 0.325 K
  const samples = syntheticFlight({ temperatureAtAltitudeK: standardAtmosphereTemperatureK, topM: 15000, sensorTimeConstantS: 10, noiseK: 0.05, seed: 8 });
  const meanBias = (a: FlightAnalysis) => {
    const trop = a.levels.filter((l) => l.phase === "ascent" && l.altitudeM > 1000 && l.altitudeM < 10000);
    return trop.reduce((s, l) => s + l.temperatureK - standardAtmosphereTemperatureK(l.altitudeM), 0) / trop.length;
  };

  test("uncorrected ascent is ≈ 0.33 K warm at τ = 10 s", () => {
    expect(meanBias(run(samples))).toBeCloseTo(0.325, 1);
  });

  test("correction removes the bias", () => {
    const corrected = run(samples, 0, { lagCorrection: { enabled: true, timeConstantS: 10 } });
    expect(Math.abs(meanBias(corrected))).toBeLessThan(0.05);
    expect(corrected.qc.flags).toContain("lag-corrected");
  });
});

describe("altitude from pressure when GPS is missing", () => {
  test("hypsometric altitudes reproduce the flight", () => {
    const samples = syntheticFlight({ temperatureAtAltitudeK: standardAtmosphereTemperatureK, topM: 20000, withPressure: true, noiseK: 0.1, seed: 4 })
      .map((s) => ({ ...s, altitudeM: null }));
    const a = run(samples);
    expect(a.ok).toBe(true);
    expect(a.qc.flags).toContain("altitude-from-pressure");
    expect(Math.abs((a.summary.burstAltitudeM ?? 0) - 20000)).toBeLessThan(30); // [D] hydrostatic consistency
    expect(Math.abs((a.summary.tropopauseAltitudeM ?? 0) - 11000)).toBeLessThan(150);
  });
});

describe("row order", () => {
  test("shuffled rows give the same analysis, flagged as sorted", () => {
    const samples = syntheticFlight({ temperatureAtAltitudeK: standardAtmosphereTemperatureK, topM: 15000, noiseK: 0.2, seed: 12 });
    const shuffled = samples.slice();
    for (let i = shuffled.length - 1; i > 0; i--) {
      const j = (i * 7919 + 13) % (i + 1);
      [shuffled[i], shuffled[j]] = [shuffled[j] as RawSample, shuffled[i] as RawSample];
    }
    const a = run(samples);
    const b = run(shuffled);
    expect(b.qc.timeOrder).toBe("sorted");
    expect(b.qc.flags).toContain("sorted-times");
    expect(b.levels).toEqual(a.levels);
    expect(b.layers).toEqual(a.layers);
    expect(b.summary).toEqual(a.summary);
    expect(b.tropopause).toEqual(a.tropopause);
  });

  test("duplicate times keep the row with the lowest source line", () => {
    const samples = syntheticFlight({ temperatureAtAltitudeK: standardAtmosphereTemperatureK, topM: 5000 });
    const dup = [...samples, { ...(samples[100] as RawSample), rawTemperature: 999, sourceLine: 99999 }];
    const a = run(dup);
    expect(a.qc.removed.duplicateTimes).toBe(1);
    expect(a.samples.some((s) => s.temperatureK === 999)).toBe(false);
  });
});

describe("lowest measured altitude", () => {
  test("minAltitudeM is the lowest altitude measured after launch, not the base of the lowest bin", () => {
    // [D] ground at 1,637 m: the lowest 100 m bin starts at 1,600 m, but nothing was measured below 1,637 m
    const samples = syntheticFlight({ temperatureAtAltitudeK: (z) => 288.15 - 0.0065 * z, groundM: 1637, topM: 12000, descentRateMPerS: 0 });
    const a = run(samples, 1637);
    expect(a.ok).toBe(true);
    const measured = samples.map((x) => x.altitudeM).filter((z): z is number => z !== null && Number.isFinite(z));
    expect(a.summary.minAltitudeM).toBeCloseTo(Math.min(...measured), 6);
    expect(a.summary.minAltitudeM).toBeGreaterThanOrEqual(1637);
  });
});

describe("fixed bands through the whole analysis at a 1,600 m site (issue 12)", () => {
  // [D] a linear 6.5 K/km profile, launched from the site's ground at 1,600 m, 100 m bins
  const profile = piecewiseProfile([[0, 290], [20000, 160]]);
  const a = run(syntheticFlight({ temperatureAtAltitudeK: profile, groundM: 1600, topM: 12000 }), 1600, {
    fixedBandsM: [{ baseM: 0, topM: 2000, reference: "agl" }, { baseM: 0, topM: 2000, reference: "msl" }],
  });

  test("0–2000 m AGL is fitted over 1600–3600 m MSL; the same band above sea level is not covered", () => {
    expect(a.ok).toBe(true);
    expect(a.summary.groundElevationM).toBe(1600);
    const bands = a.layers.filter((l) => l.kind === "band" && l.phase === "ascent");
    expect(bands).toHaveLength(1);
    const band = bands[0];
    expect(band?.band).toEqual({ baseM: 0, topM: 2000, reference: "agl", groundElevationM: 1600 });
    expect(band).toMatchObject({ baseM: 1600, topM: 3600 });
    expect(band?.fittedBaseM).toBeGreaterThanOrEqual(1600);
    expect(band?.fittedBaseM).toBeLessThan(1700);
    expect(band?.fittedTopM).toBeGreaterThan(3500);
    expect(band?.levelCount).toBe(20);
    expect(band?.lapseRateKPerKm).toBeCloseTo(6.5, 3);
  });
});
