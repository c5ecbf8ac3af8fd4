/**
 * Local time, season and sun position of a launch, for climatology filters and grouping.
 */
import { Body, Equator, Horizon, Observer, SearchRiseSet } from "astronomy-engine";
import { DateTime, IANAZone } from "luxon";
import { type SeasonCode, type SeasonName, meteorologicalSeason, seasonLabel } from "./season";

export interface LaunchSite {
  /** Geodetic latitude, degrees north (−90..90). */
  readonly latitudeDeg: number;
  /** Longitude, degrees east (−180..180). */
  readonly longitudeDeg: number;
  /** IANA time-zone name of the site, e.g. "Europe/Berlin". */
  readonly timeZone: string;
  /** Height above mean sea level, metres (topocentric parallax; 0 when unknown). */
  readonly elevationM?: number;
}

/** What the sun does on the local launch date when it does not rise (or rose the day before). */
export type SunriseStatus = "rises" | "up-all-day" | "down-all-day" | "no-rise-on-date";

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
  /** Sunrise on the local launch date; null when the sun does not rise on that date (see sunriseStatus). */
  readonly sunriseUtc: Date | null;
  /** Whether the sun rises on the local launch date, and if not, why. */
  readonly sunriseStatus: SunriseStatus;
  /** Hours from that sunrise to launch; negative before sunrise; null when the sun does not rise on the local date. */
  readonly hoursAfterSunrise: number | null;
  /** Geometric (airless) topocentric elevation of the sun's centre above the horizon at launch, degrees. */
  readonly solarElevationDeg: number;
  /** Topocentric azimuth of the sun, degrees east of true north (0–360). */
  readonly solarAzimuthDeg: number;
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

export interface SolarPosition {
  /** Geometric (airless) topocentric elevation of the sun's centre, degrees. */
  readonly elevationDeg: number;
  /** Azimuth, degrees east of true north, 0 ≤ A < 360. */
  readonly azimuthDeg: number;
}

/**
 * Topocentric position of the sun's centre at an instant, from astronomy-engine (VSOP87 Earth with
 * nutation, aberration and light time, IAU 2006 precession; checked in the tests against the
 * worked example of the NREL Solar Position Algorithm, Reda & Andreas 2004). The elevation is
 * geometric: no refraction, because refraction depends on the air at the site, which we do not know.
 */
export function computeSolarPosition(atUtc: Date, latitudeDeg: number, longitudeDeg: number, elevationM = 0): SolarPosition {
  const observer = new Observer(latitudeDeg, longitudeDeg, elevationM);
  // Equator of date with aberration, as Horizon() expects.
  const equatorial = Equator(Body.Sun, atUtc, observer, true, true);
  const horizontal = Horizon(atUtc, observer, equatorial.ra, equatorial.dec);
  return { elevationDeg: horizontal.altitude, azimuthDeg: horizontal.azimuth };
}

/**
 * Sunrise on a local calendar date: the instant the sun's upper limb rises above a level horizon
 * with standard refraction (34′), the convention of almanacs and the NOAA solar calculator
 * (astronomy-engine SearchRiseSet). Searched from local midnight to the next local midnight
 * (23 or 25 hours across a daylight-saving change). When the sun does not rise within that
 * local day the status says whether it stays up (polar day), stays down (polar night) or simply
 * rose the previous day (a few days near the polar circles), judged from its elevation at local
 * noon and midnight.
 */
export function findLocalSunrise(
  local: DateTime,
  latitudeDeg: number,
  longitudeDeg: number,
  elevationM = 0,
): { sunriseUtc: Date | null; status: SunriseStatus } {
  const dayStart = local.startOf("day");
  const dayEnd = dayStart.plus({ days: 1 });
  const observer = new Observer(latitudeDeg, longitudeDeg, elevationM);
  const limitDays = (dayEnd.toMillis() - dayStart.toMillis()) / (24 * MS_PER_HOUR);
  const found = SearchRiseSet(Body.Sun, observer, +1, dayStart.toJSDate(), limitDays);
  if (found && found.date.getTime() < dayEnd.toMillis()) return { sunriseUtc: found.date, status: "rises" };
  // No rise within the local day: up all day, down all day, or (close to the polar circle) the sun
  // rose just before local midnight and sets later that day.
  const noon = computeSolarPosition(dayStart.set({ hour: 12 }).toJSDate(), latitudeDeg, longitudeDeg, elevationM).elevationDeg;
  const midnight = computeSolarPosition(dayStart.toJSDate(), latitudeDeg, longitudeDeg, elevationM).elevationDeg;
  const status: SunriseStatus = noon > 0 && midnight > 0 ? "up-all-day" : noon <= 0 && midnight <= 0 ? "down-all-day" : "no-rise-on-date";
  return { sunriseUtc: null, status };
}

/**
 * Describe a launch instant at a site: local date and clock hour in the site's IANA time zone
 * (daylight saving applied by the tz database via luxon), meteorological season of the local month
 * (hemisphere-aware name, see season.ts), sunrise of the local date and the sun's position.
 *
 * Sun position and sunrise come from astronomy-engine (see computeSolarPosition, findLocalSunrise).
 * Hours after sunrise are measured from the sunrise of the local launch date. Rule for days without
 * one (polar day, polar night, or a day near the polar circle when the sun rose the evening before):
 * hoursAfterSunrise is null, never NaN, sunriseStatus says which case it is and a warning names it.
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

  const elevationM = Number.isFinite(site.elevationM) ? site.elevationM : 0;
  const { sunriseUtc, status: sunriseStatus } = findLocalSunrise(local, latitudeDeg, longitudeDeg, elevationM);
  if (sunriseStatus === "up-all-day") warnings.push("no sunrise on the local launch date: the sun stays up all day (polar day)");
  if (sunriseStatus === "down-all-day") warnings.push("no sunrise on the local launch date: the sun stays down all day (polar night)");
  if (sunriseStatus === "no-rise-on-date") warnings.push("no sunrise on the local launch date: the sun rose before local midnight (near the polar circle)");

  const position = computeSolarPosition(launchAtUtc, latitudeDeg, longitudeDeg, elevationM);

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
    sunriseStatus,
    hoursAfterSunrise: sunriseUtc === null ? null : (launchAtUtc.getTime() - sunriseUtc.getTime()) / MS_PER_HOUR,
    solarElevationDeg: position.elevationDeg,
    solarAzimuthDeg: position.azimuthDeg,
    warnings,
  };
}
