import { describe, expect, test } from "vitest";
import {
  SeasonInputError,
  meteorologicalSeason,
  monthsOfSeason,
  monthsOfSeasonCode,
  parseMonthSet,
  seasonCodeOfName,
  seasonLabel,
} from "@/lib/analysis/season";

describe("meteorologicalSeason", () => {
  // Meteorological seasons by whole calendar months [P: DJF, MAM, JJA, SON]
  test.each([
    [1, "DJF"],
    [2, "DJF"],
    [3, "MAM"],
    [5, "MAM"],
    [6, "JJA"],
    [8, "JJA"],
    [9, "SON"],
    [11, "SON"],
    [12, "DJF"],
  ] as const)("month %i → %s in both hemispheres", (month, code) => {
    expect(meteorologicalSeason(month, 45)).toBe(code);
    expect(meteorologicalSeason(month, -35)).toBe(code);
  });

  test.each([0, 13, 2.5, Number.NaN])("month %s is a typed error", (month) => {
    expect(() => meteorologicalSeason(month, 45)).toThrow(SeasonInputError);
  });

  test("latitude out of range is a typed error", () => {
    expect(() => meteorologicalSeason(7, 91)).toThrow(SeasonInputError);
  });
});

describe("seasonLabel: hemisphere flip", () => {
  test.each([
    // [P] seasons are reversed south of the equator
    { code: "JJA", latitudeDeg: 45, expected: "summer" },
    { code: "JJA", latitudeDeg: -35, expected: "winter" },
    { code: "DJF", latitudeDeg: 45, expected: "winter" },
    { code: "DJF", latitudeDeg: -35, expected: "summer" },
    { code: "MAM", latitudeDeg: 45, expected: "spring" },
    { code: "MAM", latitudeDeg: -35, expected: "autumn" },
    { code: "SON", latitudeDeg: 45, expected: "autumn" },
    { code: "SON", latitudeDeg: -35, expected: "spring" },
    { code: "JJA", latitudeDeg: 0, expected: "summer" }, // equator counted as northern (documented choice)
  ] as const)("$code at $latitudeDeg° → $expected", ({ code, latitudeDeg, expected }) => {
    expect(seasonLabel(code, latitudeDeg)).toBe(expected);
    expect(seasonCodeOfName(expected, latitudeDeg)).toBe(code);
  });

  test("a July flight at −35° is JJA = winter; at +45° JJA = summer", () => {
    expect(seasonLabel(meteorologicalSeason(7, -35), -35)).toBe("winter");
    expect(seasonLabel(meteorologicalSeason(7, 45), 45)).toBe("summer");
  });
});

describe("monthsOfSeason", () => {
  test("summer is JJA north and DJF south, sorted", () => {
    expect(monthsOfSeason("summer", 45)).toEqual([6, 7, 8]);
    expect(monthsOfSeason("summer", -35)).toEqual([1, 2, 12]);
    expect(monthsOfSeason("winter", -35)).toEqual([6, 7, 8]);
    expect(monthsOfSeasonCode("SON")).toEqual([9, 10, 11]);
  });

  test("the four seasons partition the year in each hemisphere", () => {
    for (const lat of [45, -35]) {
      const all = (["winter", "spring", "summer", "autumn"] as const).flatMap((s) => monthsOfSeason(s, lat));
      expect([...all].sort((a, b) => a - b)).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12]);
    }
  });
});

describe("parseMonthSet", () => {
  test.each([
    { text: "Oct-Nov", expected: [10, 11] },
    { text: "10,11", expected: [10, 11] },
    { text: "DJF", expected: [1, 2, 12] },
    { text: "Dec-Feb", expected: [1, 2, 12] }, // wraps the year end
    { text: "dec – feb", expected: [1, 2, 12] },
    { text: "11-2", expected: [1, 2, 11, 12] },
    { text: "November to January", expected: [1, 11, 12] },
    { text: "Jan, Mar-Apr, 7", expected: [1, 3, 4, 7] },
    { text: "jja,son", expected: [6, 7, 8, 9, 10, 11] },
    { text: "Sept", expected: [9] },
    { text: "6,6,06", expected: [6] },
    { text: "May-May", expected: [5] },
  ])("$text → $expected", ({ text, expected }) => {
    expect(parseMonthSet(text)).toEqual(expected);
  });

  test("season names need a latitude and then follow the hemisphere", () => {
    expect(() => parseMonthSet("summer")).toThrow(SeasonInputError);
    expect(parseMonthSet("summer", { latitudeDeg: -35 })).toEqual([1, 2, 12]);
    expect(parseMonthSet("summer", { latitudeDeg: 45 })).toEqual([6, 7, 8]);
  });

  test.each(["", "  ", "13", "0", "Ja", "Oct-", "Oct-Nov-Dec", "Octember", "1,,2", "DJFM"])(
    "%j is a typed error",
    (text) => {
      expect(() => parseMonthSet(text)).toThrow(SeasonInputError);
    },
  );
});
