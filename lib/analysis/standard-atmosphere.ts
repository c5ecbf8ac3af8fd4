/**
 * U.S. Standard Atmosphere 1976 up to 86 km geometric (84.852 km geopotential).
 * Source: U.S. Standard Atmosphere 1976 (NOAA/NASA/USAF), table 4 layer definitions.
 * Layer base pressures are chained from p0 with the stated constants, so they reproduce the
 * published table to its printed precision.
 */
import {
  STANDARD_GRAVITY_M_PER_S2,
  USSA76_EARTH_RADIUS_M,
  USSA76_GAS_CONSTANT_J_PER_MOL_K,
  USSA76_MOLAR_MASS_KG_PER_MOL,
  USSA76_SEA_LEVEL_PRESSURE_PA,
  USSA76_SEA_LEVEL_TEMPERATURE_K,
} from "./constants";

/** g0·M0/R*, K/m: the hydrostatic constant of the standard atmosphere. */
const HYDROSTATIC_K_PER_M =
  (STANDARD_GRAVITY_M_PER_S2 * USSA76_MOLAR_MASS_KG_PER_MOL) / USSA76_GAS_CONSTANT_J_PER_MOL_K;

/** Lower validity bound used here (the 0–11 km gradient extended downward), geopotential m. */
const MIN_GEOPOTENTIAL_M = -5000;
/** Upper validity bound: 86 km geometric, geopotential m. */
export const USSA76_TOP_GEOPOTENTIAL_M = 84852;

interface Layer {
  baseGeopotentialM: number;
  /** dT/dH, K/m (not the trade's lapse rate, which is −dT/dz). */
  gradientKPerM: number;
  baseTemperatureK: number;
  basePressurePa: number;
}

const LAYER_DEFINITIONS: ReadonlyArray<{ baseKm: number; gradientKPerKm: number }> = [
  { baseKm: 0, gradientKPerKm: -6.5 },
  { baseKm: 11, gradientKPerKm: 0 },
  { baseKm: 20, gradientKPerKm: 1.0 },
  { baseKm: 32, gradientKPerKm: 2.8 },
  { baseKm: 47, gradientKPerKm: 0 },
  { baseKm: 51, gradientKPerKm: -2.8 },
  { baseKm: 71, gradientKPerKm: -2.0 },
];

function pressureInLayer(layer: Layer, geopotentialM: number): { temperatureK: number; pressurePa: number } {
  const dh = geopotentialM - layer.baseGeopotentialM;
  if (layer.gradientKPerM === 0) {
    return {
      temperatureK: layer.baseTemperatureK,
      pressurePa: layer.basePressurePa * Math.exp((-HYDROSTATIC_K_PER_M * dh) / layer.baseTemperatureK),
    };
  }
  const temperatureK = layer.baseTemperatureK + layer.gradientKPerM * dh;
  return {
    temperatureK,
    pressurePa:
      layer.basePressurePa * Math.pow(layer.baseTemperatureK / temperatureK, HYDROSTATIC_K_PER_M / layer.gradientKPerM),
  };
}

function buildLayers(): Layer[] {
  const layers: Layer[] = [];
  let temperatureK = USSA76_SEA_LEVEL_TEMPERATURE_K;
  let pressurePa = USSA76_SEA_LEVEL_PRESSURE_PA;
  for (let i = 0; i < LAYER_DEFINITIONS.length; i++) {
    const def = LAYER_DEFINITIONS[i];
    if (!def) continue;
    const layer: Layer = {
      baseGeopotentialM: def.baseKm * 1000,
      gradientKPerM: def.gradientKPerKm / 1000,
      baseTemperatureK: temperatureK,
      basePressurePa: pressurePa,
    };
    layers.push(layer);
    const next = LAYER_DEFINITIONS[i + 1];
    const topM = next ? next.baseKm * 1000 : USSA76_TOP_GEOPOTENTIAL_M;
    const top = pressureInLayer(layer, topM);
    temperatureK = top.temperatureK;
    pressurePa = top.pressurePa;
  }
  return layers;
}

const LAYERS: readonly Layer[] = buildLayers();

/** Layer base values (geopotential m, K, Pa) as computed from the constants; exposed for checks. */
export function standardAtmosphereLayerBases(): Array<{ baseGeopotentialM: number; temperatureK: number; pressurePa: number }> {
  return LAYERS.map((l) => ({ baseGeopotentialM: l.baseGeopotentialM, temperatureK: l.baseTemperatureK, pressurePa: l.basePressurePa }));
}

/** Geometric altitude Z (m) → geopotential altitude H (m): H = r0·Z/(r0 + Z), USSA76 eq. 18. */
export function geometricToGeopotentialM(altitudeM: number): number {
  return (USSA76_EARTH_RADIUS_M * altitudeM) / (USSA76_EARTH_RADIUS_M + altitudeM);
}

/** Geopotential altitude H (m) → geometric altitude Z (m): Z = r0·H/(r0 − H). */
export function geopotentialToGeometricM(geopotentialM: number): number {
  return (USSA76_EARTH_RADIUS_M * geopotentialM) / (USSA76_EARTH_RADIUS_M - geopotentialM);
}

export interface StandardAtmosphereState {
  temperatureK: number;
  pressurePa: number;
  pressureHpa: number;
}

function layerFor(geopotentialM: number): Layer | undefined {
  let found: Layer | undefined = LAYERS[0];
  for (const layer of LAYERS) {
    if (geopotentialM >= layer.baseGeopotentialM) found = layer;
  }
  return found;
}

/**
 * USSA76 temperature and pressure at a geopotential altitude (m), valid −5 km … 84.852 km;
 * null outside that range or for non-finite input.
 */
export function standardAtmosphereAtGeopotential(geopotentialM: number): StandardAtmosphereState | null {
  if (!Number.isFinite(geopotentialM) || geopotentialM < MIN_GEOPOTENTIAL_M || geopotentialM > USSA76_TOP_GEOPOTENTIAL_M) {
    return null;
  }
  const layer = layerFor(geopotentialM);
  if (!layer) return null;
  const state = pressureInLayer(layer, geopotentialM);
  return { temperatureK: state.temperatureK, pressurePa: state.pressurePa, pressureHpa: state.pressurePa / 100 };
}

/** USSA76 temperature and pressure at a geometric altitude above mean sea level (m), valid to 86 km. */
export function standardAtmosphereAt(altitudeM: number): StandardAtmosphereState | null {
  if (!Number.isFinite(altitudeM)) return null;
  return standardAtmosphereAtGeopotential(geometricToGeopotentialM(altitudeM));
}

/**
 * Pressure altitude: the USSA76 geopotential altitude (m) at which the standard pressure equals
 * pressureHpa (the aviation/ICAO definition). Null when non-finite, ≤ 0 or outside the model range.
 */
export function pressureAltitudeM(pressureHpa: number): number | null {
  if (!Number.isFinite(pressureHpa) || pressureHpa <= 0) return null;
  const pressurePa = pressureHpa * 100;
  const bottom = standardAtmosphereAtGeopotential(MIN_GEOPOTENTIAL_M);
  const top = standardAtmosphereAtGeopotential(USSA76_TOP_GEOPOTENTIAL_M);
  if (!bottom || !top || pressurePa > bottom.pressurePa || pressurePa < top.pressurePa) return null;
  let layer: Layer | undefined = LAYERS[0];
  for (const l of LAYERS) {
    if (pressurePa <= l.basePressurePa) layer = l;
  }
  if (!layer) return null;
  if (layer.gradientKPerM === 0) {
    return layer.baseGeopotentialM - (layer.baseTemperatureK / HYDROSTATIC_K_PER_M) * Math.log(pressurePa / layer.basePressurePa);
  }
  const temperatureK =
    layer.baseTemperatureK * Math.pow(pressurePa / layer.basePressurePa, -layer.gradientKPerM / HYDROSTATIC_K_PER_M);
  return layer.baseGeopotentialM + (temperatureK - layer.baseTemperatureK) / layer.gradientKPerM;
}

/** Geometric altitude (m) at which the USSA76 pressure equals pressureHpa; null outside the model. */
export function standardAtmosphereAltitudeForPressureM(pressureHpa: number): number | null {
  const geopotentialM = pressureAltitudeM(pressureHpa);
  return geopotentialM === null ? null : geopotentialToGeometricM(geopotentialM);
}
