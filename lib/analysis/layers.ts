/**
 * Layer statistics from binned profile levels: surface-based and elevated inversions, the
 * tropospheric lapse rate, the stratospheric gradient and fixed or caller-chosen altitude bands.
 */
import { BAND_MIN_LEVELS, bandLevelFigures, bandRangeMsl, decideBandCoverage, levelsInBand, type BandCoverageReason, type BandSpec, type HeightReference } from "./band-coverage";
import { DRY_AIR_SPECIFIC_HEAT_J_PER_KG_K, STANDARD_GRAVITY_M_PER_S2 } from "./constants";
import { fitOrdinaryLeastSquares, theilSenSlope } from "./regression";
import { classifyStability, moistAdiabaticLapseRateKPerKm } from "./stability";
import { standardAtmosphereAt } from "./standard-atmosphere";
import type { LayerKind, LayerStat, Phase, ProfileLevel, QcWarning, TropopauseResult } from "./types";

/** A profile point used in layer fits: a binned level or the surface observation. */
export interface ProfilePoint {
  altitudeM: number;
  temperatureK: number;
  pressureHpa: number | null;
}

/**
 * Bounds-checked read of a profile point (typed-arrays.ts `valueAt`, kept apart so that this hot
 * read sees one element shape and stays fast).
 */
function pointAt(points: readonly ProfilePoint[], index: number): ProfilePoint {
  const point = points[index];
  if (point === undefined) throw new RangeError(`point ${index} is outside 0…${points.length - 1}`);
  return point;
}

/** −0 from negating a zero slope would survive JSON round trips as 0 and break equality checks. */
const withoutNegativeZero = (v: number): number => (v === 0 ? 0 : v);

const DRY_ADIABATIC_K_PER_KM = (STANDARD_GRAVITY_M_PER_S2 / DRY_AIR_SPECIFIC_HEAT_J_PER_KG_K) * 1000;

/**
 * Builds a LayerStat from the points of one layer: OLS lapse rate −dT/dz (K/km) with its
 * standard error and r², the Theil–Sen lapse rate, mean T, mean p (measured when every point has
 * a pressure, else USSA76 at the mean altitude), Γd = g0/cp and Γm at mean T and p (AMS Glossary),
 * and the stability class. Null when fewer than 2 points, no altitude spread, or a non-finite lapse rate.
 */
export function buildLayerStat(
  kind: LayerKind,
  phase: Phase,
  baseM: number,
  topM: number,
  points: readonly ProfilePoint[],
  strengthK: number | null,
): LayerStat | null {
  const n = points.length;
  if (n < 2) return null;
  const xKm = new Float64Array(n);
  const y = new Float64Array(n);
  let sumT = 0;
  let sumZ = 0;
  let sumP = 0;
  let allPressure = true;
  let fittedBaseM = Infinity;
  let fittedTopM = -Infinity;
  for (let i = 0; i < n; i++) {
    const p = pointAt(points, i);
    if (p.altitudeM < fittedBaseM) fittedBaseM = p.altitudeM;
    if (p.altitudeM > fittedTopM) fittedTopM = p.altitudeM;
    xKm[i] = p.altitudeM / 1000;
    y[i] = p.temperatureK;
    sumT += p.temperatureK;
    sumZ += p.altitudeM;
    if (p.pressureHpa !== null && p.pressureHpa > 0) sumP += p.pressureHpa;
    else allPressure = false;
  }
  const fit = fitOrdinaryLeastSquares(xKm, y);
  if (!fit) return null;
  const theilSen = theilSenSlope(xKm, y);
  const meanTemperatureK = sumT / n;
  const standard = standardAtmosphereAt(sumZ / n);
  const meanPressureHpa = allPressure ? sumP / n : (standard?.pressureHpa ?? 1013.25);
  const lapseRateKPerKm = -fit.slope;
  const moist = moistAdiabaticLapseRateKPerKm(meanTemperatureK, meanPressureHpa);
  const stability = classifyStability(lapseRateKPerKm, DRY_ADIABATIC_K_PER_KM, moist);
  // A layer whose lapse rate or adiabat is not a number is no layer: never store NaN, never guess a class.
  if (stability === null || !Number.isFinite(meanTemperatureK)) return null;
  return {
    kind,
    phase,
    baseM,
    topM,
    fittedBaseM,
    fittedTopM,
    band: null,
    lapseRateKPerKm: withoutNegativeZero(lapseRateKPerKm),
    lapseRateStdErrKPerKm: fit.slopeStdErr,
    rSquared: fit.rSquared,
    theilSenLapseRateKPerKm: theilSen === null ? null : withoutNegativeZero(-theilSen),
    levelCount: n,
    strengthK,
    meanTemperatureK,
    meanPressureHpa,
    pressureFromStandardAtmosphere: !allPressure,
    dryAdiabaticLapseRateKPerKm: DRY_ADIABATIC_K_PER_KM,
    moistAdiabaticLapseRateKPerKm: moist,
    stability,
  };
}

export interface InversionLayer {
  /** Indices into the point list of the base and top. */
  baseIndex: number;
  topIndex: number;
  baseM: number;
  topM: number;
  strengthK: number;
  surfaceBased: boolean;
}

/**
 * Inversion layers in an ascending point list: runs of levels where temperature rises with
 * height, merged when separated by a non-inversion stretch no thicker than mergeGapM (Kahl 1990;
 * Zhang et al. 2011 merge at 100 m), kept when T(top) − T(base) ≥ minStrengthK. The first layer
 * is surface-based when it starts at the lowest point.
 */
export function detectInversions(points: readonly ProfilePoint[], mergeGapM: number, minStrengthK: number): InversionLayer[] {
  const runs: Array<{ base: number; top: number }> = [];
  for (let i = 0; i + 1 < points.length; i++) {
    const warming = pointAt(points, i + 1).temperatureK > pointAt(points, i).temperatureK;
    if (!warming) continue;
    const last = runs[runs.length - 1];
    if (last && last.top === i) last.top = i + 1;
    else runs.push({ base: i, top: i + 1 });
  }
  const merged: Array<{ base: number; top: number }> = [];
  for (const run of runs) {
    const last = merged[merged.length - 1];
    if (last) {
      const gapM = pointAt(points, run.base).altitudeM - pointAt(points, last.top).altitudeM;
      if (gapM <= mergeGapM) {
        last.top = run.top;
        continue;
      }
    }
    merged.push({ ...run });
  }
  const layers: InversionLayer[] = [];
  for (const m of merged) {
    const base = pointAt(points, m.base);
    const top = pointAt(points, m.top);
    const strengthK = top.temperatureK - base.temperatureK;
    if (strengthK < minStrengthK) continue;
    layers.push({
      baseIndex: m.base,
      topIndex: m.top,
      baseM: base.altitudeM,
      topM: top.altitudeM,
      strengthK,
      surfaceBased: m.base === 0,
    });
  }
  return layers;
}

/** A fitted band, or why not: `code` names the rule that failed (band-coverage.ts), `reason` says it in words. */
export type BandLapseRateResult =
  | { layer: LayerStat; reason: null; code: null }
  | { layer: null; reason: string; code: BandCoverageReason | "flat" | "invalid" };

/**
 * Lapse rate (OLS, K/km) over a band of one phase's levels. The band's limits are metres above
 * its reference: `reference: "msl"` (the default) takes them as they are, `"agl"` adds
 * groundElevationM (the site's elevation), so 0–2000 m AGL at a 1,600 m site is fitted from the
 * levels between 1,600 and 3,600 m. Whether the levels cover the band is decided by
 * decideBandCoverage (band-coverage.ts), the rule the Climatology query uses too; whether they
 * determine a slope by fitOrdinaryLeastSquares. The layer's baseM/topM are the band's MSL limits,
 * fittedBaseM/fittedTopM the lowest and highest level used, and `band` the band as asked.
 * When the band does not count, layer is null and reason says why.
 */
export function computeBandLapseRate(
  levels: readonly ProfileLevel[],
  baseM: number,
  topM: number,
  options: { reference?: HeightReference; groundElevationM?: number | null; phase?: Phase; kind?: LayerKind } = {},
): BandLapseRateResult {
  if (!Number.isFinite(baseM) || !Number.isFinite(topM) || topM <= baseM) {
    return { layer: null, reason: "the band needs finite limits with top above base", code: "invalid" };
  }
  const band: BandSpec = { baseM, topM, reference: options.reference ?? "msl" };
  const groundElevationM = band.reference === "agl" ? (options.groundElevationM ?? null) : null;
  const range = bandRangeMsl(band, groundElevationM);
  const words = `${baseM}–${topM} m ${band.reference.toUpperCase()}`;
  const inBand = range === null ? [] : levelsInBand(levels, range);
  const figures = bandLevelFigures(inBand);
  const code = decideBandCoverage(figures, range);
  const lowest = inBand[0];
  if (code === null && lowest && range !== null) {
    const layer = buildLayerStat(options.kind ?? "band", options.phase ?? lowest.phase, range.baseM, range.topM, inBand, null);
    return layer
      ? { layer: { ...layer, band: { ...band, groundElevationM } }, reason: null, code: null }
      : { layer: null, reason: `the levels in the band ${words} do not determine a lapse rate`, code: "flat" };
  }
  const m = (v: number | null | undefined) => Math.round(v ?? Number.NaN);
  const reasons: Record<BandCoverageReason, string> = {
    "no-ground": `the ground elevation is unknown, so the band ${words} has no height above sea level`,
    "few-levels": `fewer than ${BAND_MIN_LEVELS} levels between ${m(range?.baseM)} m and ${m(range?.topM)} m (band ${words})`,
    "low-end": `the profile does not reach down to ${m(range?.baseM)} m (band ${words}; lowest level ${m(figures.lowestM)} m)`,
    "high-end": `the profile does not reach up to ${m(range?.topM)} m (band ${words}; highest level ${m(figures.highestM)} m)`,
    gap: `a data gap of more than two bins lies inside the band ${words}`,
  };
  const failed = code ?? "few-levels";
  return { layer: null, reason: reasons[failed], code: failed };
}

export interface PhaseLayers {
  layers: LayerStat[];
  surfaceInversion: { depthM: number; strengthK: number } | null;
  warnings: QcWarning[];
}

/**
 * All layers of one phase: surface-based inversion, elevated inversions (below the first
 * tropopause when one was found, below the candidate when it is undetermined), the troposphere from the top of the surface inversion (or the
 * ground) to the first tropopause (or the profile top, with a warning), the stratosphere above
 * the tropopause, and the fixed bands. `surface` is the near-ground observation (launch or
 * landing altitude and temperature), used as the lowest point when it lies below the first level.
 */
export function computePhaseLayers(args: {
  phase: Phase;
  levels: readonly ProfileLevel[];
  surface: ProfilePoint | null;
  tropopause: TropopauseResult;
  fixedBandsM: readonly BandSpec[];
  /** The site's elevation, m above mean sea level: the ground of AGL bands (null when unknown). */
  groundElevationM: number | null;
  binSizeM: number;
  inversionMergeGapM: number;
  inversionMinStrengthK: number;
}): PhaseLayers {
  const { phase, tropopause } = args;
  const warnings: QcWarning[] = [];
  const layers: LayerStat[] = [];
  const levels = args.levels.slice().sort((a, b) => a.altitudeM - b.altitudeM);
  const first = levels[0];
  const last = levels[levels.length - 1];
  if (!first || !last || levels.length < 3) {
    return { layers, surfaceInversion: null, warnings: [{ code: "few-levels", message: `The ${phase} has fewer than 3 altitude levels; no layers were computed.` }] };
  }
  const points: ProfilePoint[] = [];
  const surface = args.surface;
  if (surface && first.altitudeM - surface.altitudeM >= args.binSizeM / 4) points.push(surface);
  for (const l of levels) points.push(l);
  const groundM = pointAt(points, 0).altitudeM;
  const tropopauseM = tropopause.status === "found" ? tropopause.altitudeM : null;
  // Inversions are sought only in the troposphere: below a found tropopause, and below the candidate of
  // an undetermined one (the air above it may be the stratosphere, whose warming is no inversion layer).
  const inversionCeilingM =
    tropopauseM ?? (tropopause.status === "undetermined" && tropopause.candidateAltitudeM !== null ? tropopause.candidateAltitudeM : null);

  const inversionPoints = inversionCeilingM === null ? points : points.filter((p) => p.altitudeM <= inversionCeilingM);
  const inversions = detectInversions(inversionPoints, args.inversionMergeGapM, args.inversionMinStrengthK);
  let surfaceInversion: PhaseLayers["surfaceInversion"] = null;
  let troposphereBaseM = groundM;
  for (const inv of inversions) {
    const stat = buildLayerStat(
      inv.surfaceBased ? "surface-inversion" : "elevated-inversion",
      phase,
      inv.baseM,
      inv.topM,
      inversionPoints.slice(inv.baseIndex, inv.topIndex + 1),
      inv.strengthK,
    );
    if (stat) layers.push(stat);
    if (inv.surfaceBased) {
      surfaceInversion = { depthM: inv.topM - inv.baseM, strengthK: inv.strengthK };
      troposphereBaseM = inv.topM;
    }
  }

  let troposphereTopM = last.altitudeM;
  if (tropopauseM !== null) troposphereTopM = tropopauseM;
  else if (tropopause.status === "undetermined" && tropopause.candidateAltitudeM !== null) {
    troposphereTopM = tropopause.candidateAltitudeM;
    warnings.push({
      code: "troposphere-to-candidate",
      message: `The ${phase} tropopause is undetermined; the tropospheric lapse rate stops at the unconfirmed candidate at ${Math.round(troposphereTopM)} m.`,
    });
  } else {
    warnings.push({
      code: "troposphere-to-top",
      message: `No ${phase} tropopause was found; the tropospheric lapse rate uses the whole profile up to ${Math.round(troposphereTopM)} m.`,
    });
  }
  const tropPoints = points.filter((p) => p.altitudeM >= troposphereBaseM && p.altitudeM <= troposphereTopM);
  const troposphere = tropPoints.length >= 3 ? buildLayerStat("troposphere", phase, troposphereBaseM, troposphereTopM, tropPoints, null) : null;
  if (troposphere) layers.push(troposphere);
  else warnings.push({ code: "no-troposphere-fit", message: `Too few ${phase} levels for a tropospheric lapse rate.` });

  if (tropopauseM !== null) {
    const stratPoints = levels.filter((l) => l.altitudeM > tropopauseM);
    const lastStrat = stratPoints[stratPoints.length - 1];
    if (stratPoints.length >= 3 && lastStrat) {
      const stat = buildLayerStat("stratosphere", phase, tropopauseM, lastStrat.altitudeM, stratPoints, null);
      if (stat) layers.push(stat);
    }
  }

  for (const band of args.fixedBandsM) {
    const r = computeBandLapseRate(levels, band.baseM, band.topM, { reference: band.reference, groundElevationM: args.groundElevationM, phase });
    if (r.layer) layers.push(r.layer);
  }
  return { layers, surfaceInversion, warnings };
}
