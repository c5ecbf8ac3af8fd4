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

/** Metrics read from the stored flight summary, which describes the ascent. */
export const SUMMARY_METRICS: readonly ClimatologyMetric[] = CLIMATOLOGY_METRICS.filter((m) => m !== "band-lapse-rate");

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

/** "2023,2024" or "2023-2025" (inclusive). */
const yearList = z.preprocess(blankToUndefined, z.string().max(200).optional()).transform((text, ctx) => {
  if (text === undefined) return [] as number[];
  const years = new Set<number>();
  for (const item of text.split(",").map((s) => s.trim()).filter((s) => s !== "")) {
    const range = /^(\d{4})\s*[-–]\s*(\d{4})$/.exec(item);
    if (range) {
      const from = Number(range[1]);
      const to = Number(range[2]);
      if (to < from || to - from > 200) {
        ctx.addIssue({ code: "custom", message: `year range "${item}" must run forwards (e.g. 2023-2025)` });
        return z.NEVER;
      }
      for (let y = from; y <= to; y++) years.add(y);
    } else if (/^\d{4}$/.test(item)) {
      years.add(Number(item));
    } else {
      ctx.addIssue({ code: "custom", message: `"${item}" is not a year or a year range like 2023-2025` });
      return z.NEVER;
    }
  }
  return [...years].sort((a, b) => a - b);
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
  groupA: monthSelectionField("groupA"),
  groupB: monthSelectionField("groupB"),
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
  if (q.claim === "one-sample" && q.claimValue === undefined) {
    ctx.addIssue({ code: "custom", path: ["claimValue"], message: "a one-sample claim needs the stated value (e.g. 6.5 for 6.5 K/km)" });
  }
  if (q.claim === "two-group") {
    if (!q.groupA) ctx.addIssue({ code: "custom", path: ["groupA"], message: "a two-group claim needs group A (e.g. summer or JJA)" });
    if (!q.groupB) ctx.addIssue({ code: "custom", path: ["groupB"], message: "a two-group claim needs group B (e.g. Oct-Nov)" });
    if (q.groupA && q.groupB) {
      const shared = sharedMonths(q.groupA, q.groupB);
      if (shared.northern.length > 0 || shared.southern.length > 0) {
        const where = shared.northern.length > 0 ? `${describeMonths(shared.northern)} (northern sites)` : `${describeMonths(shared.southern)} (southern sites)`;
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
  if (query.groupBy === "launch-hour" || query.groupBy === "hours-after-sunrise") set("binHours", query.binHours);
  if (query.chartX !== "day-of-year") set("chartX", query.chartX);
  if (query.flights !== "all") set("flights", query.flights);
  if (query.claim !== "none") {
    set("claim", query.claim);
    set("claimSide", query.claimSide);
    if (query.claim === "one-sample") set("claimValue", query.claimValue);
    if (query.claim === "two-group") {
      set("groupA", selectionText(query.groupA, raw.groupA?.trim() || undefined));
      set("groupB", selectionText(query.groupB, raw.groupB?.trim() || undefined));
    }
  }
  return p;
}
