/** Adiabatic lapse rates and static-stability classes of a layer. */
import {
  DRY_AIR_GAS_CONSTANT_J_PER_KG_K,
  DRY_AIR_SPECIFIC_HEAT_J_PER_KG_K,
  EPSILON,
  LATENT_HEAT_VAPORISATION_J_PER_KG,
  STANDARD_GRAVITY_M_PER_S2,
} from "./constants";
import { saturationVapourPressureBoltonHpa } from "./moisture";
import type { StabilityClass } from "./types";

/** Dry adiabatic lapse rate Γd = g/cp, K/km (AMS Glossary, "dry-adiabatic lapse rate"). */
export function dryAdiabaticLapseRateKPerKm(
  gravityMPerS2: number = STANDARD_GRAVITY_M_PER_S2,
  specificHeatJPerKgK: number = DRY_AIR_SPECIFIC_HEAT_J_PER_KG_K,
): number | null {
  if (!Number.isFinite(gravityMPerS2) || !Number.isFinite(specificHeatJPerKgK) || specificHeatJPerKgK <= 0 || gravityMPerS2 <= 0) {
    return null;
  }
  return (gravityMPerS2 / specificHeatJPerKgK) * 1000;
}

/**
 * Saturated (pseudo-)adiabatic lapse rate on Earth, K/km, at temperature T (K) and pressure p (hPa):
 * Γm = g·(1 + Lv·rs/(Rd·T)) / (cpd + Lv²·rs·ε/(Rd·T²)), rs = ε·es/(p − es) with Bolton es.
 * Source: AMS Glossary, "moist-adiabatic lapse rate". When es ≥ p (very hot, very low pressure)
 * the air cannot be saturated and the dry rate is returned.
 */
export function moistAdiabaticLapseRateKPerKm(temperatureK: number, pressureHpa: number): number {
  const g = STANDARD_GRAVITY_M_PER_S2;
  const es = saturationVapourPressureBoltonHpa(temperatureK);
  if (!(temperatureK > 0) || !(pressureHpa > es)) {
    return (g / DRY_AIR_SPECIFIC_HEAT_J_PER_KG_K) * 1000;
  }
  const rs = (EPSILON * es) / (pressureHpa - es);
  const rd = DRY_AIR_GAS_CONSTANT_J_PER_KG_K;
  const lv = LATENT_HEAT_VAPORISATION_J_PER_KG;
  const numerator = g * (1 + (lv * rs) / (rd * temperatureK));
  const denominator = DRY_AIR_SPECIFIC_HEAT_J_PER_KG_K + (lv * lv * rs * EPSILON) / (rd * temperatureK * temperatureK);
  return (numerator / denominator) * 1000;
}

/**
 * dT/d(ln p) along the pseudo-adiabat, K: the saturated lapse rate above rewritten for pressure
 * with the hydrostatic relation dz = −(Rd·T/g)·d(ln p): (Rd·T + Lv·rs) / (cpd + Lv²·rs·ε/(Rd·T²)).
 * Falls back to the dry rate Rd·T/cpd where the air cannot be saturated (es ≥ p).
 */
function pseudoAdiabatSlopeKPerLnP(temperatureK: number, pressureHpa: number): number {
  const rd = DRY_AIR_GAS_CONSTANT_J_PER_KG_K;
  const es = saturationVapourPressureBoltonHpa(temperatureK);
  if (!(pressureHpa > es)) return (rd * temperatureK) / DRY_AIR_SPECIFIC_HEAT_J_PER_KG_K;
  const rs = (EPSILON * es) / (pressureHpa - es);
  const lv = LATENT_HEAT_VAPORISATION_J_PER_KG;
  return (rd * temperatureK + lv * rs) / (DRY_AIR_SPECIFIC_HEAT_J_PER_KG_K + (lv * lv * rs * EPSILON) / (rd * temperatureK * temperatureK));
}

/** Largest pressure step of the integration, hPa: halving it changes the result by well under 0.01 K. */
const PSEUDO_ADIABAT_STEP_HPA = 5;

/**
 * Temperatures (K) of a saturated parcel lifted pseudo-adiabatically from (startTemperatureK,
 * startPressureHpa) to each of `pressuresHpa` (same order; each at or below the start pressure,
 * in any order), i.e. the saturated adiabat through the start point. Integrates
 * dT/d(ln p) (pseudoAdiabatSlopeKPerLnP) with the classical fourth-order Runge–Kutta method.
 * Invalid inputs give NaN entries. Source: the moist-adiabatic lapse rate of the AMS Glossary (as
 * above) with the hydrostatic equation; a check: the equivalent potential temperature (Bolton 1980)
 * stays nearly constant along the result (test/analysis/moisture-stability.test.ts).
 */
export function pseudoAdiabatTemperaturesK(startTemperatureK: number, startPressureHpa: number, pressuresHpa: readonly number[]): number[] {
  if (!(startTemperatureK > 0) || !(startPressureHpa > 0)) return pressuresHpa.map(() => Number.NaN);
  const order = pressuresHpa.map((p, i) => ({ p, i })).filter(({ p }) => p > 0 && p <= startPressureHpa).sort((a, b) => b.p - a.p);
  const out = pressuresHpa.map(() => Number.NaN);
  let temperatureK = startTemperatureK;
  let pressureHpa = startPressureHpa;
  const slope = (lnP: number, t: number) => pseudoAdiabatSlopeKPerLnP(t, Math.exp(lnP));
  for (const { p: target, i } of order) {
    while (pressureHpa > target) {
      const next = Math.max(target, pressureHpa - PSEUDO_ADIABAT_STEP_HPA);
      const l0 = Math.log(pressureHpa);
      const h = Math.log(next) - l0;
      const k1 = slope(l0, temperatureK);
      const k2 = slope(l0 + h / 2, temperatureK + (h / 2) * k1);
      const k3 = slope(l0 + h / 2, temperatureK + (h / 2) * k2);
      const k4 = slope(l0 + h, temperatureK + h * k3);
      temperatureK += (h / 6) * (k1 + 2 * k2 + 2 * k3 + k4);
      pressureHpa = next;
    }
    out[i] = temperatureK;
  }
  return out;
}

/**
 * Static-stability class from the environmental lapse rate Γe = −dT/dz (K/km) against Γd and Γm:
 * Γe ≤ Γm absolutely stable (inversions and isothermal layers included), Γm < Γe ≤ Γd conditionally
 * unstable, Γe > Γd absolutely unstable. Source: standard texts, e.g. FAA Aviation Weather Handbook
 * FAA-H-8083-28; the equality cases are assigned to the more stable class. Null when any rate is not finite.
 */
export function classifyStability(
  environmentalLapseRateKPerKm: number,
  dryAdiabaticKPerKm: number,
  moistAdiabaticKPerKm: number,
): StabilityClass | null {
  if (!Number.isFinite(environmentalLapseRateKPerKm) || !Number.isFinite(dryAdiabaticKPerKm) || !Number.isFinite(moistAdiabaticKPerKm)) return null;
  if (environmentalLapseRateKPerKm <= moistAdiabaticKPerKm) return "absolutely-stable";
  if (environmentalLapseRateKPerKm <= dryAdiabaticKPerKm) return "conditionally-unstable";
  return "absolutely-unstable";
}
