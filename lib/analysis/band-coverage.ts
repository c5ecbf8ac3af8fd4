/**
 * Altitude bands: which height a band's limits are measured from, and the one rule that decides
 * whether a flight's levels cover a band. The analysis (fixed bands, layers.ts) and the
 * Climatology query (band lapse rate from stored levels, lib/query/climatology-core.ts) both decide
 * with decideBandCoverage, so a band counts for a flight in one place exactly when it counts in
 * the other.
 */

/** "agl": above ground level (the site's elevation); "msl": above mean sea level. */
export const HEIGHT_REFERENCES = ["agl", "msl"] as const;
export type HeightReference = (typeof HEIGHT_REFERENCES)[number];

export const HEIGHT_REFERENCE_WORDS: Readonly<Record<HeightReference, string>> = {
  agl: "above ground level",
  msl: "above mean sea level",
};

/** A band as asked: limits in metres above its reference. */
export type BandSpec = {
  baseM: number;
  topM: number;
  reference: HeightReference;
};

/** A band's limits in metres above mean sea level for one flight. */
export type BandRangeMsl = {
  baseM: number;
  topM: number;
};

/** A fit needs at least this many levels inside the band [P]. */
export const BAND_MIN_LEVELS = 3;
/** The lowest level centre must lie within this many bins above the band base, the highest within as many below the top [P]. */
export const BAND_END_TOLERANCE_BINS = 1;
/** Consecutive levels inside the band may lie at most this many bins apart (two empty bins between them) [P]. */
export const BAND_MAX_STEP_BINS = 3;
/** Bin width assumed when the levels do not say theirs, m (the default bin size). */
export const BAND_FALLBACK_BIN_M = 100;

/**
 * The band's limits above mean sea level for a flight whose ground (the site's elevation) is
 * groundElevationM: AGL limits are shifted by the ground, MSL limits are kept. Null for an AGL
 * band when the ground is unknown or not finite.
 */
export function bandRangeMsl(band: BandSpec, groundElevationM: number | null | undefined): BandRangeMsl | null {
  if (band.reference === "msl") return { baseM: band.baseM, topM: band.topM };
  if (groundElevationM === null || groundElevationM === undefined || !Number.isFinite(groundElevationM)) return null;
  return { baseM: groundElevationM + band.baseM, topM: groundElevationM + band.topM };
}

/** What the coverage rule needs to know about a run's levels inside a band (MSL metres). */
export interface BandLevelFigures {
  levelCount: number;
  lowestM: number | null;
  highestM: number | null;
  /** Width of the widest in-band level (the run's bin size), m; null when unknown. */
  binM: number | null;
  /** Largest altitude step between consecutive in-band levels, m; null when fewer than 2 levels. */
  maxStepM: number | null;
}

export type BandCoverageReason = "no-ground" | "few-levels" | "low-end" | "high-end" | "gap";

/** Plain words for each reason a band does not count, as shown in exclusions and warnings. */
export const BAND_COVERAGE_REASON_WORDS: Readonly<Record<BandCoverageReason | "flat", string>> = {
  "no-ground": "the site has no ground elevation for a band above ground level",
  "few-levels": `fewer than ${BAND_MIN_LEVELS} levels in the band`,
  "low-end": "levels do not reach down to the band base",
  "high-end": "levels do not reach up to the band top",
  gap: "a data gap of more than two bins inside the band",
  flat: "levels do not determine a slope",
};

/**
 * The coverage rule: a band counts for a flight when at least BAND_MIN_LEVELS levels lie inside
 * its MSL range (limits included), the lowest level centre lies within BAND_END_TOLERANCE_BINS bins
 * of the base and the highest within as many of the top, and no two consecutive in-band levels lie
 * more than BAND_MAX_STEP_BINS bins apart. Returns null when covered, else the first failing reason
 * in that order. Whether the levels then determine a slope is the fit's decision (regression.ts).
 */
export function decideBandCoverage(figures: BandLevelFigures, range: BandRangeMsl | null): BandCoverageReason | null {
  if (range === null) return "no-ground";
  const { levelCount, lowestM, highestM } = figures;
  if (levelCount < BAND_MIN_LEVELS || lowestM === null || highestM === null) return "few-levels";
  const binM = figures.binM !== null && figures.binM > 0 ? figures.binM : BAND_FALLBACK_BIN_M;
  if (lowestM - range.baseM > BAND_END_TOLERANCE_BINS * binM) return "low-end";
  if (range.topM - highestM > BAND_END_TOLERANCE_BINS * binM) return "high-end";
  if (figures.maxStepM !== null && figures.maxStepM > BAND_MAX_STEP_BINS * binM) return "gap";
  return null;
}

/** A level as the coverage rule sees it: its centre and its bin limits (MSL metres). */
export interface BandLevel {
  altitudeM: number;
  baseM: number;
  topM: number;
}

/** The levels whose centre lies inside the range (limits included), lowest first. */
export function levelsInBand<T extends BandLevel & { temperatureK: number }>(levels: readonly T[], range: BandRangeMsl): T[] {
  return levels
    .filter((l) => l.altitudeM >= range.baseM && l.altitudeM <= range.topM && Number.isFinite(l.temperatureK))
    .slice()
    .sort((a, b) => a.altitudeM - b.altitudeM);
}

/** The coverage figures of in-band levels sorted lowest first (as levelsInBand returns them). */
export function bandLevelFigures(inBand: readonly BandLevel[]): BandLevelFigures {
  let binM: number | null = null;
  let maxStepM: number | null = null;
  for (let i = 0; i < inBand.length; i++) {
    const level = inBand[i] as BandLevel;
    const width = level.topM - level.baseM;
    if (Number.isFinite(width) && (binM === null || width > binM)) binM = width;
    if (i > 0) {
      const step = level.altitudeM - (inBand[i - 1] as BandLevel).altitudeM;
      if (maxStepM === null || step > maxStepM) maxStepM = step;
    }
  }
  return {
    levelCount: inBand.length,
    lowestM: inBand[0]?.altitudeM ?? null,
    highestM: inBand[inBand.length - 1]?.altitudeM ?? null,
    binM,
    maxStepM,
  };
}
