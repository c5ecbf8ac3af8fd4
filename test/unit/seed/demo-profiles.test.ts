import { describe, expect, test } from "vitest";
import {
  airTemperatureK,
  drawAtmosphere,
  generateFlightProfile,
  northernEquivalentMonth,
  type AtmosphereSpec,
  type FlightProfileParams,
  type ProfileSample,
} from "@/seed/demo-profiles";
import { createPrng } from "@/seed/prng";

const ATMOSPHERE: AtmosphereSpec = {
  surfaceAltitudeM: 200,
  surfaceTemperatureK: 285,
  lapseRateKPerKm: 6.5,
  tropopauseAltitudeM: 11_000,
  isothermalDepthM: 4_000,
  stratosphereWarmingKPerKm: 1.5,
  surfaceInversion: { depthM: 300, strengthK: 4 },
  elevatedInversion: { baseM: 9_000, depthM: 200, strengthK: 2, recoveryDepthM: 800 },
  surfacePressureHpa: 990,
  surfaceHumidityPct: 80,
  windEastMPerS: 5,
  windNorthMPerS: -2,
  jetEastMPerS: 30,
};

const PARAMS: FlightProfileParams = {
  atmosphere: ATMOSPHERE,
  latitudeDeg: 48,
  longitudeDeg: 9,
  ascentRateMPerS: 5,
  burstAltitudeM: 30_000,
  descent: { topRateMPerS: 15, landingRateMPerS: 8, landingAltitudeM: 260 },
  preLaunchS: 180,
  postLandingS: 240,
  sampleIntervalS: 2,
  sensorTimeConstantS: 10,
  sensorNoiseK: 0.2,
  gpsSpikeCount: 3,
  hasPressure: true,
  hasHumidity: true,
};

function mean(values: readonly number[]): number {
  return values.reduce((sum, v) => sum + v, 0) / values.length;
}

describe("air temperature profile", () => {
  test.each([
    // [D] from the spec: constant lapse between inversions, isothermal above the tropopause, then +1.5 K/km
    { name: "troposphere 2–8 km", lowM: 2_000, highM: 8_000, expectedLapseKPerKm: 6.5 },
    { name: "isothermal 11.5–14.5 km", lowM: 11_500, highM: 14_500, expectedLapseKPerKm: 0 },
    { name: "stratosphere 16–26 km", lowM: 16_000, highM: 26_000, expectedLapseKPerKm: -1.5 },
  ])("$name has lapse rate $expectedLapseKPerKm K/km", ({ lowM, highM, expectedLapseKPerKm }) => {
    const lapse = ((airTemperatureK(ATMOSPHERE, lowM) - airTemperatureK(ATMOSPHERE, highM)) / (highM - lowM)) * 1000;
    expect(lapse).toBeCloseTo(expectedLapseKPerKm, 9);
  });

  test("surface inversion: temperature rises by its strength from the ground to its top", () => {
    const surfaceK = airTemperatureK(ATMOSPHERE, 200);
    const topK = airTemperatureK(ATMOSPHERE, 500);
    expect(topK - surfaceK).toBeCloseTo(4, 9);
    expect(airTemperatureK(ATMOSPHERE, 350)).toBeGreaterThan(surfaceK);
    expect(airTemperatureK(ATMOSPHERE, 600)).toBeLessThan(topK);
  });

  test("elevated inversion: +strength across the layer, background line restored above it", () => {
    const riseK = airTemperatureK(ATMOSPHERE, 9_200) - airTemperatureK(ATMOSPHERE, 9_000);
    expect(riseK).toBeCloseTo(2, 9);
    const belowK = airTemperatureK(ATMOSPHERE, 8_000);
    const aboveK = airTemperatureK(ATMOSPHERE, 10_500);
    expect(((belowK - aboveK) / 2.5)).toBeCloseTo(6.5, 9);
  });
});

describe("one simulated flight", () => {
  const profile = generateFlightProfile(PARAMS, 42);
  const samples = profile.samples;
  const byPhase = (phase: ProfileSample["phase"]) => samples.filter((s) => s.phase === phase);
  const ascent = byPhase("ascent");
  const descent = byPhase("descent");

  test("same seed gives the same samples; another seed does not", () => {
    expect(generateFlightProfile(PARAMS, 42)).toEqual(profile);
    expect(generateFlightProfile(PARAMS, 43).samples[10]).not.toEqual(samples[10]);
  });

  test("rows every 2 s, ground rows for preLaunchS, whole flight under 4 h", () => {
    for (let i = 1; i < samples.length; i += 1) {
      expect((samples[i]?.elapsedS ?? 0) - (samples[i - 1]?.elapsedS ?? 0)).toBe(2);
    }
    expect(byPhase("ground").length * 2).toBe(180);
    expect(samples.at(-1)?.elapsedS ?? Infinity).toBeLessThan(4 * 3600);
  });

  test("ascent near 5 m/s up to the burst altitude", () => {
    const first = ascent[0];
    const last = ascent.at(-1);
    if (!first || !last) throw new Error("no ascent");
    const rateMPerS = (last.trueAltitudeM - first.trueAltitudeM) / (last.elapsedS - first.elapsedS);
    expect(rateMPerS).toBeGreaterThan(4.7);
    expect(rateMPerS).toBeLessThan(5.8);
    // Rows are every 2 s, so the highest row is within one second of fall (≤ 15 m) below burst.
    const topM = Math.max(...samples.map((s) => s.trueAltitudeM));
    expect(topM).toBeLessThanOrEqual(30_000);
    expect(topM).toBeGreaterThan(30_000 - 16);
  });

  test("descent is faster than ascent and slows towards the ground; rows continue after landing", () => {
    const rates: number[] = [];
    for (let i = 1; i < descent.length; i += 1) {
      const a = descent[i - 1];
      const b = descent[i];
      if (a && b) rates.push((a.trueAltitudeM - b.trueAltitudeM) / (b.elapsedS - a.elapsedS));
    }
    const third = Math.floor(rates.length / 3);
    expect(mean(rates.slice(0, third))).toBeGreaterThan(mean(rates.slice(-third)));
    expect(Math.min(...rates)).toBeGreaterThan(7.5);
    expect(Math.max(...rates)).toBeLessThan(15.1);
    const landed = byPhase("landed");
    expect(landed.length * 2).toBeGreaterThanOrEqual(230);
    expect(landed.every((s) => s.trueAltitudeM === 260)).toBe(true);
  });

  test("sensor lag warms the reading by about τ·w·Γ on ascent", () => {
    // REFERENCE.md §7 [D]: at 5 m/s in a 6.5 K/km profile the warm bias is ≈ 0.33 K at τ = 10 s
    // (here the balloon rises slightly faster than 5 m/s at 3–8 km, hence the tolerance).
    const mid = ascent.filter((s) => s.trueAltitudeM > 3_000 && s.trueAltitudeM < 8_000);
    expect(mean(mid.map((s) => s.temperatureK - s.airTemperatureK))).toBeCloseTo(0.33, 1);
  });

  test("sensor noise about 0.2 K", () => {
    const mid = ascent.filter((s) => s.trueAltitudeM > 3_000 && s.trueAltitudeM < 8_000);
    const residuals = mid.map((s) => s.temperatureK - s.airTemperatureK);
    const m = mean(residuals);
    const sd = Math.sqrt(mean(residuals.map((r) => (r - m) ** 2)));
    expect(sd).toBeGreaterThan(0.15);
    expect(sd).toBeLessThan(0.25);
  });

  test("pressure follows the hypsometric relation of the air temperature profile", () => {
    // Gradient-layer form of the hypsometric equation, REFERENCE.md §1/§3 [S]: p2 = p1 (T2/T1)^(g/(Rd·Γ)),
    // Rd = 287.04, g = 9.80665; the generator lets g fall with height, worth < 0.3 % at 8 km [D].
    const near = (altitudeM: number) =>
      ascent.reduce((best, s) => (Math.abs(s.trueAltitudeM - altitudeM) < Math.abs(best.trueAltitudeM - altitudeM) ? s : best));
    const low = near(2_000);
    const high = near(8_000);
    if (low.pressureHpa === null || high.pressureHpa === null) throw new Error("no pressure");
    const exponent = 9.80665 / (287.04 * 0.0065);
    const expectedHpa = low.pressureHpa * (airTemperatureK(ATMOSPHERE, high.trueAltitudeM) / airTemperatureK(ATMOSPHERE, low.trueAltitudeM)) ** exponent;
    expect(Math.abs(high.pressureHpa / expectedHpa - 1)).toBeLessThan(0.004);
    const ground = byPhase("ground").map((s) => s.pressureHpa ?? 0);
    expect(mean(ground)).toBeCloseTo(990, 0);
  });

  test("humidity stays within 0–100 % and is dry in the stratosphere", () => {
    const values = samples.map((s) => s.humidityPct ?? -1);
    expect(Math.min(...values)).toBeGreaterThan(0);
    expect(Math.max(...values)).toBeLessThanOrEqual(100);
    expect(Math.max(...ascent.filter((s) => s.trueAltitudeM > 12_000).map((s) => s.humidityPct ?? 100))).toBeLessThan(10);
  });

  test("a few GPS altitude spikes, otherwise metre-level noise", () => {
    const errors = samples.map((s) => Math.abs(s.altitudeM - s.trueAltitudeM));
    const spikes = errors.filter((e) => e > 250).length;
    expect(spikes).toBeGreaterThanOrEqual(1);
    expect(spikes).toBeLessThanOrEqual(6);
    expect(errors.filter((e) => e <= 250).every((e) => e < 15)).toBe(true);
  });

  test("truth reports what the profile was built from", () => {
    expect(profile.truth).toMatchObject({
      tropopauseAltitudeM: 11_000,
      lapseRateKPerKm: 6.5,
      surfaceInversionDepthM: 300,
      surfaceInversionStrengthK: 4,
      burstAltitudeM: 30_000,
      hasDescent: true,
    });
    // [D] 285 − 6.5 · 10.8 km
    expect(profile.truth.tropopauseTemperatureK).toBeCloseTo(285 - 6.5 * 10.8, 9);
  });

  test("without descent the record ends at burst", () => {
    const noDescent = generateFlightProfile({ ...PARAMS, descent: null }, 7);
    // The last on-cadence row comes at most 2 s (≈ 12 m) before burst.
    expect(noDescent.samples.at(-1)?.trueAltitudeM ?? 0).toBeGreaterThan(30_000 - 16);
    expect(noDescent.samples.some((s) => s.phase === "descent" || s.phase === "landed")).toBe(false);
  });
});

describe("drawn atmospheres", () => {
  const climate = { latitudeDeg: 50, elevationM: 100, annualMeanK: 283, annualAmplitudeK: 9 };
  const draw = (month: number, dayOfYear: number, hoursAfterSunrise: number, seed: number) =>
    drawAtmosphere({ climate, month, dayOfYear, hoursAfterSunrise }, createPrng(seed), createPrng(seed + 1_000_000));
  const seeds = Array.from({ length: 200 }, (_, i) => i + 1);

  test("dawn surface inversions are 100–500 m deep and 1–6 K strong; none 3 h after sunrise", () => {
    const dawn = seeds.map((seed) => draw(1, 15, 0, seed).surfaceInversion).filter((inv) => inv !== null);
    expect(dawn.length).toBeGreaterThan(120);
    for (const inversion of dawn) {
      expect(inversion.depthM).toBeGreaterThanOrEqual(100);
      expect(inversion.depthM).toBeLessThanOrEqual(500);
      expect(inversion.strengthK).toBeGreaterThanOrEqual(1);
      expect(inversion.strengthK).toBeLessThanOrEqual(6);
    }
    expect(seeds.every((seed) => draw(1, 15, 3, seed).surfaceInversion === null)).toBe(true);
    const weaker = seeds.map((seed) => draw(1, 15, 2, seed).surfaceInversion?.strengthK ?? 0);
    expect(mean(weaker)).toBeLessThan(mean(dawn.map((inv) => inv.strengthK)));
  });

  test("summer: steeper lapse rate and higher tropopause than late autumn and winter", () => {
    const july = seeds.map((seed) => draw(7, 196, 5, seed));
    const november = seeds.map((seed) => draw(11, 319, 5, seed));
    const january = seeds.map((seed) => draw(1, 15, 5, seed));
    // Brief targets [P]: JJA ≈ 6.8 K/km, Oct–Nov ≈ 5.8 K/km; tropopause ≈ 12–13 km summer, 10–11 km winter.
    expect(mean(july.map((a) => a.lapseRateKPerKm))).toBeCloseTo(6.9, 0);
    expect(mean(november.map((a) => a.lapseRateKPerKm))).toBeCloseTo(5.7, 0);
    expect(mean(july.map((a) => a.tropopauseAltitudeM))).toBeGreaterThan(12_000);
    expect(mean(january.map((a) => a.tropopauseAltitudeM))).toBeLessThan(11_000);
  });

  test("southern hemisphere months are shifted by half a year", () => {
    expect(northernEquivalentMonth(1, -37)).toBe(7);
    expect(northernEquivalentMonth(7, -37)).toBe(1);
    expect(northernEquivalentMonth(12, -37)).toBe(6);
    expect(northernEquivalentMonth(12, 40)).toBe(12);
  });
});
