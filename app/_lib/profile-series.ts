/**
 * Turns stored levels, layers and summary numbers of one analysis run into the serializable
 * series the temperature–altitude chart draws. Pure: no data access, no clock.
 */
import { moistAdiabaticLapseRateKPerKm, pseudoAdiabatTemperaturesK } from "@/lib/analysis/stability";
import { standardAtmosphereAt } from "@/lib/analysis/standard-atmosphere";
import { kelvinToCelsius } from "@/lib/analysis/units";

export interface ChartPoint {
  temperatureC: number;
  altitudeKm: number;
}

export interface ChartBand {
  baseKm: number;
  topKm: number;
  label: string;
}

export interface ChartMarker {
  altitudeKm: number;
  label: string;
}

export interface ReferenceSlope {
  label: string;
  lapseRateKPerKm: number;
  points: [ChartPoint, ChartPoint];
}

/** A reference curve through several points (the saturated adiabat bends towards the dry one as it cools). */
export interface ReferenceCurve {
  label: string;
  points: ChartPoint[];
}

export interface ProfileChartData {
  ascent: ChartPoint[];
  descent: ChartPoint[];
  inversions: ChartBand[];
  tropopauses: ChartMarker[];
  dryAdiabat: ReferenceSlope | null;
  saturatedAdiabat: ReferenceCurve | null;
  temperatureDomainC: [number, number];
  altitudeDomainKm: [number, number];
  temperatureTicksC: number[];
  altitudeTicksKm: number[];
}

export interface LevelInput {
  phase: string;
  altitudeM: number;
  temperatureK: number;
  /** Measured pressure; without it the standard atmosphere's pressure at the altitude is used for the saturated adiabat. */
  pressureHpa?: number | null;
}

export interface LayerInput {
  kind: string;
  phase: string;
  baseM: number;
  topM: number;
  strengthK: number | null;
  dryAdiabaticLapseRateKPerKm: number;
}

export interface SummaryInput {
  tropopauseAltitudeM: number | null;
  secondTropopauseAltitudeM: number | null;
}


/** Evenly spaced ticks from `min` to `max` (both on the step grid) with a round step giving at most ~10 ticks. */
export function niceTicks(min: number, max: number, steps: readonly number[]): number[] {
  const span = max - min;
  const step = steps.find((s) => span / s <= 10) ?? steps[steps.length - 1] ?? 1;
  const first = Math.ceil(min / step) * step;
  const ticks: number[] = [];
  for (let v = first; v <= max + 1e-9; v += step) ticks.push(Math.round(v * 1000) / 1000);
  return ticks;
}

function round(value: number, digits: number): number {
  const f = 10 ** digits;
  return Math.round(value * f) / f;
}

/**
 * A straight reference line from the surface point (T0, z0) falling at `lapseRateKPerKm` up to
 * `topKm`, cut where it leaves the chart's temperature domain on the cold side.
 */
export function referenceSlope(surface: ChartPoint, lapseRateKPerKm: number, topKm: number, minTemperatureC: number, label: string): ReferenceSlope | null {
  if (!Number.isFinite(lapseRateKPerKm) || lapseRateKPerKm <= 0 || topKm <= surface.altitudeKm) return null;
  const reachKm = (surface.temperatureC - minTemperatureC) / lapseRateKPerKm;
  const endKm = Math.min(topKm, surface.altitudeKm + Math.max(0, reachKm));
  if (endKm <= surface.altitudeKm) return null;
  const endC = surface.temperatureC - lapseRateKPerKm * (endKm - surface.altitudeKm);
  return {
    label,
    lapseRateKPerKm,
    points: [surface, { temperatureC: round(endC, 3), altitudeKm: round(endKm, 4) }],
  };
}

/**
 * The saturated adiabat through the lowest ascent level: the temperature a saturated parcel lifted
 * from there would have at each ascent level's pressure (pseudo-adiabatic, lib/analysis), up to
 * `topKm`, cut where it leaves the chart's cold edge. Uses the measured pressure when every level
 * up to the top has one, else the U.S. Standard Atmosphere 1976 pressure at each altitude.
 */
export function saturatedAdiabatCurve(ascentLevels: readonly LevelInput[], topKm: number, minTemperatureC: number): ReferenceCurve | null {
  const start = ascentLevels[0];
  if (!start) return null;
  const path = ascentLevels.filter((l) => l.altitudeM / 1000 <= topKm + 1e-9);
  if (path.length < 2) return null;
  const measured = path.every((l) => typeof l.pressureHpa === "number" && Number.isFinite(l.pressureHpa) && l.pressureHpa > 0);
  const pressuresHpa = path.map((l) => (measured ? (l.pressureHpa as number) : (standardAtmosphereAt(l.altitudeM)?.pressurePa ?? Number.NaN) / 100));
  const startPressureHpa = pressuresHpa[0] as number;
  const temperaturesK = pseudoAdiabatTemperaturesK(start.temperatureK, startPressureHpa, pressuresHpa);
  const points: ChartPoint[] = [];
  let previousPressureHpa = Number.POSITIVE_INFINITY;
  for (const [i, level] of path.entries()) {
    const temperatureC = kelvinToCelsius(temperaturesK[i] as number);
    const pressureHpa = pressuresHpa[i] as number;
    // A pressure that fails to fall with height (sensor noise) has no place on a lifted parcel's path.
    if (!Number.isFinite(temperatureC) || !(pressureHpa < previousPressureHpa)) continue;
    if (temperatureC < minTemperatureC) break;
    previousPressureHpa = pressureHpa;
    points.push({ temperatureC: round(temperatureC, 3), altitudeKm: round(level.altitudeM / 1000, 4) });
  }
  if (points.length < 2) return null;
  const startRate = moistAdiabaticLapseRateKPerKm(start.temperatureK, startPressureHpa);
  return {
    label: `saturated adiabat (Γm ${startRate.toFixed(2)} K/km at the start${measured ? "" : "; standard-atmosphere pressure"})`,
    points,
  };
}

/** Builds the chart data; every number is finite (non-finite inputs are dropped). */
export function buildProfileChartData(levels: readonly LevelInput[], layers: readonly LayerInput[], summary: SummaryInput | null): ProfileChartData {
  const toPoint = (l: LevelInput): ChartPoint => ({ temperatureC: round(kelvinToCelsius(l.temperatureK), 3), altitudeKm: round(l.altitudeM / 1000, 4) });
  const usable = levels.filter((l) => Number.isFinite(l.altitudeM) && Number.isFinite(l.temperatureK));
  const ascentLevels = usable.filter((l) => l.phase === "ascent").sort((a, b) => a.altitudeM - b.altitudeM);
  const ascent = ascentLevels.map(toPoint);
  // Descent drawn from the top down, the order in which it was flown.
  const descent = usable.filter((l) => l.phase === "descent").sort((a, b) => b.altitudeM - a.altitudeM).map(toPoint);

  const all = [...ascent, ...descent];
  const temps = all.map((p) => p.temperatureC);
  const alts = all.map((p) => p.altitudeKm);
  const minC = temps.length ? Math.min(...temps) : -60;
  const maxC = temps.length ? Math.max(...temps) : 30;
  const temperatureDomainC: [number, number] = [Math.floor((minC - 2) / 10) * 10, Math.ceil((maxC + 2) / 10) * 10];
  const maxKm = alts.length ? Math.max(...alts) : 1;
  const minKm = alts.length ? Math.min(...alts) : 0;
  const altitudeDomainKm: [number, number] = [Math.max(0, Math.floor(minKm)), Math.ceil(maxKm)];

  const inversions: ChartBand[] = layers
    .filter((l) => l.phase === "ascent" && (l.kind === "surface-inversion" || l.kind === "elevated-inversion"))
    .filter((l) => Number.isFinite(l.baseM) && Number.isFinite(l.topM) && l.topM > l.baseM)
    .map((l) => ({
      baseKm: round(l.baseM / 1000, 4),
      topKm: round(l.topM / 1000, 4),
      label: `${l.kind === "surface-inversion" ? "surface" : "elevated"} inversion${l.strengthK !== null && Number.isFinite(l.strengthK) ? ` +${l.strengthK.toFixed(1)} K` : ""}`,
    }));

  const tropopauses: ChartMarker[] = [];
  if (summary?.tropopauseAltitudeM !== null && summary?.tropopauseAltitudeM !== undefined && Number.isFinite(summary.tropopauseAltitudeM)) {
    tropopauses.push({ altitudeKm: round(summary.tropopauseAltitudeM / 1000, 4), label: `tropopause ${(summary.tropopauseAltitudeM / 1000).toFixed(2)} km` });
  }
  if (summary?.secondTropopauseAltitudeM !== null && summary?.secondTropopauseAltitudeM !== undefined && Number.isFinite(summary.secondTropopauseAltitudeM)) {
    tropopauses.push({ altitudeKm: round(summary.secondTropopauseAltitudeM / 1000, 4), label: `second tropopause ${(summary.secondTropopauseAltitudeM / 1000).toFixed(2)} km` });
  }

  // Γd is the same for every layer (the run's stored value); the saturated adiabat is a curve: Γm
  // grows towards Γd as the parcel cools, so it is computed along the way, not drawn as one slope.
  const ascentLayers = layers.filter((l) => l.phase === "ascent");
  const reference = ascentLayers.find((l) => l.kind === "troposphere") ?? [...ascentLayers].sort((a, b) => a.baseM - b.baseM)[0] ?? null;
  const surface = ascent[0] ?? null;
  const topKm = tropopauses[0]?.altitudeKm ?? ascent[ascent.length - 1]?.altitudeKm ?? 0;
  let dryAdiabat: ReferenceSlope | null = null;
  if (surface && reference) {
    const gd = reference.dryAdiabaticLapseRateKPerKm;
    dryAdiabat = referenceSlope(surface, gd, topKm, temperatureDomainC[0], `dry adiabatic Γd ${gd.toFixed(2)} K/km`);
  }
  const saturatedAdiabat = saturatedAdiabatCurve(ascentLevels, topKm, temperatureDomainC[0]);

  const temperatureTicksC = niceTicks(temperatureDomainC[0], temperatureDomainC[1], [5, 10, 20]);
  const altitudeTicksKm = niceTicks(altitudeDomainKm[0], altitudeDomainKm[1], [0.5, 1, 2, 5, 10]);
  return { ascent, descent, inversions, tropopauses, dryAdiabat, saturatedAdiabat, temperatureDomainC, altitudeDomainKm, temperatureTicksC, altitudeTicksKm };
}
