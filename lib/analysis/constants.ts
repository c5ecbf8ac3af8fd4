/**
 * Physical constants. Standard-atmosphere values are exactly those of the U.S. Standard
 * Atmosphere 1976 (which equals ICAO/ISO 2533 below 32 km); the modern CODATA gas constant is
 * deliberately not used so that tables reproduce.
 */

/** Standard gravity, m/s² (USSA76). */
export const STANDARD_GRAVITY_M_PER_S2 = 9.80665;
/** Universal gas constant as used by USSA76, J/(mol·K). */
export const USSA76_GAS_CONSTANT_J_PER_MOL_K = 8.31432;
/** Mean molar mass of dry air at sea level, kg/mol (USSA76: 28.9644 kg/kmol). */
export const USSA76_MOLAR_MASS_KG_PER_MOL = 0.0289644;
/** Specific gas constant of dry air implied by USSA76, J/(kg·K) (≈ 287.053). */
export const USSA76_SPECIFIC_GAS_CONSTANT_J_PER_KG_K =
  USSA76_GAS_CONSTANT_J_PER_MOL_K / USSA76_MOLAR_MASS_KG_PER_MOL;
/** Effective Earth radius for geopotential conversion, m (USSA76). */
export const USSA76_EARTH_RADIUS_M = 6356766;
/** Sea-level standard temperature, K. */
export const USSA76_SEA_LEVEL_TEMPERATURE_K = 288.15;
/** Sea-level standard pressure, Pa. */
export const USSA76_SEA_LEVEL_PRESSURE_PA = 101325;

/** Moisture constants (AMS Glossary usage). Gas constant of dry air, J/(kg·K). */
export const DRY_AIR_GAS_CONSTANT_J_PER_KG_K = 287.04;
/** Gas constant of water vapour, J/(kg·K). */
export const WATER_VAPOUR_GAS_CONSTANT_J_PER_KG_K = 461.5;
/** Ratio of the gas constants of dry air and water vapour (dimensionless). */
export const EPSILON = 0.622;
/** Specific heat of dry air at constant pressure, J/(kg·K). */
export const DRY_AIR_SPECIFIC_HEAT_J_PER_KG_K = 1004;
/** Latent heat of vaporisation at 0 °C, J/kg. */
export const LATENT_HEAT_VAPORISATION_J_PER_KG = 2.501e6;

/** 0 °C in kelvin. */
export const ZERO_CELSIUS_K = 273.15;
