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
 * Static-stability class from the environmental lapse rate Γe = −dT/dz (K/km) against Γd and Γm:
 * Γe ≤ Γm absolutely stable (inversions and isothermal layers included), Γm < Γe ≤ Γd conditionally
 * unstable, Γe > Γd absolutely unstable. Source: standard texts, e.g. FAA Aviation Weather Handbook
 * FAA-H-8083-28; the equality cases are assigned to the more stable class.
 */
export function classifyStability(
  environmentalLapseRateKPerKm: number,
  dryAdiabaticKPerKm: number,
  moistAdiabaticKPerKm: number,
): StabilityClass {
  if (environmentalLapseRateKPerKm <= moistAdiabaticKPerKm) return "absolutely-stable";
  if (environmentalLapseRateKPerKm <= dryAdiabaticKPerKm) return "conditionally-unstable";
  return "absolutely-unstable";
}
