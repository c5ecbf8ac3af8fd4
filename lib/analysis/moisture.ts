/** Water-vapour relations used for virtual temperature and the saturated adiabatic lapse rate. */
import { EPSILON, ZERO_CELSIUS_K } from "./constants";

/**
 * Saturation vapour pressure over liquid water, hPa, from temperature in K.
 * Bolton (1980), Mon. Wea. Rev. 108, eq. 10: es = 6.112·exp(17.67·t/(t + 243.5)), t in °C.
 */
export function saturationVapourPressureBoltonHpa(temperatureK: number): number {
  const t = temperatureK - ZERO_CELSIUS_K;
  return 6.112 * Math.exp((17.67 * t) / (t + 243.5));
}

/**
 * Saturation vapour pressure over liquid water, hPa: the Magnus form recommended by WMO
 * (Sonntag 1990): es = 6.112·exp(17.62·t/(243.12 + t)), t in °C.
 */
export function saturationVapourPressureMagnusHpa(temperatureK: number): number {
  const t = temperatureK - ZERO_CELSIUS_K;
  return 6.112 * Math.exp((17.62 * t) / (243.12 + t));
}

/**
 * Mixing ratio r = ε·e/(p − e), kg/kg, from vapour pressure e and total pressure p (both hPa).
 * Null when e ≥ p (no physical mixing ratio) or inputs are not finite.
 */
export function mixingRatioKgPerKg(vapourPressureHpa: number, pressureHpa: number): number | null {
  if (!Number.isFinite(vapourPressureHpa) || !Number.isFinite(pressureHpa)) return null;
  if (vapourPressureHpa < 0 || vapourPressureHpa >= pressureHpa) return null;
  return (EPSILON * vapourPressureHpa) / (pressureHpa - vapourPressureHpa);
}

/** Saturation mixing ratio over water, kg/kg, with Bolton es. */
export function saturationMixingRatioKgPerKg(temperatureK: number, pressureHpa: number): number | null {
  return mixingRatioKgPerKg(saturationVapourPressureBoltonHpa(temperatureK), pressureHpa);
}

/** Mixing ratio from relative humidity (% over water, Bolton es), kg/kg. */
export function mixingRatioFromRelativeHumidityKgPerKg(
  temperatureK: number,
  pressureHpa: number,
  relativeHumidityPct: number,
): number | null {
  if (!Number.isFinite(relativeHumidityPct)) return null;
  const rh = Math.min(Math.max(relativeHumidityPct, 0), 100) / 100;
  return mixingRatioKgPerKg(rh * saturationVapourPressureBoltonHpa(temperatureK), pressureHpa);
}

/** Virtual temperature Tv = T·(1 + r/ε)/(1 + r), K (AMS Glossary, "virtual temperature"). */
export function virtualTemperatureK(temperatureK: number, mixingRatio: number): number {
  return (temperatureK * (1 + mixingRatio / EPSILON)) / (1 + mixingRatio);
}
