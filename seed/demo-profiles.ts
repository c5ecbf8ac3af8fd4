/**
 * Synthetic single-flight physics for the demo archive: a plausible (not real) air
 * temperature profile, a balloon trajectory through it, and what the instruments
 * record along the way (lagged, noisy temperature; GPS altitude with a few spikes;
 * hypsometric pressure; humidity).
 *
 * Temperatures are kelvin, altitudes metres above mean sea level (geometric), times
 * seconds since the logger was switched on.
 */
import { createPrng, type Prng } from "./prng.ts";

const GRAVITY_M_PER_S2 = 9.80665; // U.S. Standard Atmosphere 1976 g0
const DRY_AIR_GAS_CONSTANT = 287.04; // J/(kg·K), REFERENCE.md §3
const EARTH_RADIUS_M = 6_356_766; // U.S. Standard Atmosphere 1976 r0
const METRES_PER_DEGREE_LATITUDE = 111_320;
const SIMULATION_STEP_S = 1;

export interface SurfaceInversionSpec {
  depthM: number;
  /** T(top) − T(surface), K. */
  strengthK: number;
}

export interface ElevatedInversionSpec {
  baseM: number;
  depthM: number;
  /** Temperature rise across the layer, K. */
  strengthK: number;
  /** Above the layer the profile returns to the background line over this depth, m. */
  recoveryDepthM: number;
}

export interface AtmosphereSpec {
  surfaceAltitudeM: number;
  /** The free-troposphere line extrapolated to the surface (before any surface inversion), K. */
  surfaceTemperatureK: number;
  /** −dT/dz from the surface to the tropopause, K/km. */
  lapseRateKPerKm: number;
  tropopauseAltitudeM: number;
  /** Isothermal layer above the tropopause, m. */
  isothermalDepthM: number;
  /** dT/dz above the isothermal layer, K/km (positive: warming with height). */
  stratosphereWarmingKPerKm: number;
  surfaceInversion: SurfaceInversionSpec | null;
  elevatedInversion: ElevatedInversionSpec | null;
  surfacePressureHpa: number;
  surfaceHumidityPct: number;
  windEastMPerS: number;
  windNorthMPerS: number;
  /** Extra eastward wind peaking at the tropopause, m/s. */
  jetEastMPerS: number;
}

export interface FlightProfileParams {
  atmosphere: AtmosphereSpec;
  latitudeDeg: number;
  longitudeDeg: number;
  /** Mean ascent rate near the ground; the balloon speeds up slightly with height, m/s. */
  ascentRateMPerS: number;
  burstAltitudeM: number;
  /** Null: the record ends at burst (logger lost or switched off). */
  descent: { topRateMPerS: number; landingRateMPerS: number; landingAltitudeM: number } | null;
  preLaunchS: number;
  postLandingS: number;
  /** Whole seconds between logged rows. */
  sampleIntervalS: number;
  sensorTimeConstantS: number;
  sensorNoiseK: number;
  gpsSpikeCount: number;
  hasPressure: boolean;
  hasHumidity: boolean;
}

export type SamplePhase = "ground" | "ascent" | "descent" | "landed";

export interface ProfileSample {
  elapsedS: number;
  /** What the GPS reported (noise and spikes included), m. */
  altitudeM: number;
  trueAltitudeM: number;
  /** What the temperature sensor experienced (lag and noise included) — the value the raw reading encodes, K. */
  temperatureK: number;
  airTemperatureK: number;
  pressureHpa: number | null;
  humidityPct: number | null;
  latitudeDeg: number;
  longitudeDeg: number;
  phase: SamplePhase;
}

export interface FlightTruth {
  tropopauseAltitudeM: number;
  tropopauseTemperatureK: number;
  lapseRateKPerKm: number;
  /** 0 when there is no surface inversion. */
  surfaceInversionDepthM: number;
  surfaceInversionStrengthK: number;
  elevatedInversionBaseM: number | null;
  /** Air temperature at the launch site, inversion included, K. */
  surfaceTemperatureK: number;
  burstAltitudeM: number;
  hasDescent: boolean;
}

export interface FlightProfile {
  samples: ProfileSample[];
  truth: FlightTruth;
  /** Seconds from logger start to lift-off. */
  launchElapsedS: number;
}

/** Free-troposphere line and stratosphere, without inversions, K. */
export function backgroundTemperatureK(atmosphere: AtmosphereSpec, altitudeM: number): number {
  const a = atmosphere;
  const lapseKPerM = a.lapseRateKPerKm / 1000;
  const tropopauseK = a.surfaceTemperatureK - lapseKPerM * (a.tropopauseAltitudeM - a.surfaceAltitudeM);
  if (altitudeM <= a.tropopauseAltitudeM) {
    return a.surfaceTemperatureK - lapseKPerM * (altitudeM - a.surfaceAltitudeM);
  }
  const warmingBaseM = a.tropopauseAltitudeM + a.isothermalDepthM;
  if (altitudeM <= warmingBaseM) return tropopauseK;
  return tropopauseK + (a.stratosphereWarmingKPerKm / 1000) * (altitudeM - warmingBaseM);
}

/** True air temperature at an altitude, surface and elevated inversions included, K. */
export function airTemperatureK(atmosphere: AtmosphereSpec, altitudeM: number): number {
  const a = atmosphere;
  let temperatureK = backgroundTemperatureK(a, altitudeM);

  const surface = a.surfaceInversion;
  if (surface && altitudeM < a.surfaceAltitudeM + surface.depthM) {
    // Linear rise from the cold surface to the background line at the inversion top.
    const topM = a.surfaceAltitudeM + surface.depthM;
    const fractionBelowTop = Math.min(1, (topM - altitudeM) / surface.depthM);
    temperatureK = backgroundTemperatureK(a, topM) - surface.strengthK * fractionBelowTop;
  }

  const elevated = a.elevatedInversion;
  if (elevated && altitudeM > elevated.baseM) {
    // Warm bump: T rises by strengthK through the layer, then rejoins the background line,
    // so the mean lapse rate over the troposphere is unchanged.
    const peakK = elevated.strengthK + (a.lapseRateKPerKm / 1000) * elevated.depthM;
    const topM = elevated.baseM + elevated.depthM;
    if (altitudeM <= topM) {
      temperatureK += (peakK * (altitudeM - elevated.baseM)) / elevated.depthM;
    } else if (altitudeM < topM + elevated.recoveryDepthM) {
      temperatureK += peakK * (1 - (altitudeM - topM) / elevated.recoveryDepthM);
    }
  }
  return temperatureK;
}

function gravityMPerS2(altitudeM: number): number {
  const ratio = EARTH_RADIUS_M / (EARTH_RADIUS_M + altitudeM);
  return GRAVITY_M_PER_S2 * ratio * ratio;
}

interface PressureGrid {
  baseM: number;
  stepM: number;
  lnPressure: Float64Array;
}

/** ln p on a 10 m grid by hypsometric integration (dry air, g varying with height). */
function buildPressureGrid(atmosphere: AtmosphereSpec, lowestM: number, highestM: number): PressureGrid {
  const stepM = 10;
  const baseM = Math.floor((lowestM - 50) / stepM) * stepM;
  const count = Math.ceil((highestM + 50 - baseM) / stepM) + 1;
  const lnPressure = new Float64Array(count);
  const surfaceIndex = Math.round((atmosphere.surfaceAltitudeM - baseM) / stepM);
  const clampedSurface = Math.min(count - 1, Math.max(0, surfaceIndex));
  lnPressure[clampedSurface] = Math.log(atmosphere.surfacePressureHpa);
  const dLnP = (lowerM: number): number => {
    const midM = lowerM + stepM / 2;
    return -(gravityMPerS2(midM) * stepM) / (DRY_AIR_GAS_CONSTANT * airTemperatureK(atmosphere, midM));
  };
  for (let i = clampedSurface + 1; i < count; i += 1) {
    lnPressure[i] = (lnPressure[i - 1] ?? 0) + dLnP(baseM + (i - 1) * stepM);
  }
  for (let i = clampedSurface - 1; i >= 0; i -= 1) {
    lnPressure[i] = (lnPressure[i + 1] ?? 0) - dLnP(baseM + i * stepM);
  }
  return { baseM, stepM, lnPressure };
}

function pressureAtHpa(grid: PressureGrid, altitudeM: number): number {
  const position = (altitudeM - grid.baseM) / grid.stepM;
  const last = grid.lnPressure.length - 1;
  const i = Math.min(last - 1, Math.max(0, Math.floor(position)));
  const fraction = Math.min(1, Math.max(0, position - i));
  const lower = grid.lnPressure[i] ?? 0;
  const upper = grid.lnPressure[i + 1] ?? lower;
  return Math.exp(lower + (upper - lower) * fraction);
}

function relativeHumidityPct(atmosphere: AtmosphereSpec, altitudeM: number): number {
  if (altitudeM >= atmosphere.tropopauseAltitudeM) return 3;
  const heightM = Math.max(0, altitudeM - atmosphere.surfaceAltitudeM);
  return Math.max(3, atmosphere.surfaceHumidityPct * Math.exp(-heightM / 3000));
}

function windAt(atmosphere: AtmosphereSpec, altitudeM: number): { eastMPerS: number; northMPerS: number } {
  const jetShape = Math.exp(-(((altitudeM - atmosphere.tropopauseAltitudeM) / 3500) ** 2));
  const stratosphereDamping = altitudeM > atmosphere.tropopauseAltitudeM + 6000 ? 0.4 : 1;
  return {
    eastMPerS: (atmosphere.windEastMPerS + atmosphere.jetEastMPerS * jetShape) * stratosphereDamping,
    northMPerS: atmosphere.windNorthMPerS * stratosphereDamping,
  };
}

/**
 * Simulates one flight: ground rows, ascent to burst, optional descent and rows after
 * landing, sampled every params.sampleIntervalS seconds. Same params and seed give the
 * same samples.
 */
export function generateFlightProfile(params: FlightProfileParams, seed: number): FlightProfile {
  const rng = createPrng(seed);
  const atmosphere = params.atmosphere;
  const surfaceM = atmosphere.surfaceAltitudeM;
  const landingM = params.descent?.landingAltitudeM ?? surfaceM;
  const grid = params.hasPressure
    ? buildPressureGrid(atmosphere, Math.min(surfaceM, landingM), params.burstAltitudeM)
    : null;
  const wobblePhase = rng.uniform(0, 2 * Math.PI);
  const wobblePeriodS = rng.uniform(400, 900);
  const landedAirK = backgroundTemperatureK(atmosphere, landingM) + rng.uniform(0, 1.5);
  const intervalS = Math.max(1, Math.round(params.sampleIntervalS));

  const samples: ProfileSample[] = [];
  let phase: SamplePhase = "ground";
  let altitudeM = surfaceM;
  let eastM = 0;
  let northM = 0;
  let sensorK = airTemperatureK(atmosphere, surfaceM);
  let landedAtS: number | null = null;
  const launchElapsedS = params.preLaunchS;

  for (let elapsedS = 0; ; elapsedS += SIMULATION_STEP_S) {
    if (phase === "ground" && elapsedS >= launchElapsedS) phase = "ascent";

    if (phase === "ascent") {
      const heightKm = (altitudeM - surfaceM) / 1000;
      const wobble = 0.25 * Math.sin((2 * Math.PI * elapsedS) / wobblePeriodS + wobblePhase);
      altitudeM += (params.ascentRateMPerS * (1 + 0.006 * heightKm) + wobble) * SIMULATION_STEP_S;
      if (altitudeM >= params.burstAltitudeM) {
        altitudeM = params.burstAltitudeM;
        if (!params.descent) {
          if (elapsedS % intervalS === 0) pushSample(elapsedS);
          break;
        }
        phase = "descent";
      }
    } else if (phase === "descent" && params.descent) {
      const d = params.descent;
      const fraction = Math.max(0, (altitudeM - d.landingAltitudeM) / (params.burstAltitudeM - d.landingAltitudeM));
      altitudeM -= (d.landingRateMPerS + (d.topRateMPerS - d.landingRateMPerS) * fraction) * SIMULATION_STEP_S;
      if (altitudeM <= d.landingAltitudeM) {
        altitudeM = d.landingAltitudeM;
        phase = "landed";
        landedAtS = elapsedS;
      }
    }

    if (phase === "ascent" || phase === "descent") {
      const wind = windAt(atmosphere, altitudeM);
      eastM += wind.eastMPerS * SIMULATION_STEP_S;
      northM += wind.northMPerS * SIMULATION_STEP_S;
    }

    const airK = phase === "landed" ? landedAirK : airTemperatureK(atmosphere, altitudeM);
    // First-order sensor response, exact for a constant air temperature over the step.
    sensorK += (airK - sensorK) * (1 - Math.exp(-SIMULATION_STEP_S / params.sensorTimeConstantS));

    if (elapsedS % intervalS === 0) pushSample(elapsedS);
    if (landedAtS !== null && elapsedS >= landedAtS + params.postLandingS) break;
  }

  function pushSample(elapsedS: number): void {
    const airK = phase === "landed" ? landedAirK : airTemperatureK(atmosphere, altitudeM);
    const latitudeDeg = params.latitudeDeg + northM / METRES_PER_DEGREE_LATITUDE + rng.normal(0, 0.000015);
    const longitudeDeg =
      params.longitudeDeg +
      eastM / (METRES_PER_DEGREE_LATITUDE * Math.cos((params.latitudeDeg * Math.PI) / 180)) +
      rng.normal(0, 0.000015);
    const pressureHpa = grid ? Math.max(0.01, pressureAtHpa(grid, altitudeM) + rng.normal(0, 0.08)) : null;
    const humidityPct = params.hasHumidity
      ? Math.min(100, Math.max(0.5, relativeHumidityPct(atmosphere, altitudeM) + rng.normal(0, 1.5)))
      : null;
    samples.push({
      elapsedS,
      altitudeM: altitudeM + rng.normal(0, 2.5),
      trueAltitudeM: altitudeM,
      temperatureK: sensorK + rng.normal(0, params.sensorNoiseK),
      airTemperatureK: airK,
      pressureHpa,
      humidityPct,
      latitudeDeg,
      longitudeDeg,
      phase,
    });
  }

  addGpsSpikes(samples, params.gpsSpikeCount, rng);

  const surfaceInversion = atmosphere.surfaceInversion;
  return {
    samples,
    launchElapsedS,
    truth: {
      tropopauseAltitudeM: atmosphere.tropopauseAltitudeM,
      tropopauseTemperatureK: backgroundTemperatureK(atmosphere, atmosphere.tropopauseAltitudeM),
      lapseRateKPerKm: atmosphere.lapseRateKPerKm,
      surfaceInversionDepthM: surfaceInversion?.depthM ?? 0,
      surfaceInversionStrengthK: surfaceInversion?.strengthK ?? 0,
      elevatedInversionBaseM: atmosphere.elevatedInversion?.baseM ?? null,
      surfaceTemperatureK: airTemperatureK(atmosphere, surfaceM),
      burstAltitudeM: params.burstAltitudeM,
      hasDescent: params.descent !== null,
    },
  };
}

/** A GPS glitch: one or two rows jump by hundreds to thousands of metres, then recover. */
function addGpsSpikes(samples: ProfileSample[], count: number, rng: Prng): void {
  const airborne: number[] = [];
  samples.forEach((sample, index) => {
    if (sample.phase === "ascent" || sample.phase === "descent") airborne.push(index);
  });
  if (airborne.length < 10) return;
  for (let spike = 0; spike < count; spike += 1) {
    const start = rng.pick(airborne);
    const jumpM = (rng.chance(0.5) ? 1 : -1) * rng.uniform(300, 2500);
    const width = rng.int(1, 2);
    for (let k = 0; k < width; k += 1) {
      const sample = samples[start + k];
      if (sample) sample.altitudeM += jumpM;
    }
  }
}

/** Northern-hemisphere-equivalent monthly mean tropospheric lapse rates, K/km (invented climatology, tuned to the brief: JJA ≈ 6.8, Oct–Nov ≈ 5.8). */
const MONTHLY_LAPSE_RATE_K_PER_KM = [6.0, 6.1, 6.3, 6.5, 6.7, 6.8, 6.9, 6.8, 6.4, 5.9, 5.7, 5.9] as const;

export interface SiteClimate {
  latitudeDeg: number;
  elevationM: number;
  /** Annual mean of the surface background temperature, K. */
  annualMeanK: number;
  /** Half the summer–winter difference, K. */
  annualAmplitudeK: number;
}

export interface FlightConditionsContext {
  climate: SiteClimate;
  /** Local calendar month, 1–12. */
  month: number;
  /** Day of the year, 1–366. */
  dayOfYear: number;
  /** Hours from local sunrise to launch (negative before sunrise). */
  hoursAfterSunrise: number;
}

/** Month counted as if in the northern hemisphere, so seasonal tables apply to both. */
export function northernEquivalentMonth(month: number, latitudeDeg: number): number {
  return latitudeDeg >= 0 ? month : ((month + 5) % 12) + 1;
}

/** U.S. Standard Atmosphere 1976 pressure at a geopotential height below 11 km, hPa. */
function standardPressureHpa(altitudeM: number): number {
  return 1013.25 * (1 - (0.0065 * altitudeM) / 288.15) ** 5.25588;
}

/**
 * Draws one flight's atmosphere from an invented climatology: seasonal surface
 * temperature and lapse rate, seasonal tropopause height with scatter, dawn surface
 * inversions that fade over the first ~3 h after sunrise, occasional elevated inversions.
 * `dayRng` drives the large-scale state (surface temperature, lapse rate, tropopause,
 * pressure, winds) so two flights from one site on one day share it; `rng` drives the
 * boundary layer and humidity of this flight.
 */
export function drawAtmosphere(context: FlightConditionsContext, dayRng: Prng, rng: Prng): AtmosphereSpec {
  const { climate, hoursAfterSunrise } = context;
  const southern = climate.latitudeDeg < 0;
  const northernMonth = northernEquivalentMonth(context.month, climate.latitudeDeg);
  const northernDay = southern ? ((context.dayOfYear + 182) % 365) + 1 : context.dayOfYear;
  const seasonCycle = Math.cos((2 * Math.PI * (northernDay - 200)) / 365.25); // +1 late July, −1 late January

  const surfaceTemperatureK = climate.annualMeanK + climate.annualAmplitudeK * seasonCycle + dayRng.normal(0, 3);
  const monthlyLapse = MONTHLY_LAPSE_RATE_K_PER_KM[northernMonth - 1] ?? 6.5;
  const lapseRateKPerKm = clamp(monthlyLapse + dayRng.normal(0, 0.25), 5.0, 7.8);
  const tropopauseMeanM = 11_500 + 1_000 * seasonCycle - 25 * (Math.abs(climate.latitudeDeg) - 40);
  const tropopauseAltitudeM = Math.round(clamp(tropopauseMeanM + dayRng.normal(0, 450), 9_000, 14_000));

  const fade = clamp(1 - hoursAfterSunrise / 3, 0, 1);
  let surfaceInversion: SurfaceInversionSpec | null = null;
  if (fade > 0 && rng.chance(0.85)) {
    const strengthK = rng.uniform(1.5, 6) * fade;
    const depthM = Math.max(100, rng.uniform(150, 500) * (0.6 + 0.4 * fade));
    if (strengthK >= 1) surfaceInversion = { depthM: Math.round(depthM), strengthK: round(strengthK, 2) };
  }

  let elevatedInversion: ElevatedInversionSpec | null = null;
  if (rng.chance(0.2)) {
    const lowestBaseM = climate.elevationM + (surfaceInversion?.depthM ?? 0) + 800;
    const highestBaseM = Math.min(climate.elevationM + 4_500, tropopauseAltitudeM - 3_000);
    if (highestBaseM > lowestBaseM) {
      elevatedInversion = {
        baseM: Math.round(rng.uniform(lowestBaseM, highestBaseM)),
        depthM: Math.round(rng.uniform(100, 400)),
        strengthK: round(rng.uniform(0.8, 3), 2),
        recoveryDepthM: Math.round(rng.uniform(600, 1_200)),
      };
    }
  }

  return {
    surfaceAltitudeM: climate.elevationM,
    surfaceTemperatureK: round(surfaceTemperatureK, 2),
    lapseRateKPerKm: round(lapseRateKPerKm, 3),
    tropopauseAltitudeM,
    isothermalDepthM: Math.round(dayRng.uniform(2_500, 6_000)),
    stratosphereWarmingKPerKm: round(dayRng.uniform(1, 2), 2),
    surfaceInversion,
    elevatedInversion,
    surfacePressureHpa: round(standardPressureHpa(climate.elevationM) + dayRng.normal(0, 7), 2),
    surfaceHumidityPct: clamp(78 - 5 * Math.max(0, hoursAfterSunrise) + rng.normal(0, 8), 25, 98),
    windEastMPerS: dayRng.normal(4, 3),
    windNorthMPerS: dayRng.normal(0, 3),
    jetEastMPerS: dayRng.uniform(8, 35) * (1.2 - 0.4 * seasonCycle),
  };
}

/** Balloon and record-keeping choices for one flight (everything except the atmosphere). */
export function drawFlightParams(
  atmosphere: AtmosphereSpec,
  site: { latitudeDeg: number; longitudeDeg: number },
  instrument: { sensorTimeConstantS: number; hasPressure: boolean; hasHumidity: boolean; sampleIntervalS: number },
  rng: Prng,
): FlightProfileParams {
  const hasDescent = rng.chance(0.6);
  const intervalS = instrument.sampleIntervalS;
  return {
    atmosphere,
    latitudeDeg: site.latitudeDeg,
    longitudeDeg: site.longitudeDeg,
    ascentRateMPerS: round(rng.uniform(4.6, 5.4), 2),
    burstAltitudeM: Math.round(rng.uniform(25_000, 33_000)),
    descent: hasDescent
      ? {
          topRateMPerS: round(rng.uniform(12.5, 15), 2),
          landingRateMPerS: round(rng.uniform(7.5, 9), 2),
          landingAltitudeM: Math.round(atmosphere.surfaceAltitudeM + rng.uniform(-40, 120)),
        }
      : null,
    preLaunchS: intervalS * Math.round(rng.uniform(60, 300) / intervalS),
    postLandingS: Math.round(rng.uniform(60, 480)),
    sampleIntervalS: intervalS,
    sensorTimeConstantS: instrument.sensorTimeConstantS,
    sensorNoiseK: 0.2,
    gpsSpikeCount: rng.chance(0.55) ? rng.int(1, 3) : 0,
    hasPressure: instrument.hasPressure,
    hasHumidity: instrument.hasHumidity,
  };
}

function clamp(value: number, lo: number, hi: number): number {
  return Math.min(hi, Math.max(lo, value));
}

function round(value: number, decimals: number): number {
  const factor = 10 ** decimals;
  return Math.round(value * factor) / factor;
}
