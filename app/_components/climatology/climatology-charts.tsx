"use client";

import {
  CartesianGrid, Legend, ReferenceArea, ReferenceLine, ResponsiveContainer, Scatter, ScatterChart, Symbols, Tooltip, XAxis, YAxis,
} from "recharts";
import { useRef, type ReactNode } from "react";
import { FigureDownload } from "@/app/_components/figure-download";
import type { BoxPlotSeries, ChartPoint, ClimatologyCharts, GroupSymbol, ProfileSeries, ScatterSeries } from "./chart-data";

const MONTH_START_DAYS = [1, 32, 60, 91, 121, 152, 182, 213, 244, 274, 305, 335];
const MONTHS = ["Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"];

function axisTitle(label: string, unit: string): string {
  return `${label.charAt(0).toUpperCase()}${label.slice(1)} (${unit})`;
}

interface ShapeProps {
  cx?: number;
  cy?: number;
  payload?: unknown;
}

/** A point drawn as its group's symbol inside a link to the flight page (mouse; the flight list below serves the keyboard). */
function linkedPoint(symbol: GroupSymbol, colour: string) {
  return function LinkedPoint(props: ShapeProps): ReactNode {
    const point = props.payload as ChartPoint | undefined;
    if (props.cx === undefined || props.cy === undefined || !point) return <g />;
    return (
      <a href={`/flights/${point.flightId}`} tabIndex={-1} className="chart-point-link">
        <title>{point.description}</title>
        <g fill={colour} stroke="#ffffff" strokeWidth={0.8}>
          <Symbols type={symbol} cx={props.cx} cy={props.cy} size={56} />
        </g>
      </a>
    );
  };
}

function MeanMarker(props: ShapeProps): ReactNode {
  if (props.cx === undefined || props.cy === undefined) return <g />;
  const { cx, cy } = props;
  return <path d={`M${cx - 9},${cy} L${cx},${cy - 9} L${cx + 9},${cy} L${cx},${cy + 9} Z`} fill="none" stroke="#111111" strokeWidth={2} />;
}

function NoMarker(): ReactNode {
  return <g />;
}

/** What a downloaded figure's caption says besides what the chart shows: the query in words, n and the version. */
export interface FigureContext {
  scope: string;
  count: string | null;
  version: string;
}

function numberText(value: unknown): string {
  return typeof value === "number" ? String(Math.round(value * 100) / 100) : String(value);
}

/** Per-group box (quartiles, median line, whiskers to min and max), mean diamond and every flight as a linked point. */
export function GroupBoxPlot({ charts, figure }: { charts: ClimatologyCharts; figure: FigureContext }) {
  const frame = useRef<HTMLDivElement>(null);
  const boxes: BoxPlotSeries[] = charts.boxes;
  if (boxes.length === 0) return null;
  const values = boxes.flatMap((b) => [b.min, b.max]);
  const lo = Math.min(...values);
  const hi = Math.max(...values);
  const pad = hi > lo ? (hi - lo) * 0.08 : 1;
  const title = axisTitle(charts.metricLabel, charts.unit);
  return (
    <figure className="chart" aria-labelledby="box-caption">
      <div ref={frame} className="chart-frame" style={{ minHeight: 420 }} role="group" aria-label={`${title} by group: box and points. ${boxes.map((b) => `${b.label}: n ${b.n}, median ${numberText(b.median)}, quartiles ${numberText(b.q1)} to ${numberText(b.q3)} ${charts.unit}`).join("; ")}.`}>
        <ResponsiveContainer width="100%" height={420}>
          <ScatterChart margin={{ top: 16, right: 24, bottom: 48, left: 24 }}>
            <CartesianGrid stroke="#d9dee3" />
            <XAxis
              type="number"
              dataKey="x"
              name="Group"
              domain={[-0.6, boxes.length - 0.4]}
              ticks={boxes.map((b) => b.index)}
              tickFormatter={(v: number) => boxes.find((b) => b.index === v)?.label ?? ""}
              interval={0}
              label={{ value: "Group", position: "insideBottom", offset: -32 }}
            />
            <YAxis type="number" dataKey="y" name={title} unit={` ${charts.unit}`} domain={[lo - pad, hi + pad]} tickFormatter={numberText} width={96}
              label={{ value: title, angle: -90, position: "insideLeft", offset: -8, style: { textAnchor: "middle" } }} />
            {boxes.map((b) => (
              <ReferenceArea key={`box-${b.key}`} x1={b.index - 0.3} x2={b.index + 0.3} y1={b.q1} y2={b.q3} fill={b.colour} fillOpacity={0.12} stroke={b.colour} strokeWidth={1.5} ifOverflow="visible" />
            ))}
            {boxes.map((b) => (
              <ReferenceLine key={`median-${b.key}`} segment={[{ x: b.index - 0.3, y: b.median }, { x: b.index + 0.3, y: b.median }]} stroke={b.colour} strokeWidth={3} ifOverflow="visible" />
            ))}
            {boxes.map((b) => (
              <ReferenceLine key={`low-${b.key}`} segment={[{ x: b.index, y: b.min }, { x: b.index, y: b.q1 }]} stroke={b.colour} strokeDasharray="4 3" ifOverflow="visible" />
            ))}
            {boxes.map((b) => (
              <ReferenceLine key={`high-${b.key}`} segment={[{ x: b.index, y: b.q3 }, { x: b.index, y: b.max }]} stroke={b.colour} strokeDasharray="4 3" ifOverflow="visible" />
            ))}
            {boxes.map((b) => (
              <Scatter key={`points-${b.key}`} name={`${b.label} (n = ${b.n})`} data={b.points} fill={b.colour} shape={linkedPoint(b.symbol, b.colour)} legendType={b.symbol} isAnimationActive={false} />
            ))}
            <Scatter name="Group mean" data={boxes.map((b) => ({ x: b.index, y: b.mean }))} fill="#111111" shape={MeanMarker} legendType="diamond" isAnimationActive={false} />
            <Tooltip formatter={(value) => numberText(value)} labelFormatter={() => ""} />
            <Legend verticalAlign="top" height={40} />
          </ScatterChart>
        </ResponsiveContainer>
      </div>
      <figcaption id="box-caption">
        Box: lower to upper quartile; thick line: median; dashed whiskers: minimum to maximum; open diamond: mean. Each point is one flight
        (each group has its own symbol); click a point to open its flight.
        {charts.omittedPoints > 0 && ` The charts show an even sample of ${charts.plottedPoints} of the ${charts.plottedPoints + charts.omittedPoints} flights; the statistics use them all.`}
      </figcaption>
      <FigureDownload target={frame} title={`${title} by group`} shown={`${title} by group: box plot with every flight`} scope={figure.scope} count={figure.count} version={figure.version} />
    </figure>
  );
}

/** The metric against day of year or local launch hour, one symbol per group, each point linking to its flight. */
export function MetricScatter({ charts, figure }: { charts: ClimatologyCharts; figure: FigureContext }) {
  const frame = useRef<HTMLDivElement>(null);
  const series: ScatterSeries[] = charts.scatter;
  if (series.length === 0) return null;
  const title = axisTitle(charts.metricLabel, charts.unit);
  const byDay = charts.scatterAxis === "day-of-year";
  return (
    <figure className="chart" aria-labelledby="scatter-caption">
      <div ref={frame} className="chart-frame" style={{ minHeight: 420 }} role="group" aria-label={`${title} against ${byDay ? "day of year" : "local launch hour"}, ${series.reduce((s, g) => s + g.points.length, 0)} flights.`}>
        <ResponsiveContainer width="100%" height={420}>
          <ScatterChart margin={{ top: 16, right: 24, bottom: 48, left: 24 }}>
            <CartesianGrid stroke="#d9dee3" />
            {byDay ? (
              <XAxis type="number" dataKey="x" name="Day of year" domain={[1, 366]} ticks={MONTH_START_DAYS} tickFormatter={(d: number) => MONTHS[MONTH_START_DAYS.indexOf(d)] ?? String(d)}
                label={{ value: "Day of year (local date; ticks at month starts)", position: "insideBottom", offset: -32 }} />
            ) : (
              <XAxis type="number" dataKey="x" name="Local launch hour" unit=" h" domain={[0, 24]} ticks={[0, 3, 6, 9, 12, 15, 18, 21, 24]}
                label={{ value: "Local launch hour (h)", position: "insideBottom", offset: -32 }} />
            )}
            <YAxis type="number" dataKey="y" name={title} unit={` ${charts.unit}`} domain={["auto", "auto"]} tickFormatter={numberText} width={96}
              label={{ value: title, angle: -90, position: "insideLeft", offset: -8, style: { textAnchor: "middle" } }} />
            {series.map((s) => (
              <Scatter key={s.key} name={s.label} data={s.points} fill={s.colour} shape={linkedPoint(s.symbol, s.colour)} legendType={s.symbol} isAnimationActive={false} />
            ))}
            <Tooltip formatter={(value) => numberText(value)} labelFormatter={() => ""} />
            <Legend verticalAlign="top" height={40} />
          </ScatterChart>
        </ResponsiveContainer>
      </div>
      <figcaption id="scatter-caption">
        Each point is one flight; groups differ by symbol and colour. Click a point to open its flight.
        {charts.omittedPoints > 0 && ` An even sample of ${charts.plottedPoints} of the ${charts.plottedPoints + charts.omittedPoints} flights is shown.`}
      </figcaption>
      <FigureDownload target={frame} title={`${title} against ${byDay ? "day of year" : "launch hour"}`} shown={`${title} against ${byDay ? "day of year (local date)" : "local launch hour"}, one point per flight`} scope={figure.scope} count={figure.count} version={figure.version} />
    </figure>
  );
}

/** Mean temperature profile per group (solid line with the group's symbol every 2 km) and ±1 SD bounds (dashed, same colour). */
export function GroupProfiles({ charts, figure }: { charts: ClimatologyCharts; figure: FigureContext }) {
  const frame = useRef<HTMLDivElement>(null);
  const profiles: ProfileSeries[] = charts.profiles.filter((p) => p.mean.length > 1);
  if (profiles.length === 0) return null;
  const temperatures = profiles.flatMap((p) => [...p.low, ...p.high, ...p.mean].map((l) => l.temperatureC));
  const altitudes = profiles.flatMap((p) => p.mean.map((l) => l.altitudeKm));
  const tMin = Math.floor(Math.min(...temperatures) / 10) * 10;
  const tMax = Math.ceil(Math.max(...temperatures) / 10) * 10;
  const zMax = Math.ceil(Math.max(...altitudes));
  return (
    <figure className="chart" aria-labelledby="profile-caption">
      <div ref={frame} className="chart-frame" role="img" aria-label={`Mean ${charts.phase} temperature profile per group: ${profiles.map((p) => `${p.label}, ${p.mean.length} levels`).join("; ")}.`}>
        <ResponsiveContainer width="100%" height={560}>
          <ScatterChart margin={{ top: 16, right: 24, bottom: 40, left: 16 }}>
            <CartesianGrid stroke="#d9dee3" />
            <XAxis type="number" dataKey="temperatureC" name="Temperature" unit=" °C" domain={[tMin, tMax]} tickCount={8}
              label={{ value: "Mean temperature (°C)", position: "insideBottom", offset: -26 }} />
            <YAxis type="number" dataKey="altitudeKm" name="Altitude" unit=" km" domain={[0, zMax]} tickCount={8} width={72}
              label={{ value: "Altitude above sea level (km)", angle: -90, position: "insideLeft", offset: 4, style: { textAnchor: "middle" } }} />
            {profiles.flatMap((p) => [
              <Scatter key={`mean-${p.key}`} name={p.label} data={p.mean} fill={p.colour} line={{ stroke: p.colour, strokeWidth: 2.5 }} lineJointType="linear" shape={NoMarker} legendType="none" isAnimationActive={false} tooltipType="none" />,
              <Scatter key={`low-${p.key}`} name={`${p.label} − 1 SD`} data={p.low} fill={p.colour} line={{ stroke: p.colour, strokeWidth: 1, strokeDasharray: "5 4" }} lineJointType="linear" shape={NoMarker} legendType="none" isAnimationActive={false} tooltipType="none" />,
              <Scatter key={`high-${p.key}`} name={`${p.label} + 1 SD`} data={p.high} fill={p.colour} line={{ stroke: p.colour, strokeWidth: 1, strokeDasharray: "5 4" }} lineJointType="linear" shape={NoMarker} legendType="none" isAnimationActive={false} tooltipType="none" />,
              <Scatter key={`markers-${p.key}`} name={p.label} data={p.markers} fill={p.colour} shape={p.symbol} legendType={p.symbol} isAnimationActive={false} />,
            ])}
            <Tooltip formatter={(value) => numberText(value)} />
            <Legend verticalAlign="top" height={40} />
          </ScatterChart>
        </ResponsiveContainer>
      </div>
      <figcaption id="profile-caption">
        Mean of the {charts.phase} levels of each group&apos;s flights per altitude bin (solid), with ±1 standard deviation across flights (dashed).
        Levels reached by fewer than half of a group&apos;s flights are left out.
      </figcaption>
      <FigureDownload target={frame} title={`mean ${charts.phase} temperature profiles`} shown={`Mean ${charts.phase} temperature profile per group, ±1 standard deviation`} scope={figure.scope} count={figure.count} version={figure.version} />
    </figure>
  );
}
