/**
 * Planetary bodies: dry adiabatic lapse rates and reference temperature curves to overlay on an
 * Earth flight for teaching comparisons.
 */
import { STANDARD_GRAVITY_M_PER_S2, ZERO_CELSIUS_K } from "./constants";
import { standardAtmosphereAt } from "./standard-atmosphere";

export type BodyId = "earth" | "mars" | "venus" | "titan";

export interface PlanetaryBody {
  id: BodyId;
  name: string;
  gravityMPerS2: number;
  specificHeatJPerKgK: number;
}

/** Surface gravity and cp. Source: NASA PDS Atmospheres node, adiabatic lapse rate table. */
export const PLANETARY_BODIES: Readonly<Record<BodyId, PlanetaryBody>> = {
  earth: { id: "earth", name: "Earth", gravityMPerS2: 9.7986, specificHeatJPerKgK: 1004.0 },
  mars: { id: "mars", name: "Mars", gravityMPerS2: 3.741, specificHeatJPerKgK: 831.2 },
  venus: { id: "venus", name: "Venus", gravityMPerS2: 8.8989, specificHeatJPerKgK: 850.1 },
  titan: { id: "titan", name: "Titan", gravityMPerS2: 1.358, specificHeatJPerKgK: 1044.0 },
};

/**
 * Dry adiabatic lapse rate Γd = g/cp in K/km for a listed body or any custom g (m/s²) and cp
 * (J/(kg·K)). Null for non-positive or non-finite inputs. cp varies with temperature (notably on
 * Venus), so a custom cp can be passed for a given level.
 */
export function bodyDryAdiabaticLapseRateKPerKm(
  body: BodyId | { gravityMPerS2: number; specificHeatJPerKgK: number },
): number | null {
  const b = typeof body === "string" ? PLANETARY_BODIES[body] : body;
  if (!Number.isFinite(b.gravityMPerS2) || !Number.isFinite(b.specificHeatJPerKgK)) return null;
  if (b.gravityMPerS2 <= 0 || b.specificHeatJPerKgK <= 0) return null;
  return (b.gravityMPerS2 / b.specificHeatJPerKgK) * 1000;
}

/**
 * Mars atmosphere engineering model (NASA Glenn Research Center): T(°C) = −31 − 0.000998·h for
 * h < 7000 m, −23.4 − 0.00222·h above; returns K. h is altitude above the Mars datum, m.
 */
export function marsEngineeringTemperatureK(altitudeM: number): number | null {
  if (!Number.isFinite(altitudeM)) return null;
  const celsius = altitudeM < 7000 ? -31 - 0.000998 * altitudeM : -23.4 - 0.00222 * altitudeM;
  const k = celsius + ZERO_CELSIUS_K;
  return k > 0 ? k : null;
}

/** Mars engineering model pressure p(kPa) = 0.699·exp(−0.00009·h), returned in hPa. */
export function marsEngineeringPressureHpa(altitudeM: number): number | null {
  if (!Number.isFinite(altitudeM)) return null;
  return 0.699 * Math.exp(-0.00009 * altitudeM) * 10;
}

/** Venus International Reference Atmosphere (Seiff et al. 1985), altitude km → temperature K. */
export const VENUS_REFERENCE_TABLE: ReadonlyArray<{ altitudeKm: number; temperatureK: number }> = [
  { altitudeKm: 0, temperatureK: 735.3 },
  { altitudeKm: 10, temperatureK: 658.2 },
  { altitudeKm: 20, temperatureK: 580.7 },
  { altitudeKm: 30, temperatureK: 496.9 },
  { altitudeKm: 40, temperatureK: 417.6 },
  { altitudeKm: 50, temperatureK: 350.5 },
  { altitudeKm: 60, temperatureK: 262.8 },
  { altitudeKm: 70, temperatureK: 229.8 },
];

/** Venus reference temperature, K, by linear interpolation in the table; null outside 0–70 km. */
export function venusReferenceTemperatureK(altitudeM: number): number | null {
  if (!Number.isFinite(altitudeM)) return null;
  const km = altitudeM / 1000;
  for (let i = 0; i + 1 < VENUS_REFERENCE_TABLE.length; i++) {
    const a = VENUS_REFERENCE_TABLE[i];
    const b = VENUS_REFERENCE_TABLE[i + 1];
    if (!a || !b) continue;
    if (km >= a.altitudeKm && km <= b.altitudeKm) {
      return a.temperatureK + ((b.temperatureK - a.temperatureK) * (km - a.altitudeKm)) / (b.altitudeKm - a.altitudeKm);
    }
  }
  return null;
}

export interface ReferenceCurve {
  id: BodyId;
  name: string;
  /** Altitude range where the curve is defined, m. */
  minAltitudeM: number;
  maxAltitudeM: number;
  /** Temperature at an altitude above the body's datum, K; null outside the range. */
  temperatureAtAltitude: (altitudeM: number) => number | null;
  dryAdiabaticLapseRateKPerKm: number | null;
}

/**
 * Reference temperature curve per body: Earth = USSA76 (0–86 km), Mars = engineering model
 * (0–40 km shown), Venus = reference table (0–70 km). Titan has no curve here (null).
 */
export function referenceCurve(id: BodyId): ReferenceCurve | null {
  const body = PLANETARY_BODIES[id];
  const dry = bodyDryAdiabaticLapseRateKPerKm(id);
  const inRange = (min: number, max: number, f: (z: number) => number | null) => (z: number) =>
    Number.isFinite(z) && z >= min && z <= max ? f(z) : null;
  switch (id) {
    case "earth":
      return {
        id, name: body.name, minAltitudeM: 0, maxAltitudeM: 86000, dryAdiabaticLapseRateKPerKm: dry,
        temperatureAtAltitude: inRange(0, 86000, (z) => standardAtmosphereAt(z)?.temperatureK ?? null),
      };
    case "mars":
      return {
        id, name: body.name, minAltitudeM: 0, maxAltitudeM: 40000, dryAdiabaticLapseRateKPerKm: dry,
        temperatureAtAltitude: inRange(0, 40000, marsEngineeringTemperatureK),
      };
    case "venus":
      return {
        id, name: body.name, minAltitudeM: 0, maxAltitudeM: 70000, dryAdiabaticLapseRateKPerKm: dry,
        temperatureAtAltitude: inRange(0, 70000, venusReferenceTemperatureK),
      };
    case "titan":
      return null;
  }
}

/** Earth's Γd with standard gravity and cp = 1004 J/(kg·K), K/km (≈ 9.768). */
export const EARTH_STANDARD_DRY_ADIABATIC_K_PER_KM = (STANDARD_GRAVITY_M_PER_S2 / 1004) * 1000;
