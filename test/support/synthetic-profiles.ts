/**
 * Synthetic soundings for tests and benchmarks: a balloon climbing (and optionally falling)
 * through a given temperature profile, sampled at a fixed rate, with seeded noise, optional
 * first-order sensor lag, hydrostatic pressure and injected GPS spikes. Deterministic.
 */
import type { ProfileLevel, RawSample, SiteInfo, TemperatureCalibration } from "../../lib/analysis/types";
import { standardAtmosphereAt } from "../../lib/analysis/standard-atmosphere";
import { mulberry32 } from "../../lib/stats/random";

/** Seeded uniform numbers in [0, 1): the project's one generator (mulberry32, lib/stats/random.ts). */
export function seededUniform(seed: number): () => number {
  return mulberry32(seed);
}

/** Standard normal deviates (Box–Muller) from a seeded uniform source. */
export function seededGaussian(seed: number): () => number {
  const u = seededUniform(seed);
  return () => {
    const u1 = Math.max(u(), 1e-12);
    const u2 = u();
    return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
  };
}

/** Raw column is already kelvin. */
export const KELVIN_DIRECT: TemperatureCalibration = { input: "kelvin", sensor: { kind: "direct" } };

export const SEA_LEVEL_SITE: SiteInfo = { latitudeDeg: 45, longitudeDeg: 7, elevationM: 0 };

/** USSA76 temperature at a geometric altitude, K. */
export function standardAtmosphereTemperatureK(altitudeM: number): number {
  const s = standardAtmosphereAt(altitudeM);
  if (!s) throw new Error(`altitude ${altitudeM} m outside the standard atmosphere`);
  return s.temperatureK;
}

export interface SyntheticFlightOptions {
  /** Relative humidity over water (%) at an altitude; without it rows have no humidity. */
  relativeHumidityAtAltitudePct?: (altitudeM: number) => number;
  /** Air temperature profile, K. */
  temperatureAtAltitudeK: (altitudeM: number) => number;
  groundM?: number;
  topM: number;
  ascentRateMPerS?: number;
  /** 0 = the record ends at burst. */
  descentRateMPerS?: number;
  sampleIntervalS?: number;
  preLaunchS?: number;
  postLandingS?: number;
  /** Gaussian temperature noise SD, K. */
  noiseK?: number;
  seed?: number;
  /** First-order sensor time constant, s (0 = perfect sensor). */
  sensorTimeConstantS?: number;
  /** Add hydrostatic pressure (integrated from the profile, 1013.25 hPa at 0 m). */
  withPressure?: boolean;
  /** Add GPS altitude offsets at these sample indices. */
  gpsSpikes?: ReadonlyArray<{ index: number; offsetM: number }>;
}

/**
 * Hydrostatic pressure from a temperature profile on a 10 m grid from 0 m (1013.25 hPa), with
 * gravity falling off as g0·(r0/(r0 + z))² so that z is geometric altitude, as GPS reports it.
 */
function pressureProfile(temperatureAtAltitudeK: (z: number) => number, groundM: number, topM: number): (z: number) => number {
  const stepM = 10;
  const lo = Math.min(0, groundM);
  const count = Math.ceil((topM - lo) / stepM) + 2;
  const lnP = new Float64Array(count);
  const r = 8314.32 / 28.9644;
  const r0 = 6356766;
  const gAt = (z: number) => 9.80665 * (r0 / (r0 + z)) ** 2;
  // Integrate from 0 m upward and downward so that p(0) = 1013.25 hPa.
  const zeroIndex = Math.round(-lo / stepM);
  lnP[zeroIndex] = Math.log(1013.25);
  for (let i = zeroIndex + 1; i < count; i++) {
    const zMid = lo + (i - 0.5) * stepM;
    lnP[i] = (lnP[i - 1] as number) - (gAt(zMid) * stepM) / (r * temperatureAtAltitudeK(zMid));
  }
  for (let i = zeroIndex - 1; i >= 0; i--) {
    const zMid = lo + (i + 0.5) * stepM;
    lnP[i] = (lnP[i + 1] as number) + (gAt(zMid) * stepM) / (r * temperatureAtAltitudeK(zMid));
  }
  return (z: number) => {
    const x = (z - lo) / stepM;
    const i = Math.min(Math.max(Math.floor(x), 0), count - 2);
    const f = x - i;
    return Math.exp((lnP[i] as number) * (1 - f) + (lnP[i + 1] as number) * f);
  };
}

/** Rows of a synthetic flight (raw temperature in K, GPS altitude in m). */
export function syntheticFlight(options: SyntheticFlightOptions): RawSample[] {
  const groundM = options.groundM ?? 0;
  const up = options.ascentRateMPerS ?? 5;
  const down = options.descentRateMPerS ?? 0;
  const dt = options.sampleIntervalS ?? 1;
  const pre = options.preLaunchS ?? 60;
  const post = down > 0 ? (options.postLandingS ?? 60) : 0;
  const noise = seededGaussian(options.seed ?? 1);
  const noiseK = options.noiseK ?? 0;
  const tau = options.sensorTimeConstantS ?? 0;
  const ascentS = (options.topM - groundM) / up;
  const descentS = down > 0 ? (options.topM - groundM) / down : 0;
  const totalS = pre + ascentS + descentS + post;
  const altitudeAt = (t: number): number => {
    if (t <= pre) return groundM;
    if (t <= pre + ascentS) return groundM + (t - pre) * up;
    if (down > 0 && t <= pre + ascentS + descentS) return options.topM - (t - pre - ascentS) * down;
    return down > 0 ? groundM : options.topM;
  };
  const pressureAt = options.withPressure ? pressureProfile(options.temperatureAtAltitudeK, groundM, options.topM) : null;
  const spikes = new Map((options.gpsSpikes ?? []).map((s) => [s.index, s.offsetM]));
  const rows: RawSample[] = [];
  let sensorK = options.temperatureAtAltitudeK(groundM);
  let prevAirK = sensorK;
  const steps = Math.floor(totalS / dt);
  for (let k = 0; k <= steps; k++) {
    const t = k * dt;
    const z = altitudeAt(t);
    const airK = options.temperatureAtAltitudeK(z);
    if (tau > 0 && k > 0) {
      // Exact first-order response to an input that varies linearly over the step.
      const slope = (airK - prevAirK) / dt;
      const decay = Math.exp(-dt / tau);
      sensorK = airK - tau * slope + (sensorK - prevAirK + tau * slope) * decay;
    } else {
      sensorK = airK;
    }
    prevAirK = airK;
    rows.push({
      elapsedS: t,
      altitudeM: z + (spikes.get(k) ?? 0),
      rawTemperature: sensorK + noiseK * noise(),
      pressureHpa: pressureAt ? pressureAt(z) : null,
      relativeHumidityPct: options.relativeHumidityAtAltitudePct ? options.relativeHumidityAtAltitudePct(z) : null,
      latitudeDeg: 45,
      longitudeDeg: 7,
      sourceLine: k + 2,
    });
  }
  return rows;
}

/** Noise-free profile levels: each bin's temperature is the mean of 20 points spread through it. */
export function levelsFromProfile(
  temperatureAtAltitudeK: (altitudeM: number) => number,
  fromM: number,
  toM: number,
  binSizeM = 100,
  phase: ProfileLevel["phase"] = "ascent",
): ProfileLevel[] {
  const levels: ProfileLevel[] = [];
  for (let base = fromM; base + binSizeM <= toM + 1e-9; base += binSizeM) {
    let sum = 0;
    for (let k = 0; k < 20; k++) sum += temperatureAtAltitudeK(base + ((k + 0.5) * binSizeM) / 20);
    levels.push({
      phase, baseM: base, topM: base + binSizeM, altitudeM: base + binSizeM / 2, sampleCount: 20,
      temperatureK: sum / 20, temperatureSdK: null, pressureHpa: null, relativeHumidityPct: null,
    });
  }
  return levels;
}

/** Piecewise-linear temperature profile through (altitude m, temperature K) nodes. */
export function piecewiseProfile(nodes: ReadonlyArray<readonly [number, number]>): (altitudeM: number) => number {
  return (z: number) => {
    const first = nodes[0];
    const last = nodes[nodes.length - 1];
    if (!first || !last) return Number.NaN;
    if (z <= first[0]) return first[1];
    for (let i = 0; i + 1 < nodes.length; i++) {
      const a = nodes[i] as readonly [number, number];
      const b = nodes[i + 1] as readonly [number, number];
      if (z <= b[0]) return a[1] + ((b[1] - a[1]) * (z - a[0])) / (b[0] - a[0]);
    }
    return last[1];
  };
}
