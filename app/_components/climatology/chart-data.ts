/**
 * Serializable chart series built on the server from a climatology result; the client chart
 * components only draw them.
 */
import type { ClimatologyResult } from "@/lib/query/climatology-core";
import { kelvinToCelsius } from "@/lib/analysis/units";

/** Point shapes per group, so groups differ by more than colour. */
export const GROUP_SYMBOLS = ["circle", "triangle", "square", "diamond", "star", "cross", "wye"] as const;
export type GroupSymbol = (typeof GROUP_SYMBOLS)[number];
/** A palette chosen for contrast on white and for colour-vision deficiency (blue/orange first). */
export const GROUP_COLOURS = ["#1f5f99", "#c45a12", "#2e7d4f", "#7a3e9d", "#8a6d00", "#0f7c86", "#a3324a", "#4d4d4d"];
export const GROUP_DASHES = ["", "8 4", "3 3", "12 4 3 4", "2 6", "16 6", "6 2 2 2", "10 10"];

export interface ChartPoint {
  x: number;
  y: number;
  flightId: string;
  title: string;
  description: string;
}

export interface ChartGroupStyle {
  key: string;
  label: string;
  colour: string;
  symbol: GroupSymbol;
  dash: string;
}

export interface BoxPlotSeries extends ChartGroupStyle {
  index: number;
  n: number;
  q1: number;
  median: number;
  q3: number;
  min: number;
  max: number;
  mean: number;
  points: ChartPoint[];
}

export interface ScatterSeries extends ChartGroupStyle {
  points: ChartPoint[];
}

export interface ProfileSeries extends ChartGroupStyle {
  mean: Array<{ temperatureC: number; altitudeKm: number }>;
  low: Array<{ temperatureC: number; altitudeKm: number }>;
  high: Array<{ temperatureC: number; altitudeKm: number }>;
  markers: Array<{ temperatureC: number; altitudeKm: number }>;
}

export interface ClimatologyCharts {
  metricLabel: string;
  unit: string;
  boxes: BoxPlotSeries[];
  scatter: ScatterSeries[];
  scatterAxis: "day-of-year" | "launch-hour";
  profiles: ProfileSeries[];
  phase: "ascent" | "descent";
  /** Points left out of the charts to keep the page light (all remain in the table and the API). */
  omittedPoints: number;
  /** Flights drawn as points in each of the box plot and the scatter. */
  plottedPoints: number;
}

/**
 * Linked points per chart. Each costs the page about six DOM nodes and its title in the page payload, so
 * the cap is what keeps the Climatology page light at any archive size (issue 14: ≤ 15,000 nodes).
 */
export const MAX_CHART_POINTS = 800;

function style(index: number, key: string, label: string): ChartGroupStyle {
  return {
    key,
    label,
    colour: GROUP_COLOURS[index % GROUP_COLOURS.length] as string,
    symbol: GROUP_SYMBOLS[index % GROUP_SYMBOLS.length] as GroupSymbol,
    dash: GROUP_DASHES[index % GROUP_DASHES.length] as string,
  };
}

function round(value: number, digits: number): number {
  const f = 10 ** digits;
  return Math.round(value * f) / f;
}

/** Box, scatter and profile series for the charts; at most MAX_CHART_POINTS linked points per chart in total (evenly thinned). */
export function buildClimatologyCharts(result: ClimatologyResult, scatterAxis: "day-of-year" | "launch-hour", digits: number): ClimatologyCharts {
  const total = result.groups.reduce((s, g) => s + g.flights.length, 0);
  const stride = total > MAX_CHART_POINTS ? Math.ceil(total / MAX_CHART_POINTS) : 1;
  let omittedPoints = 0;
  let plottedPoints = 0;
  const boxes: BoxPlotSeries[] = [];
  const scatter: ScatterSeries[] = [];
  result.groups.forEach((group, index) => {
    const s = style(index, group.key, group.label);
    const kept = group.flights.filter((_, i) => i % stride === 0);
    omittedPoints += group.flights.length - kept.length;
    plottedPoints += kept.length;
    const describePoint = (f: (typeof group.flights)[number]) => `${f.title}, ${f.siteName}: ${round(f.value, digits)} ${result.metric.unit}`;
    if (group.q1 !== null && group.median !== null && group.q3 !== null && group.min !== null && group.max !== null && group.mean !== null) {
      boxes.push({
        ...s,
        index,
        n: group.n,
        q1: group.q1,
        median: group.median,
        q3: group.q3,
        min: group.min,
        max: group.max,
        mean: group.mean,
        // Deterministic horizontal spread so equal values stay visible.
        points: kept.map((f, i) => ({ x: index + (((i * 0.618034) % 1) - 0.5) * 0.4, y: f.value, flightId: f.flightId, title: f.title, description: describePoint(f) })),
      });
    }
    scatter.push({
      ...s,
      points: kept.map((f) => ({
        x: scatterAxis === "day-of-year" ? f.dayOfYear : round(f.localHour, 3),
        y: f.value,
        flightId: f.flightId,
        title: f.title,
        description: describePoint(f),
      })),
    });
  });
  const profiles: ProfileSeries[] = result.profiles.map((profile, index) => {
    const group = result.groups[index];
    // Levels reached by fewer than half of the group's flights are left out: their mean jumps with each flight.
    const minimum = Math.max(2, Math.ceil((group?.n ?? 0) / 2));
    const levels = profile.levels.filter((l) => l.flightCount >= minimum);
    const point = (k: number, altitudeM: number) => ({ temperatureC: round(kelvinToCelsius(k), 2), altitudeKm: round(altitudeM / 1000, 3) });
    return {
      ...style(index, profile.key, profile.label),
      mean: levels.map((l) => point(l.meanTemperatureK, l.altitudeM)),
      low: levels.filter((l) => l.sdTemperatureK !== null).map((l) => point(l.meanTemperatureK - (l.sdTemperatureK ?? 0), l.altitudeM)),
      high: levels.filter((l) => l.sdTemperatureK !== null).map((l) => point(l.meanTemperatureK + (l.sdTemperatureK ?? 0), l.altitudeM)),
      markers: levels.filter((_, i) => i % 20 === 0).map((l) => point(l.meanTemperatureK, l.altitudeM)),
    };
  });
  return {
    metricLabel: result.metric.label,
    unit: result.metric.unit,
    boxes,
    scatter,
    scatterAxis,
    profiles,
    phase: result.band?.phase ?? "ascent",
    omittedPoints,
    plottedPoints,
  };
}
