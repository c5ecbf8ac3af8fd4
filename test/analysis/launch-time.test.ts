import { DateTime } from "luxon";
import { describe, expect, test } from "vitest";
import { LaunchTimeInputError, computeSolarPosition, describeLaunchTime, isValidTimeZone } from "@/lib/analysis/launch-time";

const RAD = Math.PI / 180;

/**
 * Independent reference: the NOAA Solar Calculator spreadsheet equations (after Meeus,
 * Astronomical Algorithms), re-implemented here from memory [Mem] so that the test does not share
 * code with the astronomy library. Returns the sun's geometric elevation and the sunrise minute (UTC) computed
 * with the declination and equation of time at `at`.
 */
function noaaSun(at: Date, latitudeDeg: number, longitudeDeg: number): { elevationDeg: number; sunriseMinuteUtc: number } {
  const julianDay = at.getTime() / 86_400_000 + 2_440_587.5;
  const t = (julianDay - 2_451_545) / 36_525;
  const meanLongitude = (280.46646 + t * (36000.76983 + t * 0.0003032)) % 360;
  const meanAnomaly = 357.52911 + t * (35999.05029 - 0.0001537 * t);
  const eccentricity = 0.016708634 - t * (0.000042037 + 0.0000001267 * t);
  const centre =
    Math.sin(meanAnomaly * RAD) * (1.914602 - t * (0.004817 + 0.000014 * t)) +
    Math.sin(2 * meanAnomaly * RAD) * (0.019993 - 0.000101 * t) +
    Math.sin(3 * meanAnomaly * RAD) * 0.000289;
  const omega = 125.04 - 1934.136 * t;
  const apparentLongitude = meanLongitude + centre - 0.00569 - 0.00478 * Math.sin(omega * RAD);
  const meanObliquity = 23 + (26 + (21.448 - t * (46.815 + t * (0.00059 - t * 0.001813))) / 60) / 60;
  const obliquity = meanObliquity + 0.00256 * Math.cos(omega * RAD);
  const declination = Math.asin(Math.sin(obliquity * RAD) * Math.sin(apparentLongitude * RAD)) / RAD;
  const y = Math.tan((obliquity / 2) * RAD) ** 2;
  const equationOfTimeMin =
    (4 / RAD) *
    (y * Math.sin(2 * meanLongitude * RAD) -
      2 * eccentricity * Math.sin(meanAnomaly * RAD) +
      4 * eccentricity * y * Math.sin(meanAnomaly * RAD) * Math.cos(2 * meanLongitude * RAD) -
      0.5 * y * y * Math.sin(4 * meanLongitude * RAD) -
      1.25 * eccentricity * eccentricity * Math.sin(2 * meanAnomaly * RAD));
  const minuteOfDayUtc = (at.getTime() % 86_400_000) / 60_000;
  const trueSolarMin = (((minuteOfDayUtc + equationOfTimeMin + 4 * longitudeDeg) % 1440) + 1440) % 1440;
  const hourAngle = trueSolarMin / 4 - 180;
  const cosZenith =
    Math.sin(latitudeDeg * RAD) * Math.sin(declination * RAD) +
    Math.cos(latitudeDeg * RAD) * Math.cos(declination * RAD) * Math.cos(hourAngle * RAD);
  const sunriseHourAngle =
    Math.acos(
      Math.cos(90.833 * RAD) / (Math.cos(latitudeDeg * RAD) * Math.cos(declination * RAD)) -
        Math.tan(latitudeDeg * RAD) * Math.tan(declination * RAD),
    ) / RAD;
  return {
    elevationDeg: 90 - Math.acos(cosZenith) / RAD,
    sunriseMinuteUtc: 720 - 4 * longitudeDeg - equationOfTimeMin - 4 * sunriseHourAngle,
  };
}

/** NOAA sunrise for the UTC day starting at `dayStartUtcMs`, iterated so declination is taken at sunrise. */
function noaaSunriseUtc(dayStartUtcMs: number, latitudeDeg: number, longitudeDeg: number): Date {
  let guess = new Date(dayStartUtcMs + 12 * 3_600_000);
  for (let k = 0; k < 3; k++) {
    guess = new Date(dayStartUtcMs + noaaSun(guess, latitudeDeg, longitudeDeg).sunriseMinuteUtc * 60_000);
  }
  return guess;
}

// Invented site coordinates (not real stations).
const alpine = { latitudeDeg: 48.1, longitudeDeg: 11.6, timeZone: "Europe/Berlin" };
const coastal = { latitudeDeg: -33.9, longitudeDeg: 151.2, timeZone: "Australia/Sydney" };
const plains = { latitudeDeg: 40, longitudeDeg: -105, timeZone: "America/Denver" };
const equatorial = { latitudeDeg: 0.5, longitudeDeg: 10, timeZone: "Africa/Lagos" };

describe("sun position against the NREL Solar Position Algorithm worked example", () => {
  // Reda & Andreas (2004), "Solar Position Algorithm for Solar Radiation Applications", NREL/TP-560-34302,
  // worked example: 17 October 2003, 12:30:30 local time at −7 h (19:30:30 UTC), latitude 39.742476°,
  // longitude −105.1786°, elevation 1830.14 m, pressure 820 mbar, temperature 11 °C, ΔT 67 s →
  // topocentric zenith angle 50.11162°, topocentric azimuth (east of north) 194.34024°.
  test("topocentric zenith and azimuth within 0.001°", () => {
    const site = { latitudeDeg: 39.742476, longitudeDeg: -105.1786, elevationM: 1830.14, timeZone: "America/Denver" };
    const at = new Date("2003-10-17T19:30:30Z");
    const position = computeSolarPosition(at, site.latitudeDeg, site.longitudeDeg, site.elevationM);
    // The SPA zenith includes its atmospheric refraction term (eq. 42 of the paper, with the example's
    // 820 mbar and 11 °C); ours is airless, so the same correction is added here.
    const e0 = position.elevationDeg;
    const refractionDeg = (820 / 1010) * (283 / (273 + 11)) * (1.02 / (60 * Math.tan((e0 + 10.3 / (e0 + 5.11)) * RAD)));
    expect(Math.abs(90 - (e0 + refractionDeg) - 50.11162)).toBeLessThan(0.001);
    expect(Math.abs(position.azimuthDeg - 194.34024)).toBeLessThan(0.001);
    // describeLaunchTime reports the same airless elevation and the azimuth.
    const described = describeLaunchTime(at, site);
    expect(described.solarElevationDeg).toBeCloseTo(e0, 9);
    expect(described.solarAzimuthDeg).toBeCloseTo(position.azimuthDeg, 9);
  });
});

describe("sun position and sunrise against the NOAA equations", () => {
  test.each([
    { iso: "2024-06-21T06:30:00Z", site: alpine },
    { iso: "2024-12-21T08:00:00Z", site: alpine },
    { iso: "2024-03-20T12:00:00Z", site: equatorial },
    { iso: "2024-01-15T21:30:00Z", site: coastal },
    { iso: "2024-07-04T13:00:00Z", site: plains },
    { iso: "2024-07-04T22:00:00Z", site: plains },
  ])("$iso at $site.timeZone", ({ iso, site }) => {
    const at = new Date(iso);
    const r = describeLaunchTime(at, site);
    const reference = noaaSun(at, site.latitudeDeg, site.longitudeDeg);
    // Tolerance 0.02°: the NOAA series is good to about 0.01° in this century; suncalc, used
    // before, was up to 0.15–0.22° off, which this bound would catch [D, by running both]
    expect(Math.abs(r.solarElevationDeg - reference.elevationDeg)).toBeLessThan(0.02);

    expect(r.sunriseUtc).not.toBeNull();
    const sunrise = r.sunriseUtc ?? new Date(0);
    const dayStart = Date.UTC(sunrise.getUTCFullYear(), sunrise.getUTCMonth(), sunrise.getUTCDate());
    // Far from Greenwich the sunrise of the local day can fall in the neighbouring UTC day.
    const referenceSunrise = [dayStart - 86_400_000, dayStart, dayStart + 86_400_000]
      .map((start) => noaaSunriseUtc(start, site.latitudeDeg, site.longitudeDeg))
      .reduce((best, c) =>
        Math.abs(c.getTime() - sunrise.getTime()) < Math.abs(best.getTime() - sunrise.getTime()) ? c : best,
      );
    // Tolerance 0.5 min: NOAA's sunrise is stated to the minute; suncalc, used before, was 1–2 min off
    // [D, by running both]
    expect(Math.abs(sunrise.getTime() - referenceSunrise.getTime()) / 60_000).toBeLessThan(0.5);
    // The sunrise reported is the one of the local launch date.
    expect(DateTime.fromJSDate(sunrise, { zone: site.timeZone }).toFormat("yyyy-MM-dd")).toBe(r.localDate);
    expect(r.hoursAfterSunrise).toBeCloseTo((at.getTime() - sunrise.getTime()) / 3_600_000, 9);
  });

  test("sunrise belongs to the local launch date, also before dawn", () => {
    // 04:00 local in Denver on 4 July (10:00Z) is before sunrise (≈ 05:37 local [D: NOAA equations])
    const r = describeLaunchTime(new Date("2024-07-04T10:00:00Z"), plains);
    expect(r.localDate).toBe("2024-07-04");
    expect(r.hoursAfterSunrise ?? 0).toBeLessThan(0);
    expect(r.hoursAfterSunrise ?? 0).toBeGreaterThan(-2);
  });

  test("culmination elevations at a high-latitude site follow 90 − φ + δ and φ + δ − 90", () => {
    // [D] spherical astronomy: upper culmination 90 − φ + δ, lower φ + δ − 90; δ ≈ +23.44° on
    // 21 June, −23.44° on 21 December (obliquity); solar noon ≈ 12:00 UTC − 4 min/° · 15.6° ≈ 10:58 UTC.
    const arctic = { latitudeDeg: 78.2, longitudeDeg: 15.6, timeZone: "Arctic/Longyearbyen" };
    const midsummerNoon = describeLaunchTime(new Date("2024-06-21T10:59:00Z"), arctic);
    const midsummerMidnight = describeLaunchTime(new Date("2024-06-21T22:59:00Z"), arctic);
    const midwinterNoon = describeLaunchTime(new Date("2024-12-21T10:56:00Z"), arctic);
    expect(midsummerNoon.solarElevationDeg).toBeCloseTo(90 - 78.2 + 23.44, 0);
    expect(midsummerMidnight.solarElevationDeg).toBeCloseTo(78.2 + 23.44 - 90, 0);
    expect(midwinterNoon.solarElevationDeg).toBeCloseTo(90 - 78.2 - 23.44, 0);
    // Polar day and polar night: no sunrise, hours after sunrise null (never NaN) and the case named
    expect(midsummerNoon.sunriseUtc).toBeNull();
    expect(midsummerNoon.hoursAfterSunrise).toBeNull();
    expect(midsummerNoon.sunriseStatus).toBe("up-all-day");
    expect(midsummerNoon.warnings.join(" ")).toContain("polar day");
    expect(midwinterNoon.sunriseUtc).toBeNull();
    expect(midwinterNoon.hoursAfterSunrise).toBeNull();
    expect(midwinterNoon.sunriseStatus).toBe("down-all-day");
    expect(midwinterNoon.warnings.join(" ")).toContain("polar night");
  });

  test("every hour of a year at 78.2° N gives a finite elevation and hours after sunrise that are a number or null", () => {
    // [D] the rule of describeLaunchTime: null exactly when the sun does not rise on the local date.
    const arctic = { latitudeDeg: 78.2, longitudeDeg: 15.6, timeZone: "Arctic/Longyearbyen" };
    let withSunrise = 0;
    let without = 0;
    for (let day = 0; day < 366; day += 3) {
      const r = describeLaunchTime(new Date(Date.UTC(2024, 0, 1 + day, 9, 0, 0)), arctic);
      expect(Number.isFinite(r.solarElevationDeg)).toBe(true);
      if (r.hoursAfterSunrise === null) {
        without++;
        expect(r.sunriseStatus).not.toBe("rises");
      } else {
        withSunrise++;
        expect(Number.isFinite(r.hoursAfterSunrise)).toBe(true);
        expect(r.sunriseStatus).toBe("rises");
      }
    }
    // Polar day and night together cover well over half the year at 78° N [D: |δ| > 90° − φ − 0.83°].
    expect(without).toBeGreaterThan(withSunrise);
    expect(withSunrise).toBeGreaterThan(20);
  });
});

describe("local time across daylight-saving changes", () => {
  // EU summer time starts and ends at 01:00 UTC on the last Sunday of March / October
  // [S: Directive 2000/84/EC]; 2024: 31 March and 27 October.
  // New South Wales daylight time runs from 02:00 standard time on the first Sunday of October to
  // 03:00 daylight time on the first Sunday of April [S: NSW Standard Time Act 1987, as amended 2007];
  // 2024: 7 April (16:00Z on 6 April) and 6 October (16:00Z on 5 October).
  test.each([
    { iso: "2024-03-31T00:30:00Z", site: alpine, local: "2024-03-31T01:30:00+01:00", hour: 1.5, offset: 60 },
    { iso: "2024-03-31T01:30:00Z", site: alpine, local: "2024-03-31T03:30:00+02:00", hour: 3.5, offset: 120 },
    { iso: "2024-10-27T00:30:00Z", site: alpine, local: "2024-10-27T02:30:00+02:00", hour: 2.5, offset: 120 },
    { iso: "2024-10-27T01:30:00Z", site: alpine, local: "2024-10-27T02:30:00+01:00", hour: 2.5, offset: 60 },
    { iso: "2024-04-06T15:30:00Z", site: coastal, local: "2024-04-07T02:30:00+11:00", hour: 2.5, offset: 660 },
    { iso: "2024-04-06T16:30:00Z", site: coastal, local: "2024-04-07T02:30:00+10:00", hour: 2.5, offset: 600 },
    { iso: "2024-10-05T15:30:00Z", site: coastal, local: "2024-10-06T01:30:00+10:00", hour: 1.5, offset: 600 },
    { iso: "2024-10-05T16:30:00Z", site: coastal, local: "2024-10-06T03:30:00+11:00", hour: 3.5, offset: 660 },
  ])("$iso → $local", ({ iso, site, local, hour, offset }) => {
    const r = describeLaunchTime(new Date(iso), site);
    expect(r.localDateTimeIso).toBe(local);
    expect(r.localHour).toBeCloseTo(hour, 12);
    expect(r.utcOffsetMinutes).toBe(offset);
    expect(r.localDate).toBe(local.slice(0, 10));
  });

  test("fractional hour, local date rollover, day of year and season", () => {
    // 21:45:36Z on 15 January = 08:45:36 AEDT on 16 January [D: +11 h]
    const r = describeLaunchTime(new Date("2024-01-15T21:45:36Z"), coastal);
    expect(r.localHour).toBeCloseTo(8 + 45 / 60 + 36 / 3600, 12);
    expect(r.localDate).toBe("2024-01-16");
    expect([r.year, r.month, r.dayOfYear]).toEqual([2024, 1, 16]);
    expect(r.season).toBe("DJF");
    expect(r.seasonName).toBe("summer");
    // 31 December of a leap year is day 366 [D]
    expect(describeLaunchTime(new Date("2024-12-31T12:00:00Z"), alpine).dayOfYear).toBe(366);
    // A July launch at −33.9° is winter; at +48.1° summer
    expect(describeLaunchTime(new Date("2024-07-10T00:00:00Z"), coastal).seasonName).toBe("winter");
    expect(describeLaunchTime(new Date("2024-07-10T10:00:00Z"), alpine).seasonName).toBe("summer");
  });
});

describe("input errors", () => {
  test("unknown time zone is a typed error", () => {
    expect(isValidTimeZone("Europe/Berlin")).toBe(true);
    expect(isValidTimeZone("UTC")).toBe(true);
    expect(isValidTimeZone("Mars/Olympus_Mons")).toBe(false);
    expect(isValidTimeZone("")).toBe(false);
    expect(isValidTimeZone("UTC+3")).toBe(false);
    try {
      describeLaunchTime(new Date("2024-01-01T00:00:00Z"), { ...alpine, timeZone: "Mars/Olympus_Mons" });
      expect.unreachable();
    } catch (error) {
      expect(error).toBeInstanceOf(LaunchTimeInputError);
      expect((error as LaunchTimeInputError).code).toBe("invalid-time-zone");
    }
  });

  test("invalid date and coordinates are typed errors", () => {
    expect(() => describeLaunchTime(new Date("not a date"), alpine)).toThrow(LaunchTimeInputError);
    expect(() => describeLaunchTime(new Date(0), { ...alpine, latitudeDeg: 95 })).toThrow(LaunchTimeInputError);
    expect(() => describeLaunchTime(new Date(0), { ...alpine, longitudeDeg: Number.NaN })).toThrow(LaunchTimeInputError);
  });

  test("does not mutate the launch Date", () => {
    const at = new Date("2024-05-05T05:05:05Z");
    describeLaunchTime(at, alpine);
    expect(at.toISOString()).toBe("2024-05-05T05:05:05.000Z");
  });
});
