/**
 * Local time, season and sun position of a launch, for climatology filters and grouping.
 */
import { DateTime, IANAZone } from "luxon";
import SunCalc from "suncalc";
import { type SeasonCode, type SeasonName, meteorologicalSeason, seasonLabel } from "./season";

export interface LaunchSite {
  /** Geodetic latitude, degrees north (−90..90). */
  readonly latitudeDeg: number;
  /** Longitude, degrees east (−180..180). */
  readonly longitudeDeg: number;
  /** IANA time-zone name of the site, e.g. "Europe/Berlin". */
  readonly timeZone: string;
}

export interface LaunchTimeDescription {
  /** Local wall-clock time with offset, ISO 8601, e.g. "2024-03-31T03:30:00+02:00". */
  readonly localDateTimeIso: string;
  /** Local clock hour as a fraction of the day, 0 ≤ h < 24 (09:45 → 9.75). */
  readonly localHour: number;
  /** Local calendar date, "yyyy-MM-dd". */
  readonly localDate: string;
  readonly year: number;
  /** Local calendar month, 1–12. */
  readonly month: number;
  /** Local day of the year, 1–366. */
  readonly dayOfYear: number;
  /** UTC offset in force at launch, minutes (daylight saving included). */
  readonly utcOffsetMinutes: number;
  /** Meteorological season code of the local month. */
  readonly season: SeasonCode;
  /** Hemisphere-aware season name (JJA is winter south of the equator). */
  readonly seasonName: SeasonName;
  /** Sunrise on the local launch date; null on polar day or polar night. */
  readonly sunriseUtc: Date | null;
  /** Hours from that sunrise to launch; negative before sunrise; null when there is no sunrise. */
  readonly hoursAfterSunrise: number | null;
  /** Geometric elevation of the sun's centre above the horizon at launch, degrees (no refraction). */
  readonly solarElevationDeg: number;
  readonly warnings: readonly string[];
}

export type LaunchTimeErrorCode = "invalid-time-zone" | "invalid-date" | "invalid-coordinates";

/** Thrown for an unknown time zone, an invalid launch Date or coordinates out of range. */
export class LaunchTimeInputError extends Error {
  constructor(
    readonly code: LaunchTimeErrorCode,
    message: string,
  ) {
    super(message);
    this.name = "LaunchTimeInputError";
  }
}

/** True when `timeZone` is an IANA time-zone name known to the runtime (e.g. "Australia/Sydney", "UTC"). */
export function isValidTimeZone(timeZone: string): boolean {
  return typeof timeZone === "string" && timeZone.trim() !== "" && IANAZone.isValidZone(timeZone);
}

const MS_PER_HOUR = 3_600_000;
const DEG_PER_RAD = 180 / Math.PI;

/**
 * Describe a launch instant at a site: local date and clock hour in the site's IANA time zone
 * (daylight saving applied by the tz database via luxon), meteorological season of the local month
 * (hemisphere-aware name, see season.ts), sunrise of the local date and the sun's elevation.
 *
 * Sun position and sunrise come from suncalc (formulas of the Astronomy Answers articles, after
 * Meeus, Astronomical Algorithms): sunrise is the instant the sun's upper limb meets the horizon
 * with standard refraction (centre at −0.833°); within about 1–2 minutes of the NOAA solar
 * calculator method at mid-latitudes, less accurate near the polar circles. Solar elevation is
 * geometric (no refraction), within ~0.15° of the NOAA method.
 * Sunrise is searched for the solar day around local noon of the local launch date.
 */
export function describeLaunchTime(launchAtUtc: Date, site: LaunchSite): LaunchTimeDescription {
  if (!(launchAtUtc instanceof Date) || !Number.isFinite(launchAtUtc.getTime())) {
    throw new LaunchTimeInputError("invalid-date", "launchAtUtc is not a valid Date");
  }
  const { latitudeDeg, longitudeDeg, timeZone } = site;
  if (!(Number.isFinite(latitudeDeg) && Math.abs(latitudeDeg) <= 90)) {
    throw new LaunchTimeInputError("invalid-coordinates", `latitude must be within ±90°, got ${latitudeDeg}`);
  }
  if (!(Number.isFinite(longitudeDeg) && Math.abs(longitudeDeg) <= 180)) {
    throw new LaunchTimeInputError("invalid-coordinates", `longitude must be within ±180°, got ${longitudeDeg}`);
  }
  if (!isValidTimeZone(timeZone)) {
    throw new LaunchTimeInputError("invalid-time-zone", `unknown IANA time zone "${String(timeZone)}"`);
  }

  const local = DateTime.fromJSDate(launchAtUtc, { zone: timeZone });
  const warnings: string[] = [];
  const localHour = local.hour + local.minute / 60 + local.second / 3600 + local.millisecond / MS_PER_HOUR;
  const season = meteorologicalSeason(local.month, latitudeDeg);

  const localNoon = local.set({ hour: 12, minute: 0, second: 0, millisecond: 0 }).toJSDate();
  const sunrise = SunCalc.getTimes(localNoon, latitudeDeg, longitudeDeg).sunrise;
  const sunriseUtc = Number.isFinite(sunrise.getTime()) ? sunrise : null;
  if (sunriseUtc === null) warnings.push("no sunrise on the launch date (polar day or polar night)");

  const position = SunCalc.getPosition(launchAtUtc, latitudeDeg, longitudeDeg);

  return {
    localDateTimeIso: local.toISO({ suppressMilliseconds: true }) ?? launchAtUtc.toISOString(),
    localHour,
    localDate: local.toFormat("yyyy-MM-dd"),
    year: local.year,
    month: local.month,
    dayOfYear: local.ordinal,
    utcOffsetMinutes: local.offset,
    season,
    seasonName: seasonLabel(season, latitudeDeg),
    sunriseUtc,
    hoursAfterSunrise: sunriseUtc === null ? null : (launchAtUtc.getTime() - sunriseUtc.getTime()) / MS_PER_HOUR,
    solarElevationDeg: position.altitude * DEG_PER_RAD,
    warnings,
  };
}
