/**
 * The one schema for a climatology query: filters, metric, grouping and claim. The Climatology
 * page reads it from its URL, GET /api/v1/climatology from the request's query string, and both
 * build links back with climatologySearchParams(), so a query and its claim survive a reload and
 * can be shared as a link. Pure: no database, no environment.
 */
import { z } from "zod";
import {
  SEASON_CODES,
  SEASON_NAMES,
  SeasonInputError,
  monthsOfSeason,
  monthsOfSeasonCode,
  parseMonthSet,
  type SeasonCode,
  type SeasonName,
} from "../analysis/season.ts";
import { HEIGHT_REFERENCES } from "../analysis/band-coverage.ts";
import { strictQueryObject } from "./strict-params.ts";

export const CLIMATOLOGY_METRICS = [
  "tropospheric-lapse-rate",
  "band-lapse-rate",
  "tropopause-altitude",
  "tropopause-temperature",
  "surface-inversion-frequency",
  "surface-inversion-depth",
  "surface-inversion-strength",
  "surface-temperature",
  "max-altitude",
  "surface-dew-point",
  "lcl-altitude",
  "precipitable-water",
  "freezing-level-altitude",
  "mixed-layer-height",
  "mixed-layer-height-gradient",
] as const;
export type ClimatologyMetric = (typeof CLIMATOLOGY_METRICS)[number];

export const CLIMATOLOGY_GROUPINGS = ["none", "season", "season-code", "month", "site", "school", "year", "launch-hour", "hours-after-sunrise"] as const;
export type ClimatologyGrouping = (typeof CLIMATOLOGY_GROUPINGS)[number];

/** Bin widths (hours) offered for time-of-day groups; each divides 48 (the SQL binning relies on it). */
export const HOUR_BIN_WIDTHS = [1, 2, 3, 4, 6] as const;

export const CLAIM_KINDS = ["none", "one-sample", "two-group"] as const;
export type ClaimKind = (typeof CLAIM_KINDS)[number];

export const CLAIM_SIDES = ["two-sided", "greater", "less"] as const;

export const SCATTER_AXES = ["day-of-year", "launch-hour"] as const;

/** A season filter or claim group: a hemisphere-aware season name, or a set of local months. */
export type MonthSelection =
  | { kind: "season-name"; name: SeasonName; label: string }
  | { kind: "months"; months: number[]; label: string };

const MONTH_ABBREVIATIONS = ["Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"];

export function monthAbbreviation(month: number): string {
  return MONTH_ABBREVIATIONS[month - 1] ?? String(month);
}

/** "Oct–Nov", "Dec–Feb", "Jan, Mar" for a month set (runs of consecutive months joined by a dash, wrapping the year end). */
export function describeMonths(months: readonly number[]): string {
  const set = new Set(months);
  if (set.size === 12) return "all months";
  const runs: number[][] = [];
  // Start runs at a month whose predecessor is not in the set, so Dec–Feb stays one run.
  for (let m = 1; m <= 12; m++) {
    const previous = m === 1 ? 12 : m - 1;
    if (!set.has(m) || set.has(previous)) continue;
    const run = [m];
    let next = (m % 12) + 1;
    while (set.has(next) && next !== m) {
      run.push(next);
      next = (next % 12) + 1;
    }
    runs.push(run);
  }
  return runs
    .map((run) => (run.length === 1 ? monthAbbreviation(run[0] as number) : `${monthAbbreviation(run[0] as number)}–${monthAbbreviation(run[run.length - 1] as number)}`))
    .join(", ");
}

/**
 * Reads a season filter or claim group as a person writes it: a season name ("summer", which is
 * hemisphere-aware: JJA north, DJF south), a season code ("JJA"), or a month set ("Oct-Nov", "10-11",
 * "Dec–Feb"). Codes and month sets mean the same local months at every site.
 * @throws SeasonInputError when the text is not one of those.
 */
export function parseMonthSelection(text: string): MonthSelection {
  const trimmed = text.trim();
  const lower = trimmed.toLowerCase();
  if ((SEASON_NAMES as readonly string[]).includes(lower)) {
    return { kind: "season-name", name: lower as SeasonName, label: lower };
  }
  const upper = trimmed.toUpperCase();
  if ((SEASON_CODES as readonly string[]).includes(upper)) {
    return { kind: "months", months: monthsOfSeasonCode(upper as SeasonCode), label: upper };
  }
  const months = parseMonthSet(trimmed);
  return { kind: "months", months, label: describeMonths(months) };
}

/** Months a selection covers in each hemisphere (a season name differs between them). */
export function monthsOfSelection(selection: MonthSelection): { northern: number[]; southern: number[] } {
  if (selection.kind === "months") return { northern: selection.months, southern: selection.months };
  return { northern: monthsOfSeason(selection.name, 45), southern: monthsOfSeason(selection.name, -45) };
}

function sharedMonths(a: MonthSelection, b: MonthSelection): { northern: number[]; southern: number[] } {
  const ma = monthsOfSelection(a);
  const mb = monthsOfSelection(b);
  return {
    northern: ma.northern.filter((m) => mb.northern.includes(m)),
    southern: ma.southern.filter((m) => mb.southern.includes(m)),
  };
}

const blankToUndefined = (v: unknown) => (typeof v === "string" && v.trim() === "" ? undefined : v);

const optionalText = (max: number) => z.preprocess(blankToUndefined, z.string().trim().max(max).optional());

const optionalNumber = (label: string, min: number, max: number) =>
  z.preprocess(
    blankToUndefined,
    z.coerce
      .number({ error: `${label} must be a number` })
      .refine((v) => Number.isFinite(v), { message: `${label} must be a finite number` })
      .refine((v) => v >= min && v <= max, { message: `${label} must lie between ${min} and ${max}` })
      .optional(),
  );

const idList = z.preprocess(
  (v) => {
    if (v === undefined || v === null) return [];
    const text = Array.isArray(v) ? v.join(",") : String(v);
    return text.split(",").map((s) => s.trim()).filter((s) => s !== "");
  },
  z.array(z.string().regex(/^[A-Za-z0-9_-]{1,64}$/, { message: "ids are letters, digits, - and _ only" })).max(200),
);

const isoDate = (label: string) =>
  z.preprocess(
    blankToUndefined,
    z
      .string()
      .regex(/^\d{4}-\d{2}-\d{2}$/, { message: `${label} must be a date written YYYY-MM-DD` })
      .refine((v) => !Number.isNaN(Date.parse(`${v}T00:00:00Z`)) && new Date(`${v}T00:00:00Z`).toISOString().startsWith(v), {
        message: `${label} is not a calendar date`,
      })
      .optional(),
  );

/** "2023,2024" or "2023-2025" (inclusive) as sorted years; empty text gives none. Throws YearListError. */
class YearListError extends Error {}
function yearsOfList(text: string): number[] {
  const years = new Set<number>();
  for (const item of text.split(",").map((s) => s.trim()).filter((s) => s !== "")) {
    const range = /^(\d{4})\s*[-–]\s*(\d{4})$/.exec(item);
    if (range) {
      const from = Number(range[1]);
      const to = Number(range[2]);
      if (to < from || to - from > 200) throw new YearListError(`year range "${item}" must run forwards (e.g. 2023-2025)`);
      for (let y = from; y <= to; y++) years.add(y);
    } else if (/^\d{4}$/.test(item)) years.add(Number(item));
    else throw new YearListError(`"${item}" is not a year or a year range like 2023-2025`);
  }
  return [...years].sort((a, b) => a - b);
}

const yearList = z.preprocess(blankToUndefined, z.string().max(200).optional()).transform((text, ctx) => {
  if (text === undefined) return [] as number[];
  try {
    return yearsOfList(text);
  } catch (error) {
    if (!(error instanceof YearListError)) throw error;
    ctx.addIssue({ code: "custom", message: error.message });
    return z.NEVER;
  }
});

const monthSelectionField = (label: string) =>
  z.preprocess(blankToUndefined, z.string().max(100).optional()).transform((text, ctx): MonthSelection | undefined => {
    if (text === undefined) return undefined;
    try {
      return parseMonthSelection(text);
    } catch (error) {
      const reason = error instanceof SeasonInputError ? error.message : String(error);
      ctx.addIssue({ code: "custom", message: `${label}: ${reason}. Write a season (summer, JJA) or months (Oct-Nov, 10-11)` });
      return z.NEVER;
    }
  });


// --- claims: claim groups (season or months, site, school, year, launch-hour or hours-after-sunrise range,
// or a filter set joining several with ";") -------------------------------------------------------------

/** One condition of a claim group. */
export type ClaimGroupPart =
  | MonthSelection
  | { kind: "site"; ids: string[]; label: string }
  | { kind: "school"; ids: string[]; label: string }
  | { kind: "year"; years: number[]; label: string }
  /** Local launch hour, fromH ≤ hour < toH. */
  | { kind: "hour"; fromH: number; toH: number; label: string }
  /** Hours after sunrise, fromH ≤ hours < toH. */
  | { kind: "sunrise"; fromH: number; toH: number; label: string };

/** A claim group: every part must hold (a filter set); `text` is the canonical form for links. */
export interface ClaimGroup {
  readonly parts: readonly ClaimGroupPart[];
  readonly label: string;
  readonly text: string;
}

/**
 * A claim group as conditions on FlightSummary columns. This is the one definition of group
 * membership: climatology-core renders it as SQL, flightInClaimGroup evaluates it in JS.
 */
export type ClaimGroupCondition =
  | { column: "siteId" | "schoolId"; in: readonly string[] }
  | { column: "year" | "month"; in: readonly number[] }
  | { column: "seasonName"; equals: string }
  | { column: "localHour" | "hoursAfterSunrise"; fromInclusive: number; toExclusive: number };

export function claimGroupConditions(group: ClaimGroup): ClaimGroupCondition[] {
  return group.parts.map((part): ClaimGroupCondition => {
    switch (part.kind) {
      case "season-name":
        return { column: "seasonName", equals: part.name };
      case "months":
        return { column: "month", in: part.months };
      case "site":
        return { column: "siteId", in: part.ids };
      case "school":
        return { column: "schoolId", in: part.ids };
      case "year":
        return { column: "year", in: part.years };
      case "hour":
        return { column: "localHour", fromInclusive: part.fromH, toExclusive: part.toH };
      case "sunrise":
        return { column: "hoursAfterSunrise", fromInclusive: part.fromH, toExclusive: part.toH };
    }
  });
}

/** The summary columns a claim group reads. */
export interface ClaimGroupRow {
  siteId: string;
  schoolId: string;
  year: number;
  month: number;
  seasonName: string;
  localHour: number | null;
  hoursAfterSunrise: number | null;
}

/** Whether a flight's summary falls in a claim group (the JS reading of claimGroupConditions). */
export function flightInClaimGroup(group: ClaimGroup, row: ClaimGroupRow): boolean {
  return claimGroupConditions(group).every((c) => {
    if ("equals" in c) return row[c.column] === c.equals;
    if ("in" in c) return (c.in as readonly (string | number)[]).includes(row[c.column]);
    const v = row[c.column];
    return v !== null && v >= c.fromInclusive && v < c.toExclusive;
  });
}

export class ClaimGroupInputError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "ClaimGroupInputError";
  }
}

const HOUR_RANGE = /^(-?\d+(?:\.\d+)?)\s*(?:-|–|to)\s*(-?\d+(?:\.\d+)?)$/;

function parseHourRange(text: string, kind: "hour" | "sunrise"): { fromH: number; toH: number } {
  const m = HOUR_RANGE.exec(text.trim());
  const [min, max] = kind === "hour" ? [0, 24] : [-24, 24];
  const example = kind === "hour" ? "hour:6-12" : "sunrise:0-3";
  if (!m) throw new ClaimGroupInputError(`"${text}" is not an hour range; write e.g. ${example}`);
  const fromH = Number(m[1]);
  const toH = Number(m[2]);
  if (!(fromH >= min && toH <= max)) throw new ClaimGroupInputError(`${kind} range ${text} must lie within ${min} to ${max} h`);
  if (!(fromH < toH)) throw new ClaimGroupInputError(`${kind} range ${text} must run forwards (from below to)`);
  return { fromH, toH };
}

function parseYears(text: string): number[] {
  let years: number[];
  try {
    years = yearsOfList(text);
  } catch (error) {
    throw error instanceof YearListError ? new ClaimGroupInputError(error.message) : error;
  }
  if (years.length === 0) throw new ClaimGroupInputError("year: needs a year, e.g. year:2024");
  return years;
}

function parseIds(text: string, kind: "site" | "school"): string[] {
  const ids = text.split(",").map((s) => s.trim()).filter((s) => s !== "");
  if (ids.length === 0) throw new ClaimGroupInputError(`${kind}: needs an id, e.g. ${kind}:<id>`);
  for (const id of ids) if (!/^[A-Za-z0-9_-]{1,64}$/.test(id)) throw new ClaimGroupInputError(`${kind} id "${id}": ids are letters, digits, - and _ only`);
  return [...new Set(ids)];
}

function hoursText(h: number): string {
  return h > 0 ? `+${h}` : h < 0 ? `−${-h}` : "0";
}

function parseClaimGroupPart(text: string): { part: ClaimGroupPart; text: string } {
  const m = /^(site|school|year|hour|sunrise|season|months)\s*:\s*(.*)$/i.exec(text.trim());
  if (!m) {
    const part = parseMonthSelection(text);
    return { part, text: part.kind === "season-name" ? part.name : text.trim() };
  }
  const kind = (m[1] as string).toLowerCase();
  const rest = (m[2] as string).trim();
  switch (kind) {
    case "site":
    case "school": {
      const ids = parseIds(rest, kind);
      return { part: { kind, ids, label: `${kind} ${ids.join(", ")}` }, text: `${kind}:${ids.join(",")}` };
    }
    case "year": {
      const years = parseYears(rest);
      return { part: { kind: "year", years, label: years.length === 1 ? String(years[0]) : `years ${rest}` }, text: `year:${rest}` };
    }
    case "hour": {
      const r = parseHourRange(rest, "hour");
      return { part: { kind: "hour", ...r, label: `launched ${r.fromH}–${r.toH} h local` }, text: `hour:${r.fromH}-${r.toH}` };
    }
    case "sunrise": {
      const r = parseHourRange(rest, "sunrise");
      return { part: { kind: "sunrise", ...r, label: `${hoursText(r.fromH)} to ${hoursText(r.toH)} h after sunrise` }, text: `sunrise:${r.fromH}-${r.toH}` };
    }
    default: {
      const part = parseMonthSelection(rest);
      return { part, text: part.kind === "season-name" ? part.name : rest };
    }
  }
}

/**
 * Reads a claim group: "summer", "JJA", "Oct-Nov" (as before), "site:<id>", "school:<id>",
 * "year:2024", "hour:6-12" (local launch hour, 6 ≤ h < 12), "sunrise:0-3", or a filter set of
 * several joined by ";" ("site:abc; summer; hour:6-12"), all of which must hold.
 * @throws ClaimGroupInputError or SeasonInputError for text that is none of those.
 */
export function parseClaimGroup(text: string): ClaimGroup {
  const pieces = text.split(";").map((s) => s.trim()).filter((s) => s !== "");
  if (pieces.length === 0) throw new ClaimGroupInputError("the group is empty");
  if (pieces.length > 8) throw new ClaimGroupInputError("a filter set takes at most 8 conditions");
  const parsed = pieces.map(parseClaimGroupPart);
  return { parts: parsed.map((p) => p.part), label: parsed.map((p) => p.part.label).join(", "), text: parsed.map((p) => p.text).join("; ") };
}

const claimGroupField = (label: string) =>
  z.preprocess(blankToUndefined, z.string().max(300).optional()).transform((text, ctx): ClaimGroup | undefined => {
    if (text === undefined) return undefined;
    try {
      return parseClaimGroup(text);
    } catch (error) {
      const reason = error instanceof SeasonInputError || error instanceof ClaimGroupInputError ? error.message : String(error);
      ctx.addIssue({
        code: "custom",
        message: `${label}: ${reason}. Write a season (summer, JJA), months (Oct-Nov), site:<id>, school:<id>, year:2024, hour:6-12, sunrise:0-3, or several joined by ";"`,
      });
      return z.NEVER;
    }
  });

/** Parts of the same kind in both groups that certainly overlap, in words; null when none is known to. */
function claimGroupsOverlapStatically(a: ClaimGroup, b: ClaimGroup): string | null {
  // Only single-condition groups of one kind can be judged without the data; the rest is checked on the flights.
  if (a.parts.length !== 1 || b.parts.length !== 1) return null;
  const pa = a.parts[0] as ClaimGroupPart;
  const pb = b.parts[0] as ClaimGroupPart;
  const isMonths = (p: ClaimGroupPart): p is MonthSelection => p.kind === "season-name" || p.kind === "months";
  if (isMonths(pa) && isMonths(pb)) {
    const shared = sharedMonths(pa, pb);
    if (shared.northern.length === 0 && shared.southern.length === 0) return null;
    return shared.northern.length > 0 ? `${describeMonths(shared.northern)} (northern sites)` : `${describeMonths(shared.southern)} (southern sites)`;
  }
  if ((pa.kind === "site" && pb.kind === "site") || (pa.kind === "school" && pb.kind === "school")) {
    const shared = pa.ids.filter((id) => (pb as { ids: string[] }).ids.includes(id));
    return shared.length ? `${pa.kind} ${shared.join(", ")}` : null;
  }
  if (pa.kind === "year" && pb.kind === "year") {
    const shared = pa.years.filter((y) => pb.years.includes(y));
    return shared.length ? `year ${shared.join(", ")}` : null;
  }
  if ((pa.kind === "hour" && pb.kind === "hour") || (pa.kind === "sunrise" && pb.kind === "sunrise")) {
    const qb = pb as { fromH: number; toH: number };
    return pa.fromH < qb.toH && qb.fromH < pa.toH ? `hours ${Math.max(pa.fromH, qb.fromH)}–${Math.min(pa.toH, qb.toH)}` : null;
  }
  return null;
}
// --- end of claims: claim groups ---

const enumWithDefault = <T extends readonly [string, ...string[]]>(values: T, fallback: T[number], label: string) =>
  z.preprocess(blankToUndefined, z.enum(values, { error: `${label} must be one of: ${values.join(", ")}` }).default(fallback as never));

/**
 * The climatology query as it arrives (URL search params or API query string), before checks across
 * fields. Strict: an unknown parameter (`sites=` for `site=`) is refused by name, never ignored.
 */
const climatologyBaseSchema = strictQueryObject({
  school: idList,
  site: idList,
  from: isoDate("from"),
  to: isoDate("to"),
  years: yearList,
  season: monthSelectionField("season"),
  months: monthSelectionField("months"),
  hourFrom: optionalNumber("hourFrom (local launch hour)", 0, 24),
  hourTo: optionalNumber("hourTo (local launch hour)", 0, 24),
  sunriseFrom: optionalNumber("sunriseFrom (hours after sunrise)", -24, 24),
  sunriseTo: optionalNumber("sunriseTo (hours after sunrise)", -24, 24),
  elevationFrom: optionalNumber("elevationFrom (solar elevation, degrees)", -90, 90),
  elevationTo: optionalNumber("elevationTo (solar elevation, degrees)", -90, 90),
  phase: enumWithDefault(["ascent", "descent"] as const, "ascent", "phase"),
  qc: enumWithDefault(["exclude", "include"] as const, "exclude", "qc"),
  /**
   * Invented flights (Flight.synthetic, e.g. the demo): "auto" leaves them out whenever the viewer
   * can see a real flight and takes them (counted as invented) when there is nothing else.
   */
  invented: enumWithDefault(["auto", "include", "exclude"] as const, "auto", "invented"),
  minCoverageKm: optionalNumber("minCoverageKm (minimum vertical coverage)", 0, 60),
  metric: enumWithDefault(CLIMATOLOGY_METRICS, "tropospheric-lapse-rate", "metric"),
  bandBaseKm: optionalNumber("bandBaseKm", -0.5, 60),
  bandTopKm: optionalNumber("bandTopKm", -0.5, 60),
  /**
   * What the band limits are measured from: agl (each flight's ground, its site's elevation) or msl (sea
   * level). Default msl, the meaning band links had before they could say, so an old link keeps its answer.
   */
  bandReference: enumWithDefault(HEIGHT_REFERENCES, "msl", "bandReference"),
  groupBy: enumWithDefault(CLIMATOLOGY_GROUPINGS, "season", "groupBy"),
  // --- claims: a second grouping for a cross-table of n, mean and 95 % CI (groupBy × crossBy) ---
  crossBy: enumWithDefault(CLIMATOLOGY_GROUPINGS, "none", "crossBy"),
  binHours: z.preprocess(
    blankToUndefined,
    z.coerce
      .number()
      .refine((v) => (HOUR_BIN_WIDTHS as readonly number[]).includes(v), { message: `binHours must be one of ${HOUR_BIN_WIDTHS.join(", ")}` })
      .default(3),
  ),
  chartX: enumWithDefault(SCATTER_AXES, "day-of-year", "chartX"),
  /** "none" returns the group statistics without the contributing flights (faster on large archives). */
  flights: enumWithDefault(["all", "none"] as const, "all", "flights"),
  claim: enumWithDefault(CLAIM_KINDS, "none", "claim"),
  claimValue: optionalNumber("claimValue", -1e6, 1e6),
  claimSide: enumWithDefault(CLAIM_SIDES, "two-sided", "claimSide"),
  // --- claims: tolerance of an "equals" claim (6.5 ± 0.3), tested as equivalence ---
  claimTolerance: optionalNumber("claimTolerance (± tolerance of the stated value)", 0, 1e6),
  groupA: claimGroupField("groupA"),
  groupB: claimGroupField("groupB"),
});

function checkRange(
  ctx: z.RefinementCtx,
  from: number | undefined,
  to: number | undefined,
  fromKey: string,
  toKey: string,
  what: string,
): void {
  if (from !== undefined && to !== undefined && from > to) {
    ctx.addIssue({ code: "custom", path: [toKey], message: `${what}: ${toKey} (${to}) is below ${fromKey} (${from}); nothing can match` });
  }
}

/** The one climatology query schema. Checks across fields give 422-worthy, plain messages. */
export const climatologyQuerySchema = climatologyBaseSchema.superRefine((q, ctx) => {
  if (q.from !== undefined && q.to !== undefined && q.from > q.to) {
    ctx.addIssue({ code: "custom", path: ["to"], message: `the date range ends (${q.to}) before it starts (${q.from})` });
  }
  if (q.years.length > 0 && (q.from !== undefined || q.to !== undefined)) {
    const fromYear = q.from === undefined ? -Infinity : Number(q.from.slice(0, 4));
    const toYear = q.to === undefined ? Infinity : Number(q.to.slice(0, 4));
    if (!q.years.some((y) => y >= fromYear && y <= toYear)) {
      ctx.addIssue({ code: "custom", path: ["years"], message: `none of the years ${q.years.join(", ")} lies in the date range; the filters contradict each other` });
    }
  }
  checkRange(ctx, q.hourFrom, q.hourTo, "hourFrom", "hourTo", "launch hour");
  checkRange(ctx, q.sunriseFrom, q.sunriseTo, "sunriseFrom", "sunriseTo", "hours after sunrise");
  checkRange(ctx, q.elevationFrom, q.elevationTo, "elevationFrom", "elevationTo", "solar elevation");
  if (q.season && q.months) {
    const shared = sharedMonths(q.season, q.months);
    if (shared.northern.length === 0 && shared.southern.length === 0) {
      ctx.addIssue({ code: "custom", path: ["months"], message: `season ${q.season.label} and months ${q.months.label} have no month in common; nothing can match` });
    }
  }
  if (q.metric === "band-lapse-rate") {
    if (q.bandBaseKm === undefined) ctx.addIssue({ code: "custom", path: ["bandBaseKm"], message: "the band lapse rate needs a band base (km)" });
    if (q.bandTopKm === undefined) ctx.addIssue({ code: "custom", path: ["bandTopKm"], message: "the band lapse rate needs a band top (km)" });
    if (q.bandBaseKm !== undefined && q.bandTopKm !== undefined && q.bandBaseKm >= q.bandTopKm) {
      ctx.addIssue({ code: "custom", path: ["bandTopKm"], message: `the band base (${q.bandBaseKm} km) must lie below its top (${q.bandTopKm} km)` });
    }
  } else if (q.phase === "descent") {
    ctx.addIssue({ code: "custom", path: ["phase"], message: "only the band lapse rate can use the descent; the other metrics come from the stored ascent summary" });
  }
  // --- claims: the cross-table needs a second grouping different from the first ---
  if (q.crossBy !== "none" && q.crossBy === q.groupBy && q.claim !== "two-group") {
    ctx.addIssue({ code: "custom", path: ["crossBy"], message: `crossBy (${q.crossBy}) must differ from groupBy; choose a second grouping` });
  }
  if (q.claim === "one-sample" && q.claimValue === undefined) {
    ctx.addIssue({ code: "custom", path: ["claimValue"], message: "a one-sample claim needs the stated value (e.g. 6.5 for 6.5 K/km)" });
  }
  // --- claims: a tolerance belongs to a one-sample "equals" claim and must be above zero ---
  if (q.claimTolerance !== undefined) {
    if (q.claim !== "one-sample" || q.claimSide !== "two-sided") {
      ctx.addIssue({ code: "custom", path: ["claimTolerance"], message: "a tolerance belongs to an \"equals\" claim (one-sample, two-sided)" });
    } else if (!(q.claimTolerance > 0)) {
      ctx.addIssue({ code: "custom", path: ["claimTolerance"], message: "the tolerance must be above 0 (e.g. 0.3 for 6.5 ± 0.3 K/km)" });
    }
  }
  if (q.claim === "two-group") {
    if (!q.groupA) ctx.addIssue({ code: "custom", path: ["groupA"], message: "a two-group claim needs group A (e.g. summer or JJA)" });
    if (!q.groupB) ctx.addIssue({ code: "custom", path: ["groupB"], message: "a two-group claim needs group B (e.g. Oct-Nov)" });
    if (q.groupA && q.groupB) {
      const where = claimGroupsOverlapStatically(q.groupA, q.groupB);
      if (where !== null) {
        ctx.addIssue({ code: "custom", path: ["groupB"], message: `groups A (${q.groupA.label}) and B (${q.groupB.label}) share ${where}; a flight cannot be in both groups` });
      }
    }
  }
});

export type ClimatologyQuery = z.output<typeof climatologyQuerySchema>;

/** A plain record from URLSearchParams or a Next.js searchParams object; repeated keys are joined by commas. */
export function searchRecord(params: URLSearchParams | Record<string, string | string[] | undefined>): Record<string, string> {
  const out: Record<string, string> = {};
  const add = (key: string, value: string) => {
    out[key] = out[key] === undefined || out[key] === "" ? value : `${out[key]},${value}`;
  };
  if (params instanceof URLSearchParams) {
    params.forEach((value, key) => add(key, value));
  } else {
    for (const [key, value] of Object.entries(params)) {
      if (typeof value === "string") add(key, value);
      else if (Array.isArray(value)) for (const v of value) add(key, v);
    }
  }
  return out;
}

export type ClimatologyParseResult =
  | { ok: true; query: ClimatologyQuery }
  | { ok: false; fieldErrors: Record<string, string[]>; message: string };

/** Validates a search-param record; on failure, messages per field plus one sentence naming each problem. */
export function parseClimatologyQuery(record: Record<string, string>): ClimatologyParseResult {
  const parsed = climatologyQuerySchema.safeParse(record);
  if (parsed.success) return { ok: true, query: parsed.data };
  const fieldErrors: Record<string, string[]> = {};
  for (const issue of parsed.error.issues) {
    const key = issue.code === "unrecognized_keys" ? "parameters" : String(issue.path[0] ?? "query");
    (fieldErrors[key] ??= []).push(issue.message);
  }
  const message = Object.entries(fieldErrors)
    .map(([key, messages]) => `${key}: ${messages.join("; ")}`)
    .join(". ");
  return { ok: false, fieldErrors, message };
}

function selectionText(selection: MonthSelection | undefined, raw: string | undefined): string | undefined {
  if (raw !== undefined) return raw;
  if (!selection) return undefined;
  return selection.kind === "season-name" ? selection.name : selection.months.join(",");
}

/**
 * The search params that reproduce a query (defaults left out, so links stay short). `raw` keeps
 * the text a person typed for month selections ("Oct-Nov" rather than "10,11").
 */
export function climatologySearchParams(query: ClimatologyQuery, raw: Record<string, string> = {}): URLSearchParams {
  const p = new URLSearchParams();
  const set = (key: string, value: string | number | undefined) => {
    if (value !== undefined && value !== "") p.set(key, String(value));
  };
  if (query.school.length) set("school", query.school.join(","));
  if (query.site.length) set("site", query.site.join(","));
  set("from", query.from);
  set("to", query.to);
  if (query.years.length) set("years", raw.years?.trim() || query.years.join(","));
  set("season", selectionText(query.season, raw.season?.trim() || undefined));
  set("months", selectionText(query.months, raw.months?.trim() || undefined));
  set("hourFrom", query.hourFrom);
  set("hourTo", query.hourTo);
  set("sunriseFrom", query.sunriseFrom);
  set("sunriseTo", query.sunriseTo);
  set("elevationFrom", query.elevationFrom);
  set("elevationTo", query.elevationTo);
  if (query.phase !== "ascent") set("phase", query.phase);
  if (query.qc !== "exclude") set("qc", query.qc);
  if (query.invented !== "auto") set("invented", query.invented);
  set("minCoverageKm", query.minCoverageKm);
  set("metric", query.metric);
  if (query.metric === "band-lapse-rate") {
    set("bandBaseKm", query.bandBaseKm);
    set("bandTopKm", query.bandTopKm);
    // Always written, so a shared link never depends on the default.
    set("bandReference", query.bandReference);
  }
  set("groupBy", query.groupBy);
  if (query.crossBy !== "none") set("crossBy", query.crossBy);
  if (query.groupBy === "launch-hour" || query.groupBy === "hours-after-sunrise") set("binHours", query.binHours);
  if (query.chartX !== "day-of-year") set("chartX", query.chartX);
  if (query.flights !== "all") set("flights", query.flights);
  if (query.claim !== "none") {
    set("claim", query.claim);
    set("claimSide", query.claimSide);
    if (query.claim === "one-sample") set("claimValue", query.claimValue);
    if (query.claim === "one-sample" && query.claimTolerance !== undefined) set("claimTolerance", query.claimTolerance);
    if (query.claim === "two-group") {
      set("groupA", raw.groupA?.trim() || query.groupA?.text);
      set("groupB", raw.groupB?.trim() || query.groupB?.text);
    }
  }
  return p;
}
