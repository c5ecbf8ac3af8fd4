import { describe, expect, test } from "vitest";
import { hypsometricThicknessM, integrateHypsometricAltitudesM } from "../../lib/analysis/altitude";
import { STANDARD_GRAVITY_M_PER_S2, USSA76_SPECIFIC_GAS_CONSTANT_J_PER_KG_K } from "../../lib/analysis/constants";
import { standardAtmosphereAt } from "../../lib/analysis/standard-atmosphere";
import { altitudeJumpMask, hampelSpikeMask, rollingMedian } from "../../lib/analysis/filters";
import { correctSensorLag, movingAverageByTime } from "../../lib/analysis/lag";
import { seededGaussian } from "../support/synthetic-profiles";

describe("hypsometric equation", () => {
  test("1000 → 500 hPa at T̄v = 273.15 K is 5542.0 m", () => {
    // REFERENCE.md §3 [D]: (R·T̄v/g)·ln 2 with the USSA76 R = 287.053 and g0
    expect(hypsometricThicknessM(1000, 500, 273.15)).toBeCloseTo(5542.0, 1);
    expect(hypsometricThicknessM(1000, 500, 273.15)).toBeCloseTo(
      ((USSA76_SPECIFIC_GAS_CONSTANT_J_PER_KG_K * 273.15) / STANDARD_GRAVITY_M_PER_S2) * Math.log(2),
      9,
    );
    expect(hypsometricThicknessM(0, 500, 273)).toBeNull();
  });

  test("integrating USSA76 pressures with USSA76 temperatures recovers the altitudes", () => {
    // [D] the standard atmosphere is hydrostatic with the same constants
    const z = Array.from({ length: 3001 }, (_, i) => i * 10);
    const p = z.map((v) => standardAtmosphereAt(v)?.pressureHpa ?? Number.NaN);
    const t = z.map((v) => standardAtmosphereAt(v)?.temperatureK ?? Number.NaN);
    const out = integrateHypsometricAltitudesM(p, t, null, 0, 0);
    for (const i of [500, 1100, 2000, 3000]) expect(Math.abs((out[i] as number) - (z[i] as number))).toBeLessThan(1);
  });

  test("moist air is lighter: virtual temperature makes layers thicker", () => {
    const p = [1000, 900];
    const t = [290, 285];
    const dry = integrateHypsometricAltitudesM(p, t, null, 0, 0)[1] as number;
    const moist = integrateHypsometricAltitudesM(p, t, [80, 80], 0, 0)[1] as number;
    expect(moist).toBeGreaterThan(dry);
  });
});

describe("filters", () => {
  test("rolling median equals a naive median", () => {
    const g = seededGaussian(3);
    const v = Float64Array.from({ length: 200 }, () => Math.round(g() * 3) + 0);
    const med = rollingMedian(v, 4);
    for (let i = 0; i < v.length; i++) {
      const w = Array.from(v.slice(Math.max(0, i - 4), Math.min(v.length, i + 5))).sort((a, b) => a - b);
      const m = w.length % 2 ? (w[w.length >> 1] as number) : ((w[(w.length >> 1) - 1] as number) + (w[w.length >> 1] as number)) / 2;
      expect(med[i]).toBeCloseTo(m, 12);
    }
  });

  test("Hampel removes isolated spikes and keeps Gaussian noise mostly intact", () => {
    const g = seededGaussian(5);
    const v = Float64Array.from({ length: 1000 }, (_, i) => 280 - i * 0.03 + 0.2 * g());
    v[100] = (v[100] as number) + 5;
    v[500] = (v[500] as number) - 8;
    const mask = hampelSpikeMask(v, 7, 3, 0.3);
    expect(mask[100]).toBe(1);
    expect(mask[500]).toBe(1);
    const flagged = mask.reduce((s, x) => s + x, 0);
    expect(flagged).toBeLessThan(30); // [P] a 3σ Hampel flags only a few per cent of pure noise
  });

  test("GPS jumps: single and paired spikes at 1 Hz, including a spike in the first sample", () => {
    const t = Float64Array.from({ length: 300 }, (_, i) => i);
    const z = Float64Array.from({ length: 300 }, (_, i) => 1000 + 5 * i);
    z[0] = 9000;
    z[50] = (z[50] as number) + 2000;
    z[120] = (z[120] as number) - 400;
    z[121] = (z[121] as number) - 400;
    z[200] = (z[200] as number) + 150;
    const mask = altitudeJumpMask(t, z, 60, 7);
    expect([...mask].flatMap((m, i) => (m ? [i] : []))).toEqual([0, 50, 120, 121, 200]);
  });

  test("a genuine level shift is accepted after a run of rejections", () => {
    const t = Float64Array.from({ length: 100 }, (_, i) => i);
    const z = Float64Array.from({ length: 100 }, (_, i) => (i < 50 ? 1000 : 3000));
    const mask = altitudeJumpMask(t, z, 60, 7);
    expect(mask.slice(70).every((m) => m === 0)).toBe(true);
  });
});

describe("lag correction", () => {
  test("a ramp lagged by τ is restored", () => {
    // [D] in a steady ramp dT/dt = −0.0325 K/s a first-order sensor reads τ·0.0325 K warm
    const tau = 10;
    const t = Float64Array.from({ length: 400 }, (_, i) => i);
    const air = Float64Array.from(t, (s) => 290 - 0.0325 * s);
    const sensor = Float64Array.from(air, (a) => a + tau * 0.0325);
    const corrected = correctSensorLag(t, sensor, 0, 400, tau, 5);
    for (const i of [50, 200, 350]) expect(corrected[i]).toBeCloseTo(air[i] as number, 9);
    expect(sensor[0]).toBeCloseTo(290 + 0.325, 12); // input untouched
  });
  test("moving average by time handles edges", () => {
    const t = Float64Array.from([0, 1, 2, 3, 4]);
    const v = Float64Array.from([1, 2, 3, 4, 5]);
    expect(Array.from(movingAverageByTime(t, v, 0, 5, 2))).toEqual([1.5, 2, 3, 4, 4.5]);
  });
});
