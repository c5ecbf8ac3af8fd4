"use client";

import {
  CartesianGrid, Legend, ReferenceArea, ReferenceLine, ResponsiveContainer, Scatter, ScatterChart, Tooltip, XAxis, YAxis, ZAxis,
} from "recharts";
import { useRef } from "react";
import type { ProfileChartData } from "@/app/_lib/profile-series";
import { FigureDownload } from "@/app/_components/figure-download";

const COLOURS = {
  ascent: "#1d5c8f",
  descent: "#b04a1c",
  dry: "#555555",
  saturated: "#2b7a4b",
  tropopause: "#6b3fa0",
  inversion: "#f2c14e",
};

function NoMarker() {
  return <g />;
}

/** Temperature (°C, x) against altitude (km, y): ascent, descent, inversions, tropopause, adiabats. */
export function ProfileChart({ data, title, scope, version }: { data: ProfileChartData; title: string; scope: string; version: string }) {
  const frame = useRef<HTMLDivElement>(null);
  const [tMin, tMax] = data.temperatureDomainC;
  const [zMin, zMax] = data.altitudeDomainKm;
  return (
    <figure className="chart">
      <div ref={frame} className="chart-frame" role="img" aria-label={`${title}: temperature against altitude. ${data.ascent.length} ascent levels${data.descent.length ? `, ${data.descent.length} descent levels` : ""}${data.tropopauses.length ? `; ${data.tropopauses.map((t) => t.label).join("; ")}` : ""}.`}>
        <ResponsiveContainer width="100%" height={560}>
          <ScatterChart margin={{ top: 16, right: 24, bottom: 36, left: 16 }}>
            <CartesianGrid stroke="#d9dee3" />
            {/* One small marker size for every series; the line carries the shape of the profile. */}
            <ZAxis type="number" range={[14, 14]} />
            <XAxis
              type="number"
              dataKey="temperatureC"
              name="Temperature"
              unit=" °C"
              domain={[tMin, tMax]}
              allowDataOverflow
              ticks={data.temperatureTicksC}
              tickFormatter={(v: number) => String(v)}
              label={{ value: "Temperature (°C)", position: "insideBottom", offset: -24 }}
            />
            <YAxis
              type="number"
              dataKey="altitudeKm"
              name="Altitude"
              unit=" km"
              domain={[zMin, zMax]}
              allowDataOverflow
              ticks={data.altitudeTicksKm}
              tickFormatter={(v: number) => String(v)}
              width={64}
              label={{ value: "Altitude (km)", angle: -90, position: "insideLeft", offset: 4 }}
            />
            {data.inversions.map((band) => (
              <ReferenceArea
                key={`${band.baseKm}-${band.topKm}`}
                y1={band.baseKm}
                y2={band.topKm}
                fill={COLOURS.inversion}
                fillOpacity={0.35}
                stroke={COLOURS.inversion}
                ifOverflow="hidden"
                label={{ value: band.label, position: "insideRight", fontSize: 12, fill: "#5c4300" }}
              />
            ))}
            {data.tropopauses.map((t, i) => (
              <ReferenceLine
                key={t.label}
                y={t.altitudeKm}
                stroke={COLOURS.tropopause}
                strokeWidth={2}
                strokeDasharray={i === 0 ? undefined : "10 4"}
                ifOverflow="hidden"
                label={{ value: t.label, position: "insideTopRight", fill: COLOURS.tropopause, fontSize: 13 }}
              />
            ))}
            <Scatter
              name="Ascent"
              data={data.ascent}
              fill={COLOURS.ascent}
              line={{ stroke: COLOURS.ascent, strokeWidth: 2 }}
              lineJointType="linear"
              shape="circle"
              legendType="circle"
              isAnimationActive={false}
            />
            {data.descent.length > 0 && (
              <Scatter
                name="Descent"
                data={data.descent}
                fill={COLOURS.descent}
                line={{ stroke: COLOURS.descent, strokeWidth: 2, strokeDasharray: "7 4" }}
                lineJointType="linear"
                shape="triangle"
                legendType="triangle"
                isAnimationActive={false}
              />
            )}
            {data.dryAdiabat && (
              <Scatter
                name={data.dryAdiabat.label}
                data={data.dryAdiabat.points}
                fill={COLOURS.dry}
                line={{ stroke: COLOURS.dry, strokeWidth: 1.5, strokeDasharray: "12 5" }}
                shape={<NoMarker />}
                legendType="plainline"
                tooltipType="none"
                isAnimationActive={false}
              />
            )}
            {data.saturatedAdiabat && (
              <Scatter
                name={data.saturatedAdiabat.label}
                data={data.saturatedAdiabat.points}
                fill={COLOURS.saturated}
                line={{ stroke: COLOURS.saturated, strokeWidth: 1.5, strokeDasharray: "3 4" }}
                shape={<NoMarker />}
                legendType="plainline"
                tooltipType="none"
                isAnimationActive={false}
              />
            )}
            <Tooltip cursor={{ strokeDasharray: "3 3" }} formatter={(value) => (typeof value === "number" ? value.toFixed(2) : String(value))} />
            <Legend verticalAlign="top" height={48} />
          </ScatterChart>
        </ResponsiveContainer>
      </div>
      <figcaption>
        Binned levels of the current analysis run. Ascent: solid line with circles; descent: dashed line with triangles.
        Shaded bands are inversions; the purple line marks the tropopause. Both adiabats start at the lowest ascent level: the dry one is straight; the saturated one is the path of a saturated
        parcel lifted from there and bends towards the dry one as the air cools and holds less water.
      </figcaption>
      <FigureDownload
        target={frame}
        title={`${title} temperature profile`}
        shown="Temperature against altitude: binned levels, inversions, tropopause and adiabats"
        scope={scope}
        count={`n = ${data.ascent.length} ascent level${data.ascent.length === 1 ? "" : "s"}${data.descent.length > 0 ? `, ${data.descent.length} descent level${data.descent.length === 1 ? "" : "s"}` : ""}`}
        version={version}
      />
    </figure>
  );
}
