/**
 * Humidity quantities from a sounding: dew point and frost point, the lifting condensation level
 * of the surface parcel, saturated (cloud) layers by a relative-humidity threshold and
 * precipitable water. REFERENCE.md §14–§17.
 */
import { DRY_AIR_SPECIFIC_HEAT_J_PER_KG_K, EPSILON, STANDARD_GRAVITY_M_PER_S2, ZERO_CELSIUS_K } from "./constants";
import { saturationVapourPressureBoltonHpa } from "./moisture";
import { standardAtmosphereAt } from "./standard-atmosphere";

/** Vapour pressure e = RH/100 · es(T) over water (Bolton es), hPa; null for non-finite input. */
export function vapourPressureFromRelativeHumidityHpa(temperatureK: number, relativeHumidityPct: number): number | null {
  if (!Number.isFinite(temperatureK) || !Number.isFinite(relativeHumidityPct) || temperatureK <= 0) return null;
  const rh = Math.min(Math.max(relativeHumidityPct, 0), 100) / 100;
  return rh * saturationVapourPressureBoltonHpa(temperatureK);
}

/**
 * Dew point over liquid water, K, from vapour pressure (hPa): Bolton (1980) eq. 10 inverted,
 * Td(°C) = 243.5·x/(17.67 − x), x = ln(e/6.112). Null when e ≤ 0 or not finite (REFERENCE.md §14).
 */
export function dewPointFromVapourPressureK(vapourPressureHpa: number): number | null {
  if (!Number.isFinite(vapourPressureHpa) || vapourPressureHpa <= 0) return null;
  const x = Math.log(vapourPressureHpa / 6.112);
  if (x >= 17.67) return null;
  return ZERO_CELSIUS_K + (243.5 * x) / (17.67 - x);
}

/** Dew point over water, K, from temperature (K) and relative humidity over water (%); null when RH ≤ 0. */
export function dewPointK(temperatureK: number, relativeHumidityPct: number): number | null {
  const e = vapourPressureFromRelativeHumidityHpa(temperatureK, relativeHumidityPct);
  return e === null ? null : dewPointFromVapourPressureK(e);
}

/**
 * Saturation vapour pressure over ice, hPa: Murphy & Koop (2005) eq. 7,
 * ln(ei/Pa) = 9.550426 − 5723.265/T + 3.53068·ln T − 0.00728332·T, valid above 110 K (REFERENCE.md §14).
 */
export function saturationVapourPressureIceHpa(temperatureK: number): number {
  const t = temperatureK;
  return Math.exp(9.550426 - 5723.265 / t + 3.53068 * Math.log(t) - 0.00728332 * t) / 100;
}

/**
 * Frost point, K: the temperature at which the vapour pressure e (hPa) saturates over ice
 * (Murphy & Koop 2005 ice curve, solved by bisection between 110 K and 273.16 K). Null when e is
 * not positive or saturates above the triple point (then the dew point applies).
 */
export function frostPointFromVapourPressureK(vapourPressureHpa: number): number | null {
  if (!Number.isFinite(vapourPressureHpa) || vapourPressureHpa <= 0) return null;
  let lo = 110;
  let hi = 273.16;
  if (vapourPressureHpa > saturationVapourPressureIceHpa(hi) || vapourPressureHpa < saturationVapourPressureIceHpa(lo)) return null;
  for (let i = 0; i < 60; i++) {
    const mid = (lo + hi) / 2;
    if (saturationVapourPressureIceHpa(mid) < vapourPressureHpa) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/**
 * The point at which condensation starts on cooling at constant pressure: the frost point when
 * the air is below 0 °C, else the dew point over water. `over` says which (REFERENCE.md §14).
 */
export function condensationPointK(temperatureK: number, relativeHumidityPct: number): { valueK: number; over: "water" | "ice" } | null {
  const e = vapourPressureFromRelativeHumidityHpa(temperatureK, relativeHumidityPct);
  if (e === null) return null;
  if (temperatureK < ZERO_CELSIUS_K) {
    const frost = frostPointFromVapourPressureK(e);
    if (frost !== null) return { valueK: frost, over: "ice" };
  }
  const dew = dewPointFromVapourPressureK(e);
  return dew === null ? null : { valueK: dew, over: "water" };
}

/** Relative humidity with respect to ice (%), from RH over water (%) and temperature (K). */
export function relativeHumidityOverIcePct(temperatureK: number, relativeHumidityPct: number): number {
  return (relativeHumidityPct * saturationVapourPressureBoltonHpa(temperatureK)) / saturationVapourPressureIceHpa(temperatureK);
}

/** Dry adiabatic lapse rate g/cp, K/m. */
const DRY_ADIABAT_K_PER_M = STANDARD_GRAVITY_M_PER_S2 / DRY_AIR_SPECIFIC_HEAT_J_PER_KG_K;

/**
 * Lifting condensation level of a parcel with temperature T and dew point Td (both K):
 * temperature T_L by Bolton (1980) eq. 15, T_L = 1/(1/(Td − 56) + ln(T/Td)/800) + 56, and height
 * above the parcel (T − T_L)/(g/cp) along the dry adiabat (REFERENCE.md §15). Null for bad input
 * or Td > T.
 */
export function liftingCondensationLevel(temperatureK: number, dewPointKValue: number): { temperatureK: number; heightM: number } | null {
  if (!Number.isFinite(temperatureK) || !Number.isFinite(dewPointKValue) || dewPointKValue <= 56 || temperatureK <= 0) return null;
  if (dewPointKValue > temperatureK + 1e-9) return null;
  const td = Math.min(dewPointKValue, temperatureK);
  const tl = 1 / (1 / (td - 56) + Math.log(temperatureK / td) / 800) + 56;
  if (!Number.isFinite(tl)) return null;
  return { temperatureK: tl, heightM: Math.max(0, (temperatureK - tl) / DRY_ADIABAT_K_PER_M) };
}

/** A level as the humidity functions need it (binned ascent levels qualify). */
export interface HumidityLevel {
  altitudeM: number;
  temperatureK: number;
  pressureHpa: number | null;
  relativeHumidityPct: number | null;
}

/**
 * Relative-humidity thresholds of the cloud-layer method of Wang & Rossow (1995): a layer is
 * levels with RH ≥ 84 % containing at least one level with RH ≥ 87 %, RH taken with respect to
 * ice below 0 °C. Thresholds [Mem], not checked against the paper (REFERENCE.md §16).
 */
export const CLOUD_LAYER_METHOD = { name: "Wang & Rossow (1995) RH threshold", minRelativeHumidityPct: 84, peakRelativeHumidityPct: 87 } as const;

export interface SaturatedLayer {
  baseM: number;
  topM: number;
  maxRelativeHumidityPct: number;
}

/**
 * Saturated (cloud) layers of a profile ordered by altitude, by CLOUD_LAYER_METHOD. A layer's
 * base and top are the lowest and highest qualifying level altitudes.
 */
export function findSaturatedLayers(levels: readonly HumidityLevel[]): SaturatedLayer[] {
  const out: SaturatedLayer[] = [];
  let current: SaturatedLayer | null = null;
  const close = () => {
    if (current && current.maxRelativeHumidityPct >= CLOUD_LAYER_METHOD.peakRelativeHumidityPct) out.push(current);
    current = null;
  };
  for (const level of levels) {
    const rhW = level.relativeHumidityPct;
    if (rhW === null || !Number.isFinite(rhW)) {
      close();
      continue;
    }
    const rh = level.temperatureK < ZERO_CELSIUS_K ? relativeHumidityOverIcePct(level.temperatureK, rhW) : rhW;
    if (rh >= CLOUD_LAYER_METHOD.minRelativeHumidityPct) {
      if (current === null) current = { baseM: level.altitudeM, topM: level.altitudeM, maxRelativeHumidityPct: rh };
      else {
        current.topM = level.altitudeM;
        current.maxRelativeHumidityPct = Math.max(current.maxRelativeHumidityPct, rh);
      }
    } else close();
  }
  close();
  return out;
}

/**
 * Precipitable water, mm (≡ kg/m²): (1/g)·∫ q dp over consecutive levels that both have humidity,
 * q = r/(1 + r) the specific humidity (AMS Glossary; REFERENCE.md §17). Pressure is the
 * measured one, else the standard atmosphere's at the level (then pressureFromStandardAtmosphere).
 * Null when fewer than two levels have humidity. topM is the highest level used.
 */
export function precipitableWater(levels: readonly HumidityLevel[]): { valueMm: number; topM: number; pressureFromStandardAtmosphere: boolean } | null {
  let total = 0;
  let used = 0;
  let topM = -Infinity;
  let fromStandard = false;
  let prev: { pPa: number; q: number } | null = null;
  for (const level of levels) {
    const rh = level.relativeHumidityPct;
    let pHpa = level.pressureHpa;
    if (pHpa === null || !Number.isFinite(pHpa)) {
      pHpa = standardAtmosphereAt(level.altitudeM)?.pressureHpa ?? null;
      if (pHpa !== null) fromStandard = true;
    }
    const e = rh === null ? null : vapourPressureFromRelativeHumidityHpa(level.temperatureK, rh);
    if (pHpa === null || e === null || e >= pHpa) {
      prev = null;
      continue;
    }
    const r = (EPSILON * e) / (pHpa - e);
    const point = { pPa: pHpa * 100, q: r / (1 + r) };
    if (prev !== null) {
      total += (Math.abs(prev.pPa - point.pPa) * (prev.q + point.q)) / 2;
      used++;
      topM = Math.max(topM, level.altitudeM);
    }
    prev = point;
  }
  if (used === 0) return null;
  const valueMm = total / STANDARD_GRAVITY_M_PER_S2;
  return Number.isFinite(valueMm) ? { valueMm, topM, pressureFromStandardAtmosphere: fromStandard } : null;
}
