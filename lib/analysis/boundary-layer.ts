/**
 * Freezing level and mixed-layer height of an ascent profile. REFERENCE.md §18–§19.
 */
import { DRY_AIR_GAS_CONSTANT_J_PER_KG_K, DRY_AIR_SPECIFIC_HEAT_J_PER_KG_K, ZERO_CELSIUS_K } from "./constants";
import { standardAtmosphereAt } from "./standard-atmosphere";

export interface ThermalLevel {
  altitudeM: number;
  temperatureK: number;
  pressureHpa: number | null;
}

/** Rd/cp for potential temperature. */
const KAPPA = DRY_AIR_GAS_CONSTANT_J_PER_KG_K / DRY_AIR_SPECIFIC_HEAT_J_PER_KG_K;

/** Potential temperature θ = T·(1000/p)^(Rd/cp), K, p in hPa (Poisson's equation). */
export function potentialTemperatureK(temperatureK: number, pressureHpa: number): number | null {
  if (!Number.isFinite(temperatureK) || !Number.isFinite(pressureHpa) || pressureHpa <= 0) return null;
  return temperatureK * Math.pow(1000 / pressureHpa, KAPPA);
}

/**
 * Altitudes where the profile crosses 0 °C (273.15 K), interpolated linearly between
 * consecutive levels, lowest first. A level exactly at 0 °C counts once (REFERENCE.md §18).
 */
export function freezingLevelsM(levels: readonly ThermalLevel[]): number[] {
  const out: number[] = [];
  for (let i = 1; i < levels.length; i++) {
    const a = levels[i - 1] as ThermalLevel;
    const b = levels[i] as ThermalLevel;
    const da = a.temperatureK - ZERO_CELSIUS_K;
    const db = b.temperatureK - ZERO_CELSIUS_K;
    if (da === 0 && i === 1) out.push(a.altitudeM);
    if (db === 0) {
      out.push(b.altitudeM);
      continue;
    }
    if (da * db < 0) out.push(a.altitudeM + ((b.altitudeM - a.altitudeM) * da) / (da - db));
  }
  return out;
}

interface ThetaPoint {
  altitudeM: number;
  thetaK: number;
}

/** θ of each level; pressure from the standard atmosphere where a level has none (then flagged). */
export function potentialTemperatureProfile(levels: readonly ThermalLevel[]): { points: ThetaPoint[]; pressureFromStandardAtmosphere: boolean } {
  const points: ThetaPoint[] = [];
  let pressureFromStandardAtmosphere = false;
  for (const level of levels) {
    let p = level.pressureHpa;
    if (p === null || !Number.isFinite(p)) {
      p = standardAtmosphereAt(level.altitudeM)?.pressureHpa ?? null;
      if (p !== null) pressureFromStandardAtmosphere = true;
    }
    const theta = p === null ? null : potentialTemperatureK(level.temperatureK, p);
    if (theta !== null) points.push({ altitudeM: level.altitudeM, thetaK: theta });
  }
  return { points, pressureFromStandardAtmosphere };
}

/** θ excess over the surface value the parcel method requires, K [P] (REFERENCE.md §19). */
export const PARCEL_THETA_EXCESS_K = 0.5;
/** The θ-gradient method searches up to this height above the surface, m [P]. */
export const GRADIENT_SEARCH_DEPTH_M = 4000;

export type MixedLayerMethod = "parcel" | "theta-gradient";

export interface MixedLayerResult {
  /** Height above the surface point, m. */
  heightM: number;
  method: MixedLayerMethod;
  pressureFromStandardAtmosphere: boolean;
}

/**
 * Mixed-layer height by the parcel method (Holzworth 1964): the lowest height above the surface
 * where θ(z) exceeds the surface θ plus PARCEL_THETA_EXCESS_K, interpolated linearly between
 * levels. Null when θ never exceeds it within the profile (REFERENCE.md §19).
 */
export function mixedLayerHeightParcel(surface: ThermalLevel, levels: readonly ThermalLevel[]): MixedLayerResult | null {
  const { points: profile, pressureFromStandardAtmosphere } = potentialTemperatureProfile([surface, ...levels.filter((l) => l.altitudeM > surface.altitudeM)]);
  const first = profile[0];
  if (!first || first.altitudeM !== surface.altitudeM) return null;
  const limit = first.thetaK + PARCEL_THETA_EXCESS_K;
  for (let i = 1; i < profile.length; i++) {
    const a = profile[i - 1] as ThetaPoint;
    const b = profile[i] as ThetaPoint;
    if (b.thetaK > limit) {
      const fraction = a.thetaK >= limit || b.thetaK === a.thetaK ? 0 : (limit - a.thetaK) / (b.thetaK - a.thetaK);
      const altitudeM = a.altitudeM + fraction * (b.altitudeM - a.altitudeM);
      return { heightM: altitudeM - surface.altitudeM, method: "parcel", pressureFromStandardAtmosphere };
    }
  }
  return null;
}

/**
 * Mixed-layer height by the maximum θ gradient: the midpoint of the pair of consecutive levels
 * with the largest dθ/dz within GRADIENT_SEARCH_DEPTH_M of the surface (REFERENCE.md §19). Null
 * with fewer than two levels or when no gradient is positive.
 */
export function mixedLayerHeightGradient(surface: ThermalLevel, levels: readonly ThermalLevel[]): MixedLayerResult | null {
  const { points: profile, pressureFromStandardAtmosphere } = potentialTemperatureProfile(
    [surface, ...levels.filter((l) => l.altitudeM > surface.altitudeM && l.altitudeM <= surface.altitudeM + GRADIENT_SEARCH_DEPTH_M)],
  );
  let best = 0;
  let bestHeightM: number | null = null;
  for (let i = 1; i < profile.length; i++) {
    const a = profile[i - 1] as ThetaPoint;
    const b = profile[i] as ThetaPoint;
    const dz = b.altitudeM - a.altitudeM;
    if (dz <= 0) continue;
    const gradient = (b.thetaK - a.thetaK) / dz;
    if (gradient > best) {
      best = gradient;
      bestHeightM = (a.altitudeM + b.altitudeM) / 2 - surface.altitudeM;
    }
  }
  return bestHeightM === null ? null : { heightM: bestHeightM, method: "theta-gradient", pressureFromStandardAtmosphere };
}
