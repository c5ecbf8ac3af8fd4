/**
 * Altitude from pressure when GPS altitude is missing or implausible: hypsometric integration
 * with the measured (virtual) temperature, or the standard-atmosphere pressure altitude.
 */
import { STANDARD_GRAVITY_M_PER_S2, USSA76_SPECIFIC_GAS_CONSTANT_J_PER_KG_K } from "./constants";
import { mixingRatioFromRelativeHumidityKgPerKg, virtualTemperatureK } from "./moisture";
import { geometricToGeopotentialM, geopotentialToGeometricM } from "./standard-atmosphere";
import { valueAt } from "./typed-arrays";

/**
 * Hypsometric thickness (geopotential m) between pressures p1 (lower) and p2 (upper), hPa, for a
 * layer-mean virtual temperature T̄v (K): z2 − z1 = (R·T̄v/g0)·ln(p1/p2) (AMS Glossary,
 * "hypsometric equation"). R is the USSA76 dry-air constant so that integration through the
 * standard atmosphere reproduces its altitudes. Null for non-positive or non-finite input.
 */
export function hypsometricThicknessM(lowerPressureHpa: number, upperPressureHpa: number, meanVirtualTemperatureK: number): number | null {
  if (!(lowerPressureHpa > 0) || !(upperPressureHpa > 0) || !(meanVirtualTemperatureK > 0)) return null;
  const dz = ((USSA76_SPECIFIC_GAS_CONSTANT_J_PER_KG_K * meanVirtualTemperatureK) / STANDARD_GRAVITY_M_PER_S2) *
    Math.log(lowerPressureHpa / upperPressureHpa);
  return Number.isFinite(dz) ? dz : null;
}

/**
 * Geometric altitudes (m) for a time-ordered series by integrating the hypsometric equation from
 * sample `startIndex`, placed at startAltitudeM. Each step uses the mean virtual temperature of
 * the two samples (virtual when relative humidity is given, else plain T). Integration runs in
 * geopotential metres and is converted to geometric with the USSA76 Earth radius. Samples without
 * a positive pressure and a temperature get NaN (internal; callers must treat NaN as missing) and
 * are skipped, the integration continuing from the last valid sample.
 */
export function integrateHypsometricAltitudesM(
  pressureHpa: ArrayLike<number>,
  temperatureK: ArrayLike<number>,
  relativeHumidityPct: ArrayLike<number> | null,
  startIndex: number,
  startAltitudeM: number,
): Float64Array {
  const n = pressureHpa.length;
  const out = new Float64Array(n).fill(Number.NaN);
  const tv = (i: number): number => {
    const t = valueAt(temperatureK, i);
    const p = valueAt(pressureHpa, i);
    const rh = relativeHumidityPct ? valueAt(relativeHumidityPct, i) : Number.NaN;
    if (Number.isFinite(rh)) {
      const r = mixingRatioFromRelativeHumidityKgPerKg(t, p, rh);
      if (r !== null) return virtualTemperatureK(t, r);
    }
    return t;
  };
  const valid = (i: number) => valueAt(pressureHpa, i) > 0 && valueAt(temperatureK, i) > 0;
  if (startIndex < 0 || startIndex >= n || !valid(startIndex)) return out;
  let geopotentialM = geometricToGeopotentialM(startAltitudeM);
  out[startIndex] = startAltitudeM;
  let prev = startIndex;
  let prevTv = tv(startIndex);
  for (let i = startIndex + 1; i < n; i++) {
    if (!valid(i)) continue;
    const currentTv = tv(i);
    const dz = hypsometricThicknessM(valueAt(pressureHpa, prev), valueAt(pressureHpa, i), (prevTv + currentTv) / 2);
    if (dz === null) continue;
    geopotentialM += dz;
    out[i] = geopotentialToGeometricM(geopotentialM);
    prev = i;
    prevTv = currentTv;
  }
  return out;
}
