"use client";

import { CartesianGrid, Legend, ResponsiveContainer, Scatter, ScatterChart, Tooltip, XAxis, YAxis } from "recharts";

const COLOURS = { points: "#b04a1c", line: "#1d5c8f" };

function NoMarker() {
  return <g />;
}

/**
 * Reference pairs (reading, reference temperature) and the fitted calibration curve. Series arrive
 * computed by the server (fitCalibrationPoints); the chart only draws them.
 */
export function CalibrationFitChart({ points, curve, readingUnit }: {
  points: Array<{ raw: number; referenceC: number }>;
  curve: Array<{ raw: number; temperatureC: number }>;
  readingUnit: string;
}) {
  return (
    <figure className="chart">
      <div role="img" aria-label={`Fitted calibration: temperature (°C) against reading (${readingUnit}), ${points.length} reference pairs`}>
        <ResponsiveContainer width="100%" height={320}>
          <ScatterChart margin={{ top: 12, right: 24, bottom: 36, left: 16 }}>
            <CartesianGrid stroke="#d9dee3" />
            <XAxis type="number" dataKey="raw" name={`Reading (${readingUnit})`} domain={["auto", "auto"]} label={{ value: `Reading (${readingUnit})`, position: "insideBottom", offset: -24 }} />
            <YAxis type="number" dataKey="temperatureC" name="Temperature (°C)" domain={["auto", "auto"]} width={56} label={{ value: "Temperature (°C)", angle: -90, position: "insideLeft", offset: 4 }} />
            <Scatter
              name="Fitted calibration"
              data={curve}
              fill={COLOURS.line}
              line={{ stroke: COLOURS.line, strokeWidth: 2 }}
              lineJointType="linear"
              shape={<NoMarker />}
              legendType="plainline"
              tooltipType="none"
              isAnimationActive={false}
            />
            <Scatter
              name="Reference pairs"
              data={points.map((p) => ({ raw: p.raw, temperatureC: p.referenceC }))}
              fill={COLOURS.points}
              shape="diamond"
              legendType="diamond"
              isAnimationActive={false}
            />
            <Tooltip formatter={(value) => (typeof value === "number" ? value.toFixed(3) : String(value))} />
            <Legend verticalAlign="top" height={32} />
          </ScatterChart>
        </ResponsiveContainer>
      </div>
      <figcaption>Diamonds: reference temperature of each pair; line: the fitted calibration across the readings.</figcaption>
    </figure>
  );
}
