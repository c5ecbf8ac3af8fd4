/**
 * Climatology query engine without the server-only marker, so the benchmark script (plain Node)
 * can run it; app code imports lib/query/climatology.ts instead.
 */
import { getDbHandle, Prisma, type DbHandle } from "../db/index.ts";
import { and, dialectFor, list, type Dialect } from "../db/dialect.ts";
import type { Viewer } from "../auth/visibility.ts";
import { visibilitySql } from "../auth/visibility-sql.ts";
import { describe } from "../stats/index.ts";
import { runClaimCheck, type ClaimCheckResult } from "../stats/claims.ts";
import { SEASON_CODES, SEASON_NAMES } from "../analysis/season.ts";
import {
  BAND_COVERAGE_REASON_WORDS,
  bandLevelFigures,
  bandRangeMsl,
  decideBandCoverage,
  levelsInBand,
  type BandCoverageReason,
  type BandLevel,
  type BandRangeMsl,
  type BandSpec,
  type HeightReference,
} from "../analysis/band-coverage.ts";
import { fitOrdinaryLeastSquares } from "../analysis/regression.ts";
import {
  claimGroupConditions,
  monthAbbreviation,
  type ClaimGroup,
  type ClimatologyMetric,
  type ClimatologyQuery,
  type MonthSelection,
} from "./climatology-params.ts";

export interface MetricInfo {
  key: ClimatologyMetric;
  label: string;
  unit: string;
  /** Why a flight has no value for this metric, as shown in the exclusion count. */
  missingReason: string;
}

export const METRIC_INFO: Readonly<Record<ClimatologyMetric, MetricInfo>> = {
  "tropospheric-lapse-rate": { key: "tropospheric-lapse-rate", label: "tropospheric lapse rate", unit: "K/km", missingReason: "no tropospheric lapse rate" },
  "band-lapse-rate": { key: "band-lapse-rate", label: "band lapse rate", unit: "K/km", missingReason: "no coverage of the band" },
  "tropopause-altitude": { key: "tropopause-altitude", label: "first-tropopause height", unit: "km", missingReason: "no tropopause found (flight too low, or undetermined)" },
  "tropopause-temperature": { key: "tropopause-temperature", label: "first-tropopause temperature", unit: "K", missingReason: "no tropopause found (flight too low, or undetermined)" },
  "surface-inversion-frequency": { key: "surface-inversion-frequency", label: "surface-inversion frequency", unit: "%", missingReason: "no inversion analysis" },
  "surface-inversion-depth": { key: "surface-inversion-depth", label: "surface-inversion depth", unit: "m", missingReason: "no surface inversion" },
  "surface-inversion-strength": { key: "surface-inversion-strength", label: "surface-inversion strength", unit: "K", missingReason: "no surface inversion" },
  "surface-temperature": { key: "surface-temperature", label: "surface temperature", unit: "K", missingReason: "no surface temperature" },
  "max-altitude": { key: "max-altitude", label: "maximum altitude", unit: "km", missingReason: "no altitude" },
  "surface-dew-point": { key: "surface-dew-point", label: "surface dew point", unit: "K", missingReason: "no surface humidity (or analysed before 1.3.0)" },
  "lcl-altitude": { key: "lcl-altitude", label: "lifting condensation level (above sea level)", unit: "km", missingReason: "no surface humidity (or analysed before 1.3.0)" },
  "precipitable-water": { key: "precipitable-water", label: "precipitable water up to the top of the humidity data", unit: "mm", missingReason: "no humidity profile (or analysed before 1.3.0)" },
  "freezing-level-altitude": { key: "freezing-level-altitude", label: "lowest freezing level (above sea level)", unit: "km", missingReason: "no 0 °C crossing on the ascent (or analysed before 1.3.0)" },
  "mixed-layer-height": { key: "mixed-layer-height", label: "mixed-layer height, parcel method (above ground)", unit: "m", missingReason: "no mixed-layer top found (or analysed before 1.3.0)" },
  "mixed-layer-height-gradient": { key: "mixed-layer-height-gradient", label: "mixed-layer height, maximum θ gradient (above ground)", unit: "m", missingReason: "no θ increase found (or analysed before 1.3.0)" },
};

/** A query the database cannot answer as asked: unknown ids, no flights, an empty claim group. 422 from the API. */
export class ClimatologyQueryError extends Error {
  constructor(
    readonly code: "unknown-reference" | "no-flights" | "empty-group" | "overlapping-groups",
    message: string,
    readonly field: string | null = null,
  ) {
    super(message);
    this.name = "ClimatologyQueryError";
  }
}

export interface ClimatologyFlight {
  flightId: string;
  title: string;
  siteId: string;
  siteName: string;
  schoolId: string;
  schoolName: string;
  launchAtUtc: string;
  dayOfYear: number;
  localHour: number;
  hoursAfterSunrise: number | null;
  value: number;
  /** An invented flight (demo or test data), not a measurement. */
  synthetic: boolean;
}

export interface GroupStatistics {
  n: number;
  mean: number | null;
  sd: number | null;
  sem: number | null;
  median: number | null;
  q1: number | null;
  q3: number | null;
  iqr: number | null;
  min: number | null;
  max: number | null;
  ci95Low: number | null;
  ci95High: number | null;
}

export interface ClimatologyGroup extends GroupStatistics {
  key: string;
  label: string;
  /** The contributing flights, by launch time; empty when the query asked for flights=none. */
  flights: ClimatologyFlight[];
}

export interface ProfileLevelMean {
  altitudeM: number;
  meanTemperatureK: number;
  sdTemperatureK: number | null;
  flightCount: number;
}

export interface GroupProfile {
  key: string;
  label: string;
  levels: ProfileLevelMean[];
}

export interface ExclusionCount {
  reason: string;
  count: number;
}

/** How invented flights (Flight.synthetic) took part in a result. */
export interface InventedFlightsUse {
  /** The rule asked for: "auto" leaves invented flights out when the viewer can see any real flight. */
  rule: "auto" | "include" | "exclude";
  /** Whether invented flights were taken into this result. */
  included: boolean;
  /** Invented flights among the contributing flights (those with a value in a group). */
  contributingCount: number;
  /** Invented flights that would otherwise have matched the filters, left out by the rule. */
  leftOutCount: number;
}

/** One cell of the cross-table: the flights in row group `rowKey` and column group `columnKey`. */
export interface CrossTableCell {
  rowKey: string;
  columnKey: string;
  n: number;
  mean: number | null;
  ci95Low: number | null;
  ci95High: number | null;
}

export interface CrossTable {
  /** The second grouping (the columns); the rows are the result's groups. */
  by: ClimatologyQuery["crossBy"];
  rows: Array<{ key: string; label: string }>;
  columns: Array<{ key: string; label: string }>;
  /** Cells with at least one flight, rows then columns in table order. */
  cells: CrossTableCell[];
}

export interface ClimatologyResult {
  metric: MetricInfo;
  /** The band as asked: limits in m above `reference` (agl: each flight's ground, msl: sea level). */
  band: { baseM: number; topM: number; reference: HeightReference; phase: "ascent" | "descent" } | null;
  /** Flights that pass every filter (and fall in a claim group), with or without a metric value. */
  matchedFlightCount: number;
  groups: ClimatologyGroup[];
  overall: GroupStatistics;
  excluded: ExclusionCount[];
  excludedCount: number;
  profiles: GroupProfile[];
  claim: ClaimCheckResult | null;
  /** groupBy × crossBy: n, mean and 95 % CI per cell (null without crossBy). */
  crossTable: CrossTable | null;
  invented: InventedFlightsUse;
  warnings: string[];
}

type DbLike = Pick<DbHandle, "db" | "engine">;

interface CandidateRow {
  synthetic: unknown;
  flightId: string;
  runId: string;
  title: string;
  siteId: string;
  schoolId: string;
  launchAtUtc: string;
  dayOfYear: unknown;
  localHour: unknown;
  hoursAfterSunrise: unknown;
  groupKey: unknown;
  crossKey?: unknown;
  value: unknown;
  groundElevationM?: unknown;
  bandN?: unknown;
  bandSx?: unknown;
  bandSy?: unknown;
  bandSxx?: unknown;
  bandSxy?: unknown;
  bandLowM?: unknown;
  bandHighM?: unknown;
  bandBinM?: unknown;
  bandLowBaseM?: unknown;
  bandHighBaseM?: unknown;
}

/** Numbers come back as number, bigint or numeric text depending on the engine and type. */
function toNumber(value: unknown): number | null {
  if (value === null || value === undefined) return null;
  const n = typeof value === "number" ? value : typeof value === "bigint" ? Number(value) : Number(value);
  return Number.isFinite(n) ? n : null;
}

const METRIC_VALUE_SQL: Readonly<Record<Exclude<ClimatologyMetric, "band-lapse-rate">, string>> = {
  "tropospheric-lapse-rate": `s."troposphericLapseRateKPerKm"`,
  "tropopause-altitude": `s."tropopauseAltitudeM" / 1000.0`,
  "tropopause-temperature": `s."tropopauseTemperatureK"`,
  "surface-inversion-frequency": `CASE WHEN s."hasSurfaceInversion" = TRUE THEN 100.0 ELSE 0.0 END`,
  "surface-inversion-depth": `CASE WHEN s."hasSurfaceInversion" = TRUE THEN s."surfaceInversionDepthM" END`,
  "surface-inversion-strength": `CASE WHEN s."hasSurfaceInversion" = TRUE THEN s."surfaceInversionStrengthK" END`,
  "surface-temperature": `s."surfaceTemperatureK"`,
  "max-altitude": `s."maxAltitudeM" / 1000.0`,
  "surface-dew-point": `s."surfaceDewPointK"`,
  "lcl-altitude": `s."lclAltitudeM" / 1000.0`,
  "precipitable-water": `s."precipitableWaterMm"`,
  "freezing-level-altitude": `s."freezingLevelAltitudeM" / 1000.0`,
  "mixed-layer-height": `s."mixedLayerHeightM"`,
  "mixed-layer-height-gradient": `s."mixedLayerHeightGradientM"`,
};

const sql = Prisma.sql;
type SqlFragment = Prisma.Sql;

function selectionSql(selection: MonthSelection): SqlFragment {
  return selection.kind === "season-name" ? sql`s."seasonName" = ${selection.name}` : sql`s."month" IN ${list(selection.months)}`;
}

// --- claims: claim-group SQL, rendered from the shared claimGroupConditions (climatology-params.ts) ---
/** The SQL of a claim group: every condition of claimGroupConditions, joined by AND. */
function claimGroupSql(group: ClaimGroup): SqlFragment {
  const parts = claimGroupConditions(group).map((c): SqlFragment => {
    const column = Prisma.raw(`s."${c.column}"`); // a column name from the fixed list in claimGroupConditions
    if ("equals" in c) return sql`${column} = ${c.equals}`;
    if ("in" in c) return sql`${column} IN ${list(c.in)}`;
    return sql`(${column} >= ${c.fromInclusive} AND ${column} < ${c.toExclusive})`;
  });
  return and(parts);
}

/** Group key "AB": a flight that meets both claim groups (refused in getClimatology). */
const BOTH_GROUPS_KEY = "AB";
// --- end of claims: claim-group SQL ---

/** The launch's UTC day from `from` to `to` (YYYY-MM-DD), either end optional. */
function dateConditions(dialect: Dialect, from: string | undefined, to: string | undefined): SqlFragment[] {
  const out: SqlFragment[] = [];
  if (from) out.push(dialect.onOrAfterDay(sql`s."launchAtUtc"`, from));
  if (to) out.push(dialect.onOrBeforeDay(sql`s."launchAtUtc"`, to));
  return out;
}

/** The filter conditions; `invented` is the rule already resolved ("auto" is decided in getClimatology). */
function filterConditions(viewer: Viewer, query: ClimatologyQuery, dialect: Dialect): SqlFragment[] {
  // Most summaries are current: one sequential scan beats thousands of index-then-row lookups on isCurrent.
  const current = sql`${dialect.unindexed(sql`s."isCurrent"`)} = TRUE`;
  const c: SqlFragment[] = [current, visibilitySql(viewer, "f")];
  if (query.school.length) c.push(sql`s."schoolId" IN ${list(query.school)}`);
  if (query.site.length) c.push(sql`s."siteId" IN ${list(query.site)}`);
  c.push(...dateConditions(dialect, query.from, query.to));
  if (query.years.length) c.push(sql`s."year" IN ${list(query.years)}`);
  if (query.season) c.push(selectionSql(query.season));
  if (query.months) c.push(selectionSql(query.months));
  if (query.hourFrom !== undefined) c.push(sql`s."localHour" >= ${query.hourFrom}`);
  if (query.hourTo !== undefined) c.push(sql`s."localHour" <= ${query.hourTo}`);
  if (query.sunriseFrom !== undefined) c.push(sql`s."hoursAfterSunrise" >= ${query.sunriseFrom}`);
  if (query.sunriseTo !== undefined) c.push(sql`s."hoursAfterSunrise" <= ${query.sunriseTo}`);
  if (query.elevationFrom !== undefined) c.push(sql`s."solarElevationDeg" >= ${query.elevationFrom}`);
  if (query.elevationTo !== undefined) c.push(sql`s."solarElevationDeg" <= ${query.elevationTo}`);
  if (query.qc === "exclude") c.push(sql`s."qcFlagged" = FALSE`);
  if (query.invented === "exclude") c.push(sql`f."synthetic" = FALSE`);
  if (query.minCoverageKm !== undefined) c.push(sql`(s."maxAltitudeM" - s."minAltitudeM") >= ${query.minCoverageKm * 1000}`);
  if (query.claim === "two-group" && query.groupA && query.groupB) {
    c.push(sql`(${claimGroupSql(query.groupA)}) OR (${claimGroupSql(query.groupB)})`);
  }
  return c;
}

/** floor(column / width); `column` may be negative down to −48 h (a multiple of every offered width). */
function hourBinSql(dialect: Dialect, column: SqlFragment, widthH: number): SqlFragment {
  return dialect.floorDivide(column, widthH, 48);
}

/** The query as seen by the cross-table's second grouping: crossBy in place of groupBy, no claim groups. */
function crossQuery(query: ClimatologyQuery): ClimatologyQuery {
  return { ...query, groupBy: query.crossBy, claim: "none" };
}

/** `, <key> AS "crossKey"` when the query asks for a cross-table. */
function crossKeyColumn(query: ClimatologyQuery, dialect: Dialect): SqlFragment {
  return query.crossBy === "none" ? Prisma.empty : sql`, ${groupKeySql(crossQuery(query), dialect)} AS "crossKey"`;
}

/** The SQL expression whose value names a flight's group; the same expression groups the mean profiles. */
function groupKeySql(query: ClimatologyQuery, dialect: Dialect): SqlFragment {
  if (query.claim === "two-group" && query.groupA && query.groupB) {
    const a = claimGroupSql(query.groupA);
    const b = claimGroupSql(query.groupB);
    return sql`CASE WHEN (${a}) AND (${b}) THEN ${BOTH_GROUPS_KEY} WHEN ${a} THEN ${"A"} WHEN ${b} THEN ${"B"} END`;
  }
  switch (query.groupBy) {
    case "none":
      return sql`'all'`;
    case "season":
      return sql`s."seasonName"`;
    case "season-code":
      return sql`s."season"`;
    case "month":
      return sql`s."month"`;
    case "site":
      return sql`s."siteId"`;
    case "school":
      return sql`s."schoolId"`;
    case "year":
      return sql`s."year"`;
    case "launch-hour":
      return hourBinSql(dialect, sql`s."localHour"`, query.binHours);
    case "hours-after-sunrise":
      return hourBinSql(dialect, sql`s."hoursAfterSunrise"`, query.binHours);
  }
}

function bandOf(query: ClimatologyQuery): BandSpec | null {
  if (query.metric !== "band-lapse-rate" || query.bandBaseKm === undefined || query.bandTopKm === undefined) return null;
  return { baseM: query.bandBaseKm * 1000, topM: query.bandTopKm * 1000, reference: query.bandReference };
}


/**
 * Each candidate's band limits above mean sea level, the SQL twin of bandRangeMsl
 * (lib/analysis/band-coverage.ts): AGL limits are moved up by the run's ground (FlightSummary.groundElevationM,
 * the site's elevation the analysis used), MSL limits are kept. NULL for an AGL band without a ground.
 */
function bandRangeSql(band: BandSpec, dialect: Dialect): { baseM: SqlFragment; topM: SqlFragment } {
  if (band.reference === "msl") return { baseM: dialect.real(band.baseM), topM: dialect.real(band.topM) };
  return { baseM: sql`(s."groundElevationM" + ${dialect.real(band.baseM)})`, topM: sql`(s."groundElevationM" + ${dialect.real(band.topM)})` };
}

/**
 * The candidate flights with their group key and metric value. For the band lapse rate, the
 * least-squares sums (n, Σx, Σy, Σxy, Σx², with x the altitude in km from the band middle) and
 * the coverage figures of the chosen phase's levels inside the band are aggregated per run in SQL.
 * The band's MSL limits come per run from bandRangeSql. Runs whose in-band bins are not contiguous (or whose
 * altitudes hardly spread) are decided from their levels afterwards (loadBandLevels).
 */
function candidateSql(viewer: Viewer, query: ClimatologyQuery, dialect: Dialect): SqlFragment {
  const where = and(filterConditions(viewer, query, dialect));
  const launchIso = dialect.isoUtcSeconds(sql`s."launchAtUtc"`);
  const band = bandOf(query);
  // The metric expressions are fixed text of this module (no user input reaches them).
  const valueSql = band ? sql`NULL` : Prisma.raw(METRIC_VALUE_SQL[query.metric as Exclude<ClimatologyMetric, "band-lapse-rate">]);
  if (!band && query.flights === "none") {
    // Summary only: the group key, the value and the site (for the claim's clustering caveat).
    return sql`SELECT s."siteId" AS "siteId", f."synthetic" AS "synthetic", ${groupKeySql(query, dialect)} AS "groupKey"${crossKeyColumn(query, dialect)}, ${valueSql} AS "value"
      FROM "FlightSummary" s JOIN "Flight" f ON f."id" = s."flightId"
      WHERE ${where}`;
  }
  const range = band ? bandRangeSql(band, dialect) : null;
  const bandColumns = range
    ? sql`, ${range.baseM} AS "bandBaseMslM", ${range.topM} AS "bandTopMslM", s."groundElevationM" AS "groundElevationM"`
    : Prisma.empty;
  const candidates = sql`SELECT s."flightId" AS "flightId", s."runId" AS "runId", f."title" AS "title", s."siteId" AS "siteId", f."synthetic" AS "synthetic",
      s."schoolId" AS "schoolId", ${launchIso} AS "launchAtUtc", s."dayOfYear" AS "dayOfYear", s."localHour" AS "localHour",
      s."hoursAfterSunrise" AS "hoursAfterSunrise", ${groupKeySql(query, dialect)} AS "groupKey"${crossKeyColumn(query, dialect)}, ${valueSql} AS "value"${bandColumns}
    FROM "FlightSummary" s JOIN "Flight" f ON f."id" = s."flightId"
    WHERE ${where}`;
  if (!band) return candidates;
  // MSL limits are the same for every run and stay constants for the planner; AGL limits come from each candidate.
  const lowM = band.reference === "msl" ? dialect.real(band.baseM) : sql`c."bandBaseMslM"`;
  const highM = band.reference === "msl" ? dialect.real(band.topM) : sql`c."bandTopMslM"`;
  // x is the altitude in km from the band middle, which keeps the sums well conditioned.
  const x = sql`((l."altitudeM" - (${lowM} + ${highM}) / 2.0) / 1000.0)`;
  // The candidates are materialised and drive the join (CROSS JOIN fixes the order on SQLite), so each
  // run's in-band levels are read by a range search on the (runId, phase, altitudeM) index.
  return sql`WITH c AS MATERIALIZED (${candidates}),
    sums AS MATERIALIZED (
      SELECT l."runId" AS "runId", COUNT(*) AS n, SUM(${x}) AS sx, SUM(l."temperatureK") AS sy, SUM(${x} * ${x}) AS sxx,
        SUM(${x} * l."temperatureK") AS sxy, MIN(l."altitudeM") AS lo, MAX(l."altitudeM") AS hi, MAX(l."topM" - l."baseM") AS bin,
        MIN(l."baseM") AS "lowBase", MAX(l."baseM") AS "highBase"
      FROM c CROSS JOIN "ProfileLevel" l
      WHERE l."runId" = c."runId" AND l."phase" = ${query.phase} AND l."altitudeM" >= ${lowM} AND l."altitudeM" <= ${highM}
      GROUP BY l."runId"
    )
    SELECT c.*, sums.n AS "bandN", sums.sx AS "bandSx", sums.sy AS "bandSy", sums.sxx AS "bandSxx", sums.sxy AS "bandSxy",
      sums.lo AS "bandLowM", sums.hi AS "bandHighM", sums.bin AS "bandBinM", sums."lowBase" AS "bandLowBaseM", sums."highBase" AS "bandHighBaseM"
    FROM c LEFT JOIN sums ON sums."runId" = c."runId"`;
}

export type BandCoverage = { lapseRateKPerKm: number; reason: null } | { lapseRateKPerKm: null; reason: BandCoverageReason | "flat" };

/** A run's figures as aggregated in SQL: least-squares sums (x in km from the band middle) and coverage figures. */
export interface BandSums {
  n: number | null;
  sx: number | null;
  sy: number | null;
  sxx: number | null;
  sxy: number | null;
  lowM: number | null;
  highM: number | null;
  binM: number | null;
  maxGapM: number | null;
}

/**
 * Below this spread of the in-band altitudes (standard deviation from the sums, km) the sums cannot tell a real
 * spread from rounding, so the run's levels are read and fitted as the analysis fits them. Three levels in
 * three bins of at least 10 m always spread further; the round-off of the sums stays near 1e-6 km.
 */
const SUMS_SPREAD_TOO_SMALL_KM = 1e-4;

/** True when the sums cannot decide whether the altitudes spread beyond rounding (see SUMS_SPREAD_TOO_SMALL_KM). */
export function sumsSpreadTooSmall(sums: BandSums): boolean {
  const { n, sx, sxx } = sums;
  if (n === null || n < 1 || sx === null || sxx === null) return false;
  const centred = sxx - (sx * sx) / n;
  return !(Math.sqrt(Math.max(centred, 0) / n) >= SUMS_SPREAD_TOO_SMALL_KM);
}

/**
 * Lapse rate −dT/dz (K/km) of one run's band from the SQL sums. Coverage is decided by
 * decideBandCoverage (lib/analysis/band-coverage.ts), the rule the analysis uses for its fixed bands;
 * the caller reads the levels instead when the sums cannot decide the spread (sumsSpreadTooSmall) or
 * the bins are not contiguous (maxGapM unknown).
 */
export function bandLapseRateFromSums(sums: BandSums, range: BandRangeMsl | null): BandCoverage {
  const { n, sx, sy, sxx, sxy } = sums;
  const reason = decideBandCoverage({ levelCount: n ?? 0, lowestM: sums.lowM, highestM: sums.highM, binM: sums.binM, maxStepM: sums.maxGapM }, range);
  if (reason !== null) return { lapseRateKPerKm: null, reason };
  if (n === null || sx === null || sy === null || sxx === null || sxy === null) return { lapseRateKPerKm: null, reason: "few-levels" };
  const denominator = n * sxx - sx * sx;
  if (!(denominator > 0)) return { lapseRateKPerKm: null, reason: "flat" };
  const slopeKPerKm = (n * sxy - sx * sy) / denominator;
  return Number.isFinite(slopeKPerKm) ? { lapseRateKPerKm: -slopeKPerKm + 0, reason: null } : { lapseRateKPerKm: null, reason: "flat" };
}

/**
 * Lapse rate of one run's band from its levels, exactly as the analysis fits a band
 * (lib/analysis/layers.ts computeBandLapseRate): the same coverage rule, then ordinary least squares
 * of T on altitude in km (regression.ts, which calls x values equal within rounding no fit).
 */
export function bandLapseRateFromLevels(levels: ReadonlyArray<BandLevel & { temperatureK: number }>, range: BandRangeMsl | null): BandCoverage {
  if (range === null) return { lapseRateKPerKm: null, reason: "no-ground" };
  const inBand = levelsInBand(levels, range);
  const reason = decideBandCoverage(bandLevelFigures(inBand), range);
  if (reason !== null) return { lapseRateKPerKm: null, reason };
  const fit = fitOrdinaryLeastSquares(inBand.map((l) => l.altitudeM / 1000), inBand.map((l) => l.temperatureK));
  if (!fit || !Number.isFinite(fit.slope)) return { lapseRateKPerKm: null, reason: "flat" };
  return { lapseRateKPerKm: -fit.slope + 0, reason: null };
}

/** The levels of the chosen phase of a few runs (those the sums cannot decide), lowest first. */
async function loadBandLevels(handle: DbLike, runIds: readonly string[], phase: string): Promise<Map<string, Array<BandLevel & { temperatureK: number }>>> {
  const out = new Map<string, Array<BandLevel & { temperatureK: number }>>();
  for (let i = 0; i < runIds.length; i += 500) {
    const chunk = runIds.slice(i, i + 500);
    const statement = sql`SELECT l."runId" AS "runId", l."altitudeM" AS "altitudeM", l."baseM" AS "baseM", l."topM" AS "topM", l."temperatureK" AS "temperatureK"
      FROM "ProfileLevel" l
      WHERE l."runId" IN ${list(chunk)} AND l."phase" = ${phase}
      ORDER BY l."runId", l."altitudeM"`;
    const rows = await handle.db.$queryRaw<Array<{ runId: string; altitudeM: unknown; baseM: unknown; topM: unknown; temperatureK: unknown }>>(statement);
    for (const row of rows) {
      const altitudeM = toNumber(row.altitudeM);
      const baseM = toNumber(row.baseM);
      const topM = toNumber(row.topM);
      const temperatureK = toNumber(row.temperatureK);
      if (altitudeM === null || baseM === null || topM === null || temperatureK === null) continue;
      const list = out.get(row.runId) ?? [];
      list.push({ altitudeM, baseM, topM, temperatureK });
      out.set(row.runId, list);
    }
  }
  return out;
}

function bandSumsOf(row: CandidateRow): BandSums {
  const binM = toNumber(row.bandBinM);
  return {
    n: toNumber(row.bandN), sx: toNumber(row.bandSx), sy: toNumber(row.bandSy), sxx: toNumber(row.bandSxx), sxy: toNumber(row.bandSxy),
    lowM: toNumber(row.bandLowM), highM: toNumber(row.bandHighM), binM,
    // Contiguous bins (one level per bin) step less than two bins: no gap under the rule.
    maxGapM: contiguousBins(row) ? binM : null,
  };
}

/** True when a run's in-band levels fill every bin from the lowest to the highest, one level each. */
function contiguousBins(row: CandidateRow): boolean {
  const n = toNumber(row.bandN);
  const bin = toNumber(row.bandBinM);
  const low = toNumber(row.bandLowBaseM);
  const high = toNumber(row.bandHighBaseM);
  if (n === null || bin === null || !(bin > 0) || low === null || high === null) return false;
  return n === Math.round((high - low) / bin) + 1;
}

function statistics(values: readonly number[]): GroupStatistics {
  const d = describe(values);
  return { n: d.n, mean: d.mean, sd: d.sd, sem: d.sem, median: d.median, q1: d.q1, q3: d.q3, iqr: d.iqr, min: d.min, max: d.max, ci95Low: d.ci95Low, ci95High: d.ci95High };
}

function formatBinHour(hour: number): string {
  const sign = hour < 0 ? "−" : "";
  const h = Math.abs(hour);
  return `${sign}${String(Math.floor(h)).padStart(2, "0")}:00`;
}

function groupLabel(query: ClimatologyQuery, key: string, names: { sites: Map<string, string>; schools: Map<string, string> }): string {
  if (query.claim === "two-group") return key === "A" ? `A: ${claimGroupLabel(query.groupA, names)}` : `B: ${claimGroupLabel(query.groupB, names)}`;
  switch (query.groupBy) {
    case "none":
      return "All flights";
    case "month":
      return monthAbbreviation(Number(key));
    case "site":
      return names.sites.get(key) ?? key;
    case "school":
      return names.schools.get(key) ?? key;
    case "launch-hour": {
      const from = Number(key) * query.binHours;
      return `${formatBinHour(from)}–${formatBinHour(from + query.binHours)} local`;
    }
    case "hours-after-sunrise": {
      const from = Number(key) * query.binHours;
      const signed = (h: number) => (h > 0 ? `+${h}` : h < 0 ? `−${-h}` : "0");
      return `${signed(from)} to ${signed(from + query.binHours)} h after sunrise`;
    }
    default:
      return key;
  }
}

function groupOrder(query: ClimatologyQuery, key: string, label: string): [number, string] {
  if (query.claim === "two-group") return [key === "A" ? 0 : 1, key];
  switch (query.groupBy) {
    case "season":
      return [(SEASON_NAMES as readonly string[]).indexOf(key), key];
    case "season-code":
      return [(SEASON_CODES as readonly string[]).indexOf(key), key];
    case "month":
    case "year":
    case "launch-hour":
    case "hours-after-sunrise":
      return [Number(key), key];
    default:
      return [0, label];
  }
}

/** The cross-table from the collected values: rows in group order, columns in the second grouping's order. */
function buildCrossTable(
  query: ClimatologyQuery,
  groups: readonly ClimatologyGroup[],
  cells: Map<string, Map<string, number[]>>,
  names: { sites: Map<string, string>; schools: Map<string, string> },
): CrossTable {
  const cross = crossQuery(query);
  const columnKeys = new Set<string>();
  for (const byColumn of cells.values()) for (const key of byColumn.keys()) columnKeys.add(key);
  const columns = [...columnKeys]
    .map((key) => ({ key, label: groupLabel(cross, key, names) }))
    .sort((a, b) => {
      const [ra, ta] = groupOrder(cross, a.key, a.label);
      const [rb, tb] = groupOrder(cross, b.key, b.label);
      return ra - rb || ta.localeCompare(tb);
    });
  const out: CrossTableCell[] = [];
  for (const group of groups) {
    for (const column of columns) {
      const values = cells.get(group.key)?.get(column.key);
      if (!values || values.length === 0) continue;
      const d = describe(values);
      out.push({ rowKey: group.key, columnKey: column.key, n: d.n, mean: d.mean, ci95Low: d.ci95Low, ci95High: d.ci95High });
    }
  }
  return { by: query.crossBy, rows: groups.map((g) => ({ key: g.key, label: g.label })), columns, cells: out };
}

/** Canonical text of a group key: SQLite and PostgreSQL return numbers, integers and text differently. */
function keyText(value: unknown): string | null {
  if (value === null || value === undefined) return null;
  const n = toNumber(value);
  if (typeof value !== "string" && n !== null) return String(n);
  return String(value);
}

async function checkReferences(handle: DbLike, query: ClimatologyQuery) {
  const [sites, schools] = await Promise.all([
    handle.db.site.findMany({ select: { id: true, name: true, schoolId: true } }),
    handle.db.school.findMany({ select: { id: true, name: true } }),
  ]);
  const siteNames = new Map(sites.map((s) => [s.id, s.name]));
  const schoolNames = new Map(schools.map((s) => [s.id, s.name]));
  const unknownSites = query.site.filter((id) => !siteNames.has(id));
  if (unknownSites.length) throw new ClimatologyQueryError("unknown-reference", `unknown site id${unknownSites.length > 1 ? "s" : ""}: ${unknownSites.join(", ")}`, "site");
  const unknownSchools = query.school.filter((id) => !schoolNames.has(id));
  if (unknownSchools.length) throw new ClimatologyQueryError("unknown-reference", `unknown school id${unknownSchools.length > 1 ? "s" : ""}: ${unknownSchools.join(", ")}`, "school");
  if (query.site.length && query.school.length) {
    const outside = sites.filter((s) => query.site.includes(s.id) && !query.school.includes(s.schoolId));
    if (outside.length === query.site.length) {
      throw new ClimatologyQueryError("no-flights", "none of the chosen sites belongs to the chosen schools; the filters contradict each other", "site");
    }
  }
  // --- claims: site and school ids named in claim groups must exist too ---
  if (query.claim === "two-group") {
    for (const [field, group] of [["groupA", query.groupA], ["groupB", query.groupB]] as const) {
      for (const part of group?.parts ?? []) {
        if (part.kind !== "site" && part.kind !== "school") continue;
        const known = part.kind === "site" ? siteNames : schoolNames;
        const unknown = part.ids.filter((id) => !known.has(id));
        if (unknown.length) throw new ClimatologyQueryError("unknown-reference", `unknown ${part.kind} id${unknown.length > 1 ? "s" : ""}: ${unknown.join(", ")}`, field);
      }
    }
  }
  return { sites: siteNames, schools: schoolNames };
}

/** A claim group's label with site and school ids replaced by their names. */
function claimGroupLabel(group: ClaimGroup | undefined, names: { sites: Map<string, string>; schools: Map<string, string> }): string {
  if (!group) return "?";
  return group.parts
    .map((part) => {
      if (part.kind === "site") return part.ids.map((id) => names.sites.get(id) ?? id).join(", ");
      if (part.kind === "school") return part.ids.map((id) => names.schools.get(id) ?? id).join(", ");
      return part.label;
    })
    .join(", ");
}

function kmText(m: number): string {
  return String(Number((m / 1000).toFixed(3)));
}

/** Mean temperature per altitude bin and group over the candidate flights' levels of the chosen phase. */
async function loadProfiles(viewer: Viewer, query: ClimatologyQuery, handle: DbLike): Promise<Map<string, ProfileLevelMean[]>> {
  const dialect = dialectFor(handle.engine);
  const where = and(filterConditions(viewer, query, dialect));
  const statement = sql`SELECT ${groupKeySql(query, dialect)} AS "groupKey", l."baseM" AS "baseM", l."topM" AS "topM",
      COUNT(*) AS n, AVG(l."temperatureK") AS "meanK", AVG((l."temperatureK" - 250.0) * (l."temperatureK" - 250.0)) AS "meanSq"
    FROM "FlightSummary" s JOIN "Flight" f ON f."id" = s."flightId"
      JOIN "ProfileLevel" l ON l."runId" = s."runId" AND l."phase" = ${query.phase}
    WHERE ${where}
    GROUP BY 1, 2, 3
    ORDER BY 1, 2`;
  const rows = await handle.db.$queryRaw<Array<{ groupKey: unknown; baseM: unknown; topM: unknown; n: unknown; meanK: unknown; meanSq: unknown }>>(statement);
  const out = new Map<string, ProfileLevelMean[]>();
  for (const row of rows) {
    const key = keyText(row.groupKey);
    const baseM = toNumber(row.baseM);
    const topM = toNumber(row.topM);
    const n = toNumber(row.n) ?? 0;
    const meanK = toNumber(row.meanK);
    const meanSq = toNumber(row.meanSq);
    if (key === null || baseM === null || topM === null || meanK === null || n < 2) continue;
    const offset = meanK - 250;
    const variance = meanSq === null ? null : Math.max(0, ((meanSq - offset * offset) * n) / (n - 1));
    const level: ProfileLevelMean = { altitudeM: (baseM + topM) / 2, meanTemperatureK: meanK, sdTemperatureK: variance === null ? null : Math.sqrt(variance), flightCount: n };
    const list = out.get(key) ?? [];
    list.push(level);
    out.set(key, list);
  }
  return out;
}

/** SQLite answers booleans as 0/1 (number or bigint), PostgreSQL as true/false. */
function isTrue(value: unknown): boolean {
  return value === true || toNumber(value) === 1;
}

/** Does the viewer see at least one real (not invented) flight with a current summary? */
async function anyRealFlightVisible(viewer: Viewer, handle: DbLike): Promise<boolean> {
  const statement = sql`SELECT 1 AS "one" FROM "FlightSummary" s JOIN "Flight" f ON f."id" = s."flightId"
    WHERE ${and([sql`s."isCurrent" = TRUE`, visibilitySql(viewer, "f"), sql`f."synthetic" = FALSE`])}
    LIMIT 1`;
  return (await handle.db.$queryRaw<unknown[]>(statement)).length > 0;
}

/** Invented flights that pass every other filter, for the count of those the rule left out. */
async function countInventedLeftOut(viewer: Viewer, query: ClimatologyQuery, handle: DbLike): Promise<number> {
  const conditions = filterConditions(viewer, { ...query, invented: "include" }, dialectFor(handle.engine));
  const statement = sql`SELECT COUNT(*) AS n FROM "FlightSummary" s JOIN "Flight" f ON f."id" = s."flightId"
    WHERE ${and([...conditions, sql`f."synthetic" = TRUE`])}`;
  const rows = await handle.db.$queryRaw<Array<{ n: unknown }>>(statement);
  return toNumber(rows[0]?.n) ?? 0;
}

/**
 * Runs a climatology query for a viewer: every filter, the chosen metric per flight (the band
 * lapse rate computed from stored levels in SQL), summary statistics per group (lib/stats
 * describe: n, mean, SD, SEM, median, IQR, min, max, t-based 95 % CI), the contributing flights,
 * mean profiles per group, flights excluded (counted by reason, never read as zero) and, when
 * asked, the claim check. Applies the visibility rule of lib/auth to every row.
 * @throws ClimatologyQueryError for unknown ids, no flight with a value, or an empty claim group.
 */
export async function getClimatology(
  viewer: Viewer,
  query: ClimatologyQuery,
  handle: DbLike = getDbHandle(),
  options: { profiles?: boolean } = {},
): Promise<ClimatologyResult> {
  const names = await checkReferences(handle, query);
  const rule = query.invented;
  const includeInvented = rule === "include" || (rule === "auto" && !(await anyRealFlightVisible(viewer, handle)));
  query = { ...query, invented: includeInvented ? "include" : "exclude" };
  const statement = candidateSql(viewer, query, dialectFor(handle.engine));
  const [rows, profiles, leftOutCount] = await Promise.all([
    handle.db.$queryRaw<CandidateRow[]>(statement),
    options.profiles === false ? Promise.resolve(new Map<string, ProfileLevelMean[]>()) : loadProfiles(viewer, query, handle),
    includeInvented ? Promise.resolve(0) : countInventedLeftOut(viewer, query, handle),
  ]);
  // --- claims: a flight that meets both claim groups would count twice; refuse, naming how many ---
  if (query.claim === "two-group") {
    const both = rows.filter((row) => keyText(row.groupKey) === BOTH_GROUPS_KEY).length;
    if (both > 0) {
      throw new ClimatologyQueryError(
        "overlapping-groups",
        `${both} flight${both === 1 ? " meets" : "s meet"} both group A (${claimGroupLabel(query.groupA, names)}) and group B (${claimGroupLabel(query.groupB, names)}); a flight cannot be in both groups, so narrow one of them`,
        "groupB",
      );
    }
  }
  const metric = METRIC_INFO[query.metric];
  const band = bandOf(query);
  const excludedByReason = new Map<string, number>();
  const exclude = (reason: string) => excludedByReason.set(reason, (excludedByReason.get(reason) ?? 0) + 1);
  const bandText = band ? `${kmText(band.baseM)}–${kmText(band.topM)} km ${band.reference.toUpperCase()}` : "";
  const bandWords = band ? `no coverage of ${bandText} (${query.phase})` : "";
  const includeFlights = query.flights === "all";
  const byGroup = new Map<string, { values: number[]; siteNames: string[]; flights: ClimatologyFlight[] }>();
  let inventedContributing = 0;
  /** Cross-table values: row group key → column key → values. */
  const crossCells = new Map<string, Map<string, number[]>>();

  // Runs the sums cannot decide (bins not contiguous, or altitudes that hardly spread) are decided from their levels.
  let levelsOf = new Map<string, Array<BandLevel & { temperatureK: number }>>();
  const rangeOf = (row: CandidateRow): BandRangeMsl | null => (band ? bandRangeMsl(band, toNumber(row.groundElevationM)) : null);
  if (band) {
    const needLevels = rows.filter((row) => {
      const sums = bandSumsOf(row);
      return rangeOf(row) !== null && sums.n !== null && sums.n >= 3 && (sums.maxGapM === null || sumsSpreadTooSmall(sums));
    });
    levelsOf = await loadBandLevels(handle, needLevels.map((row) => row.runId), query.phase);
  }
  for (const row of rows) {
    let value: number | null;
    if (band) {
      const range = rangeOf(row);
      const levels = levelsOf.get(row.runId);
      const coverage = levels ? bandLapseRateFromLevels(levels, range) : bandLapseRateFromSums(bandSumsOf(row), range);
      if (coverage.reason !== null) {
        exclude(`${bandWords}: ${BAND_COVERAGE_REASON_WORDS[coverage.reason]}`);
        continue;
      }
      value = coverage.lapseRateKPerKm;
    } else {
      value = toNumber(row.value);
      if (value === null) {
        exclude(metric.missingReason);
        continue;
      }
    }
    const key = keyText(row.groupKey);
    if (key === null) {
      exclude(query.groupBy === "hours-after-sunrise" ? "no sunrise at the site that day (polar day or night)" : "no group");
      continue;
    }
    if (isTrue(row.synthetic)) inventedContributing++;
    if (query.crossBy !== "none") {
      const crossKey = keyText(row.crossKey);
      if (crossKey !== null) {
        const cell = crossCells.get(key)?.get(crossKey);
        if (cell) cell.push(value);
        else crossCells.set(key, (crossCells.get(key) ?? new Map<string, number[]>()).set(crossKey, [value]));
      }
    }
    const siteName = names.sites.get(row.siteId) ?? row.siteId;
    const entry = byGroup.get(key) ?? { values: [], siteNames: [], flights: [] };
    byGroup.set(key, entry);
    if (!includeFlights) {
      entry.values.push(value);
      entry.siteNames.push(siteName);
      continue;
    }
    entry.flights.push({
      flightId: row.flightId,
      title: row.title,
      siteId: row.siteId,
      siteName,
      schoolId: row.schoolId,
      schoolName: names.schools.get(row.schoolId) ?? row.schoolId,
      launchAtUtc: row.launchAtUtc,
      dayOfYear: toNumber(row.dayOfYear) ?? 0,
      localHour: toNumber(row.localHour) ?? 0,
      hoursAfterSunrise: toNumber(row.hoursAfterSunrise),
      value,
      synthetic: isTrue(row.synthetic),
    });
  }

  const valuesOf = new Map<string, { values: number[]; siteNames: string[] }>();
  const groups: ClimatologyGroup[] = [...byGroup.entries()]
    .map(([key, entry]) => {
      const flights = entry.flights;
      // Plain code-unit comparison: ISO times sort correctly and it is much cheaper than localeCompare on 10,000 rows.
      flights.sort((a, b) => (a.launchAtUtc < b.launchAtUtc ? -1 : a.launchAtUtc > b.launchAtUtc ? 1 : a.flightId < b.flightId ? -1 : a.flightId > b.flightId ? 1 : 0));
      if (includeFlights) {
        entry.values = flights.map((f) => f.value);
        entry.siteNames = flights.map((f) => f.siteName);
      }
      valuesOf.set(key, entry);
      return { key, label: groupLabel(query, key, names), ...statistics(entry.values), flights };
    })
    .sort((a, b) => {
      const [ra, ta] = groupOrder(query, a.key, a.label);
      const [rb, tb] = groupOrder(query, b.key, b.label);
      return ra - rb || ta.localeCompare(tb);
    });
  const excluded = [...excludedByReason.entries()].map(([reason, count]) => ({ reason, count })).sort((a, b) => b.count - a.count);
  const excludedCount = excluded.reduce((s, e) => s + e.count, 0);
  const allValues = groups.flatMap((g) => valuesOf.get(g.key)?.values ?? []);

  if (allValues.length === 0) {
    const why = excluded.length ? ` (${excluded.map((e) => `${e.count} excluded: ${e.reason}`).join("; ")})` : "";
    const leftOut = leftOutCount > 0 ? ` (${leftOutCount} invented flight${leftOutCount === 1 ? "" : "s"} left out because real flights exist; invented=include takes them)` : "";
    const message = rows.length === 0 ? `No flights match these filters${leftOut}` : `None of the ${rows.length} matching flights has a ${metric.label}${why}`;
    throw new ClimatologyQueryError("no-flights", message, band ? "bandBaseKm" : null);
  }

  let claim: ClaimCheckResult | null = null;
  const metricLabel = band ? `${metric.label} ${bandText}` : metric.label;
  if (query.claim === "one-sample" && query.claimValue !== undefined) {
    claim = runClaimCheck({
      kind: "one-sample",
      alternative: query.claimSide,
      statedValue: query.claimValue,
      ...(query.claimTolerance === undefined ? {} : { tolerance: query.claimTolerance }),
      group: { label: "all flights", values: allValues, siteIds: groups.flatMap((g) => valuesOf.get(g.key)?.siteNames ?? []) },
      metricLabel,
      unit: metric.unit,
    });
  } else if (query.claim === "two-group") {
    const a = groups.find((g) => g.key === "A");
    const b = groups.find((g) => g.key === "B");
    for (const [group, field, label] of [[a, "groupA", claimGroupLabel(query.groupA, names)], [b, "groupB", claimGroupLabel(query.groupB, names)]] as const) {
      if (!group) {
        throw new ClimatologyQueryError("empty-group", `group ${field === "groupA" ? "A" : "B"} (${label ?? "?"}) has no flight with a ${metric.label} under these filters`, field);
      }
    }
    if (a && b) {
      claim = runClaimCheck({
        kind: "two-group",
        alternative: query.claimSide,
        groupA: { label: claimGroupLabel(query.groupA, names), values: valuesOf.get("A")?.values ?? [], siteIds: valuesOf.get("A")?.siteNames ?? [] },
        groupB: { label: claimGroupLabel(query.groupB, names), values: valuesOf.get("B")?.values ?? [], siteIds: valuesOf.get("B")?.siteNames ?? [] },
        metricLabel,
        unit: metric.unit,
      });
    }
  }

  const crossTable = query.crossBy === "none" ? null : buildCrossTable(query, groups, crossCells, names);

  const warnings: string[] = [];
  if (inventedContributing > 0) warnings.push(`${inventedContributing} of the ${allValues.length} contributing flights ${inventedContributing === 1 ? "is" : "are"} invented (demo or test data, not measurements)`);
  if (excludedCount > 0) warnings.push(`${excludedCount} flight${excludedCount === 1 ? "" : "s"} excluded: ${excluded.map((e) => `${e.reason} (${e.count})`).join("; ")}`);
  return {
    metric: { ...metric, label: metricLabel },
    band: band ? { baseM: band.baseM, topM: band.topM, reference: band.reference, phase: query.phase } : null,
    matchedFlightCount: rows.length,
    groups,
    overall: statistics(allValues),
    excluded,
    excludedCount,
    profiles: groups.map((g) => ({ key: g.key, label: g.label, levels: profiles.get(g.key) ?? [] })),
    claim,
    crossTable,
    invented: { rule, included: includeInvented, contributingCount: inventedContributing, leftOutCount },
    warnings,
  };
}

