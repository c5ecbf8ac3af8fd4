import { describe, expect, it } from "vitest";
import fc from "fast-check";
import {
  condensationPointK,
  dewPointK,
  findSaturatedLayers,
  frostPointFromVapourPressureK,
  liftingCondensationLevel,
  precipitableWater,
  saturationVapourPressureIceHpa,
  vapourPressureFromRelativeHumidityHpa,
} from "@/lib/analysis/humidity";
import { freezingLevelsM, mixedLayerHeightGradient, mixedLayerHeightParcel, potentialTemperatureK } from "@/lib/analysis/boundary-layer";

const C = (c: number) => c + 273.15;

describe("dew point and frost point (REFERENCE.md §14)", () => {
  it("matches the Bolton-inverted check values", () => {
    // Bolton 1980 eq. 10 inverted, [D] check values (REFERENCE.md §14)
    expect(vapourPressureFromRelativeHumidityHpa(C(20), 50)).toBeCloseTo(11.685, 2);
    expect((dewPointK(C(20), 50) as number) - 273.15).toBeCloseTo(9.27, 2);
    expect((dewPointK(C(0), 80) as number) - 273.15).toBeCloseTo(-3.04, 2);
    expect((dewPointK(C(30), 30) as number) - 273.15).toBeCloseTo(10.56, 2);
  });
  it("dew point equals the temperature at saturation and is null for dry air", () => {
    expect(dewPointK(C(15), 100) as number).toBeCloseTo(C(15), 6); // definition [D]
    expect(dewPointK(C(15), 0)).toBeNull();
  });
  it("the Murphy & Koop ice curve gives the triple-point pressure", () => {
    // Murphy & Koop 2005: ice saturation pressure at the triple point 273.16 K is 611.657 Pa (REFERENCE.md §14)
    expect(saturationVapourPressureIceHpa(273.16)).toBeCloseTo(6.11657, 3);
    // the frost point of a vapour pressure saturated over ice at 250 K is 250 K [D]
    expect(frostPointFromVapourPressureK(saturationVapourPressureIceHpa(250)) as number).toBeCloseTo(250, 6);
  });
  it("below 0 °C the condensation point is the frost point, above the dew point over water", () => {
    const cold = condensationPointK(C(-20), 70);
    expect(cold?.over).toBe("ice");
    // the frost point lies between the dew point over water and the air temperature [D]
    expect(cold!.valueK).toBeGreaterThan(dewPointK(C(-20), 70) as number);
    expect(cold!.valueK).toBeLessThan(C(-20));
    expect(condensationPointK(C(10), 70)?.over).toBe("water");
  });
  it("property: dew point is finite and never above the temperature", () => {
    fc.assert(fc.property(fc.double({ min: 180, max: 330, noNaN: true }), fc.double({ min: 0.5, max: 100, noNaN: true }), (t, rh) => {
      const td = dewPointK(t, rh);
      expect(td).not.toBeNull();
      expect(Number.isFinite(td as number)).toBe(true);
      expect(td as number).toBeLessThanOrEqual(t + 1e-9);
      const cp = condensationPointK(t, rh);
      expect(Number.isFinite(cp!.valueK)).toBe(true);
    }));
  });
});

describe("lifting condensation level (REFERENCE.md §15)", () => {
  it("matches Bolton eq. 15 check values", () => {
    // Bolton 1980 eq. 15, [D] check: 20 °C / Td 9.27 °C → T_L 280.06 K, z ≈ 1341 m (REFERENCE.md §15)
    const lcl = liftingCondensationLevel(C(20), C(9.27));
    expect(lcl!.temperatureK).toBeCloseTo(280.06, 1);
    expect(Math.abs(lcl!.heightM - 1341)).toBeLessThan(5);
    // Lawrence 2005: about 125 m per K of dew-point depression (REFERENCE.md §15)
    expect(Math.abs(lcl!.heightM - 125 * 10.73)).toBeLessThan(20);
  });
  it("a saturated parcel condenses at once; Td above T is refused", () => {
    expect(liftingCondensationLevel(C(10), C(10))!.heightM).toBeCloseTo(0, 6); // definition [D]
    expect(liftingCondensationLevel(C(10), C(11))).toBeNull();
  });
  it("property: finite, non-negative and below 6 km for Td depression under 40 K", () => {
    fc.assert(fc.property(fc.double({ min: 230, max: 320, noNaN: true }), fc.double({ min: 0, max: 40, noNaN: true }), (t, dep) => {
      const lcl = liftingCondensationLevel(t, t - dep);
      expect(lcl).not.toBeNull();
      expect(Number.isFinite(lcl!.heightM)).toBe(true);
      expect(lcl!.heightM).toBeGreaterThanOrEqual(0);
      expect(lcl!.heightM).toBeLessThan(6000);
    }));
  });
});

describe("saturated layers (REFERENCE.md §16)", () => {
  it("finds a layer with a level above 87 % among levels above 84 %", () => {
    const rh = [60, 85, 90, 86, 70, 85, 86, 50];
    const levels = rh.map((r, i) => ({ altitudeM: 100 * i, temperatureK: C(15), pressureHpa: null, relativeHumidityPct: r }));
    const layers = findSaturatedLayers(levels);
    // Wang & Rossow 1995 thresholds [Mem]: the 85–86 % stretch without an 87 % peak is not a layer
    expect(layers).toHaveLength(1);
    expect(layers[0]).toMatchObject({ baseM: 100, topM: 300 });
  });
});

describe("precipitable water (REFERENCE.md §17)", () => {
  it("equals Δp·q/g for a layer of constant specific humidity", () => {
    // AMS Glossary definition; r = 0.622·e/(p − e) from e = 0.5·es(20 °C) = 11.685 hPa at 1000 and 900 hPa [D]
    const levels = [
      { altitudeM: 0, temperatureK: C(20), pressureHpa: 1000, relativeHumidityPct: 50 },
      { altitudeM: 900, temperatureK: C(20), pressureHpa: 900, relativeHumidityPct: 50 },
    ];
    const q = (p: number) => { const r = (0.622 * 11.6845) / (p - 11.6845); return r / (1 + r); };
    const expected = (10000 * (q(1000) + q(900))) / 2 / 9.80665;
    const pw = precipitableWater(levels);
    expect(pw!.valueMm).toBeCloseTo(expected, 2);
    expect(pw!.valueMm).toBeGreaterThan(7);
    expect(pw!.pressureFromStandardAtmosphere).toBe(false);
  });
  it("uses the standard atmosphere without pressure and says so; null without humidity", () => {
    const levels = [0, 500, 1000].map((z) => ({ altitudeM: z, temperatureK: C(10), pressureHpa: null, relativeHumidityPct: 70 }));
    expect(precipitableWater(levels)!.pressureFromStandardAtmosphere).toBe(true);
    expect(precipitableWater(levels.map((l) => ({ ...l, relativeHumidityPct: null })))).toBeNull();
  });
});

describe("freezing level and mixed layer (REFERENCE.md §18–§19)", () => {
  it("interpolates 0 °C crossings, lowest first", () => {
    const levels = [
      { altitudeM: 0, temperatureK: C(5), pressureHpa: null },
      { altitudeM: 1000, temperatureK: C(-5), pressureHpa: null },
      { altitudeM: 2000, temperatureK: C(1), pressureHpa: null },
      { altitudeM: 3000, temperatureK: C(-9), pressureHpa: null },
    ];
    // linear interpolation [P]
    expect(freezingLevelsM(levels)).toEqual([500, expect.closeTo(1833.33, 1), expect.closeTo(2100, 6)]);
    expect(freezingLevelsM(levels.map((l) => ({ ...l, temperatureK: C(10) })))).toEqual([]);
  });
  it("θ at 1000 hPa equals T and is T·(1000/850)^0.2859 at 850 hPa", () => {
    // Poisson's equation, Rd/cp = 287.04/1004 [D]
    expect(potentialTemperatureK(290, 1000)).toBe(290);
    expect(potentialTemperatureK(280, 850) as number).toBeCloseTo(280 * Math.pow(1000 / 850, 287.04 / 1004), 9);
  });
  it("parcel and gradient methods find the top of a dry-adiabatic layer under an inversion", () => {
    // θ constant (dry adiabat) to 1200 m, a 2 K capping jump to 1300 m, then +3 K/km of θ above [D]
    const surfaceP = 1000;
    const levels = [] as { altitudeM: number; temperatureK: number; pressureHpa: number }[];
    for (let z = 0; z <= 3000; z += 100) {
      const p = surfaceP * Math.exp(-z / 8000);
      const theta = z <= 1200 ? 300 : 302 + (3 * (z - 1300)) / 1000;
      levels.push({ altitudeM: z, temperatureK: theta * Math.pow(p / 1000, 287.04 / 1004), pressureHpa: p });
    }
    const parcel = mixedLayerHeightParcel(levels[0]!, levels.slice(1));
    // θ exceeds 300 + 0.5 K a quarter of the way through the jump: 1225 m [D]
    expect(parcel!.heightM).toBeCloseTo(1225, 6);
    expect(parcel!.method).toBe("parcel");
    const gradient = mixedLayerHeightGradient(levels[0]!, levels.slice(1));
    expect(gradient!.heightM).toBeCloseTo(1250, 6); // the jump's midpoint [D]
    expect(parcel!.pressureFromStandardAtmosphere).toBe(false);
  });
  it("property: mixed-layer heights are finite and within the profile", () => {
    fc.assert(fc.property(fc.array(fc.double({ min: -15, max: 15, noNaN: true }), { minLength: 2, maxLength: 40 }), (lapses) => {
      let t = 290;
      const levels = lapses.map((g, i) => { t -= g / 10; return { altitudeM: 100 * (i + 1), temperatureK: t, pressureHpa: null }; });
      const surface = { altitudeM: 0, temperatureK: 290, pressureHpa: null };
      for (const r of [mixedLayerHeightParcel(surface, levels), mixedLayerHeightGradient(surface, levels)]) {
        if (r === null) continue;
        expect(Number.isFinite(r.heightM)).toBe(true);
        expect(r.heightM).toBeGreaterThanOrEqual(0);
        expect(r.heightM).toBeLessThanOrEqual(100 * lapses.length);
        expect(r.pressureFromStandardAtmosphere).toBe(true);
      }
      for (const z of freezingLevelsM([surface, ...levels])) expect(Number.isFinite(z)).toBe(true);
    }));
  });
});
