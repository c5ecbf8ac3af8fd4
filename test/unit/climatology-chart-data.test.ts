import { describe, expect, it } from "vitest";
import { buildClimatologyCharts, MAX_CHART_POINTS } from "../../app/_components/climatology/chart-data.ts";
import type { ClimatologyFlight, ClimatologyGroup, ClimatologyResult, GroupStatistics } from "../../lib/query/climatology-core.ts";

const STATS: GroupStatistics = { n: 0, mean: 6, sd: 1, sem: 0.1, median: 6, q1: 5, q3: 7, iqr: 2, min: 3, max: 9, ci95Low: 5.8, ci95High: 6.2 };

function flight(i: number): ClimatologyFlight {
  return { flightId: `f${i}`, title: `Flight ${i}`, siteId: "s", siteName: "Site", schoolId: "c", schoolName: "School", launchAtUtc: "2024-01-01T06:00:00.000Z", dayOfYear: 1 + (i % 365), localHour: 7, hoursAfterSunrise: 0.5, value: 6 + (i % 7) / 10, synthetic: true };
}

function result(flightsPerGroup: number[]): ClimatologyResult {
  let next = 0;
  const groups: ClimatologyGroup[] = flightsPerGroup.map((count, g) => ({ ...STATS, n: count, key: `g${g}`, label: `group ${g}`, flights: Array.from({ length: count }, () => flight(next++)) }));
  return {
    metric: { key: "tropospheric-lapse-rate", label: "tropospheric lapse rate", unit: "K/km", missingReason: "" },
    band: null,
    matchedFlightCount: next,
    groups,
    overall: { ...STATS, n: next },
    excluded: [],
    excludedCount: 0,
    profiles: [],
    claim: null,
    crossTable: null,
    invented: { rule: "auto", included: true, contributingCount: next, leftOutCount: 0 },
    warnings: [],
  };
}

const points = (series: Array<{ points: unknown[] }>) => series.reduce((sum, s) => sum + s.points.length, 0);

describe("buildClimatologyCharts: the page's point budget", () => {
  it("draws every flight while the archive is small", () => {
    const charts = buildClimatologyCharts(result([120, 80]), "day-of-year", 2);
    expect(points(charts.scatter)).toBe(200);
    expect(points(charts.boxes)).toBe(200);
    expect(charts.plottedPoints).toBe(200);
    expect(charts.omittedPoints).toBe(0);
  });

  it("keeps each chart within MAX_CHART_POINTS at 10,000 flights and counts what it left out", () => {
    const charts = buildClimatologyCharts(result([2500, 2600, 2400, 2500]), "day-of-year", 2);
    expect(points(charts.scatter)).toBeLessThanOrEqual(MAX_CHART_POINTS);
    expect(points(charts.boxes)).toBeLessThanOrEqual(MAX_CHART_POINTS);
    expect(charts.plottedPoints).toBe(points(charts.scatter));
    expect(charts.plottedPoints + charts.omittedPoints).toBe(10_000);
    // Every group keeps points: the sample is even across groups, not the first groups only.
    expect(charts.scatter.every((s) => s.points.length > 0)).toBe(true);
  });
});
