import { describe, expect, test } from "vitest";
import { bandLevelFigures, bandRangeMsl, decideBandCoverage, levelsInBand } from "../../lib/analysis/band-coverage";

const level = (altitudeM: number, baseM = Math.floor(altitudeM / 100) * 100) => ({ altitudeM, baseM, topM: baseM + 100, temperatureK: 280 });

describe("bandRangeMsl", () => {
  test("AGL limits move up by the ground; MSL limits stay; AGL without a ground has no range", () => {
    expect(bandRangeMsl({ baseM: 0, topM: 2000, reference: "agl" }, 1600)).toEqual({ baseM: 1600, topM: 3600 });
    expect(bandRangeMsl({ baseM: 0, topM: 2000, reference: "msl" }, 1600)).toEqual({ baseM: 0, topM: 2000 });
    expect(bandRangeMsl({ baseM: 0, topM: 2000, reference: "agl" }, null)).toBeNull();
    expect(bandRangeMsl({ baseM: 0, topM: 2000, reference: "agl" }, Number.NaN)).toBeNull();
  });
});

describe("decideBandCoverage: ≥ 3 levels, ends within one bin, steps of at most 3 bins [P]", () => {
  const range = { baseM: 1000, topM: 2000 };
  const decide = (altitudes: number[]) => decideBandCoverage(bandLevelFigures(levelsInBand(altitudes.map((z) => level(z)), range)), range);
  const every100 = (from: number, to: number) => Array.from({ length: Math.round((to - from) / 100) + 1 }, (_, i) => from + 100 * i);

  test.each([
    { name: "levels from 1050 to 1950", altitudes: every100(1050, 1950), expected: null },
    { name: "lowest exactly one bin above the base", altitudes: every100(1100, 1950), expected: null },
    { name: "lowest just over one bin above the base", altitudes: every100(1100.5, 1950.5), expected: "low-end" },
    { name: "highest just over one bin below the top", altitudes: every100(1050, 1850).map((z) => z - 0.5), expected: "high-end" },
    { name: "a step of exactly three bins", altitudes: [1050, 1150, 1450, 1550, 1650, 1750, 1850, 1950], expected: null },
    { name: "a step of just over three bins", altitudes: [1050, 1150, 1450.5, 1550, 1650, 1750, 1850, 1950], expected: "gap" },
    { name: "two levels", altitudes: [1050, 1950], expected: "few-levels" },
    { name: "levels on the limits count as inside", altitudes: [1000, 1100, 1900, 2000].concat(every100(1200, 1800)), expected: null },
    { name: "levels outside the band do not count", altitudes: [850, 950, 2050, 2150], expected: "few-levels" },
  ])("$name", ({ altitudes, expected }) => {
    expect(decide(altitudes)).toBe(expected);
  });

  test("no range (AGL band without a ground) is its own reason", () => {
    expect(decideBandCoverage({ levelCount: 10, lowestM: 1050, highestM: 1950, binM: 100, maxStepM: 100 }, null)).toBe("no-ground");
  });
});
