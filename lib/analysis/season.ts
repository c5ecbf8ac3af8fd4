/**
 * Meteorological seasons and month sets.
 *
 * Meteorological seasons are whole calendar months: DJF (Dec–Feb), MAM, JJA, SON. The code
 * depends only on the month; its name depends on the hemisphere: JJA is summer at northern sites
 * and winter at southern ones. Lapsebank's climatology filter "summer" (and every other season
 * name) is hemisphere-aware and is evaluated per site from the site's latitude: summer = JJA at
 * latitude ≥ 0, DJF at latitude < 0. The equator is counted as northern; seasons in the tropics
 * are calendar conventions rather than climate, so prefer explicit month sets there.
 * Filters on the bare code ("JJA") are the same months everywhere.
 */

export type SeasonCode = "DJF" | "MAM" | "JJA" | "SON";
export type SeasonName = "winter" | "spring" | "summer" | "autumn";

export const SEASON_CODES: readonly SeasonCode[] = ["DJF", "MAM", "JJA", "SON"];
export const SEASON_NAMES: readonly SeasonName[] = ["winter", "spring", "summer", "autumn"];

const MONTHS_OF_CODE: Readonly<Record<SeasonCode, readonly number[]>> = {
  DJF: [12, 1, 2],
  MAM: [3, 4, 5],
  JJA: [6, 7, 8],
  SON: [9, 10, 11],
};

const NORTHERN_NAME: Readonly<Record<SeasonCode, SeasonName>> = {
  DJF: "winter",
  MAM: "spring",
  JJA: "summer",
  SON: "autumn",
};

const SOUTHERN_NAME: Readonly<Record<SeasonCode, SeasonName>> = {
  DJF: "summer",
  MAM: "autumn",
  JJA: "winter",
  SON: "spring",
};

/** Thrown for an invalid month, latitude, season or month-set text. */
export class SeasonInputError extends Error {
  constructor(
    message: string,
    /** The offending input, as given. */
    readonly input: string,
  ) {
    super(message);
    this.name = "SeasonInputError";
  }
}

function assertMonth(month: number): void {
  if (!Number.isInteger(month) || month < 1 || month > 12) {
    throw new SeasonInputError(`month must be an integer 1–12, got ${month}`, String(month));
  }
}

function assertLatitude(latitudeDeg: number): void {
  if (!(Number.isFinite(latitudeDeg) && latitudeDeg >= -90 && latitudeDeg <= 90)) {
    throw new SeasonInputError(`latitude must be within ±90°, got ${latitudeDeg}`, String(latitudeDeg));
  }
}

/** True for the southern hemisphere (latitude < 0); the equator counts as northern. */
export function isSouthernHemisphere(latitudeDeg: number): boolean {
  assertLatitude(latitudeDeg);
  return latitudeDeg < 0;
}

/**
 * Meteorological season code of a local calendar month (1–12): DJF, MAM, JJA or SON
 * [P: WMO / national services' meteorological seasons]. The code is the same in both hemispheres;
 * the latitude is validated and only matters for seasonLabel().
 */
export function meteorologicalSeason(month: number, latitudeDeg: number): SeasonCode {
  assertMonth(month);
  assertLatitude(latitudeDeg);
  if (month === 12 || month <= 2) return "DJF";
  if (month <= 5) return "MAM";
  if (month <= 8) return "JJA";
  return "SON";
}

/**
 * Hemisphere-aware season name of a code: JJA is "summer" at latitude ≥ 0 and "winter" below 0
 * (a July flight at −35° is in winter).
 */
export function seasonLabel(code: SeasonCode, latitudeDeg: number): SeasonName {
  if (!SEASON_CODES.includes(code)) throw new SeasonInputError(`unknown season code ${String(code)}`, String(code));
  return isSouthernHemisphere(latitudeDeg) ? SOUTHERN_NAME[code] : NORTHERN_NAME[code];
}

/** The season code that carries a season name at a latitude (summer → JJA north, DJF south). */
export function seasonCodeOfName(name: SeasonName, latitudeDeg: number): SeasonCode {
  const table = isSouthernHemisphere(latitudeDeg) ? SOUTHERN_NAME : NORTHERN_NAME;
  const code = SEASON_CODES.find((c) => table[c] === name);
  if (code === undefined) throw new SeasonInputError(`unknown season name ${String(name)}`, String(name));
  return code;
}

/** Months (1–12, ascending) of a season code. DJF gives [1, 2, 12]. */
export function monthsOfSeasonCode(code: SeasonCode): number[] {
  const months = MONTHS_OF_CODE[code];
  if (months === undefined) throw new SeasonInputError(`unknown season code ${String(code)}`, String(code));
  return [...months].sort((a, b) => a - b);
}

/**
 * Months (1–12, ascending) of a hemisphere-aware season name at a latitude:
 * monthsOfSeason("summer", 45) → [6, 7, 8]; monthsOfSeason("summer", −35) → [1, 2, 12].
 */
export function monthsOfSeason(name: SeasonName, latitudeDeg: number): number[] {
  return monthsOfSeasonCode(seasonCodeOfName(name, latitudeDeg));
}

const MONTH_NAMES = [
  "january",
  "february",
  "march",
  "april",
  "may",
  "june",
  "july",
  "august",
  "september",
  "october",
  "november",
  "december",
];

/** Month number of a token: "10", "Oct", "october", "Sept" (any prefix of ≥ 3 letters). */
function monthOfToken(token: string): number | null {
  const t = token.trim().toLowerCase();
  if (/^\d{1,2}$/.test(t)) {
    const m = Number(t);
    return m >= 1 && m <= 12 ? m : null;
  }
  if (t.length < 3) return null;
  const index = MONTH_NAMES.findIndex((name) => name.startsWith(t));
  return index === -1 ? null : index + 1;
}

/** Inclusive month range, wrapping over the year end: 11..2 → 11, 12, 1, 2. */
function monthRange(from: number, to: number): number[] {
  const months: number[] = [];
  let m = from;
  for (;;) {
    months.push(m);
    if (m === to) return months;
    m = (m % 12) + 1;
  }
}

export interface ParseMonthSetOptions {
  /** Needed only to resolve season names ("summer"); codes and months need no latitude. */
  readonly latitudeDeg?: number;
}

/**
 * Parse a month set written by a person: comma-separated items, each a month ("10", "Oct",
 * "October"), an inclusive range that may wrap the year end ("Oct-Nov", "Dec–Feb", "11-2"), a season
 * code ("DJF") or, when a latitude is given, a season name ("summer"). Case and spaces are ignored.
 *
 * @returns the distinct month numbers 1–12, ascending: "Dec-Feb" → [1, 2, 12].
 * @throws SeasonInputError naming the item that could not be read.
 */
export function parseMonthSet(text: string, options: ParseMonthSetOptions = {}): number[] {
  if (typeof text !== "string" || text.trim() === "") {
    throw new SeasonInputError("month set is empty", String(text));
  }
  const months = new Set<number>();
  for (const rawItem of text.split(",")) {
    const item = rawItem.trim();
    if (item === "") throw new SeasonInputError(`empty item in month set "${text}"`, text);
    const upper = item.toUpperCase();
    if ((SEASON_CODES as readonly string[]).includes(upper)) {
      for (const m of MONTHS_OF_CODE[upper as SeasonCode]) months.add(m);
      continue;
    }
    const lower = item.toLowerCase();
    if ((SEASON_NAMES as readonly string[]).includes(lower)) {
      if (options.latitudeDeg === undefined) {
        throw new SeasonInputError(`season name "${item}" needs the site latitude (hemisphere)`, text);
      }
      for (const m of monthsOfSeason(lower as SeasonName, options.latitudeDeg)) months.add(m);
      continue;
    }
    // Hyphen, en dash or "to" separate the ends of a range.
    const ends = item.split(/\s*(?:-|–|\bto\b)\s*/i);
    if (ends.length === 1) {
      const m = monthOfToken(item);
      if (m === null) throw new SeasonInputError(`"${item}" is not a month, season code or range`, text);
      months.add(m);
    } else if (ends.length === 2) {
      const from = monthOfToken(ends[0] ?? "");
      const to = monthOfToken(ends[1] ?? "");
      if (from === null || to === null) throw new SeasonInputError(`"${item}" is not a month range`, text);
      for (const m of monthRange(from, to)) months.add(m);
    } else {
      throw new SeasonInputError(`"${item}" is not a month range`, text);
    }
  }
  return [...months].sort((a, b) => a - b);
}
