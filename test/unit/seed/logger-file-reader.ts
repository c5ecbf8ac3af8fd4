/**
 * A minimal reader for the demo's own logger files, written for the tests from the
 * layout description alone (header row, delimiter, decimal separator, comment prefix,
 * units), so that the files are checked without the ingest code.
 */
import type { LoggerLayoutSpec } from "@/lib/ingest/layout";

export interface ReadRow {
  timeS: number;
  altitudeM: number | null;
  temperatureRaw: number;
  pressureHpa: number | null;
  humidityPct: number | null;
}

const DELIMITER: Record<LoggerLayoutSpec["delimiter"], string> = { comma: ",", semicolon: ";", tab: "\t", whitespace: " " };

export function readLoggerText(text: string, layout: LoggerLayoutSpec): ReadRow[] {
  const lines = text.split("\n").filter((line) => line.trim() !== "");
  const dataLines = lines.filter((line) => !(layout.commentPrefix !== null && line.startsWith(layout.commentPrefix)));
  const header = layout.hasHeader ? (dataLines.shift() ?? "").split(DELIMITER[layout.delimiter]) : null;
  const indexOf = (column: string | number): number => {
    if (typeof column === "number") return column - 1;
    const index = header?.indexOf(column) ?? -1;
    if (index < 0) throw new Error(`column ${column} missing from header ${header?.join("|")}`);
    return index;
  };
  const toNumber = (cell: string | undefined): number => {
    if (cell === undefined || cell === "") throw new Error("empty cell");
    const value = Number(layout.decimalSeparator === "," ? cell.replace(",", ".") : cell);
    if (!Number.isFinite(value)) throw new Error(`not a number: ${cell}`);
    return value;
  };
  const c = layout.columns;
  const timeIndex = indexOf(c.time.column);
  const temperatureIndex = indexOf(c.temperature.column);
  const altitudeIndex = c.altitude ? indexOf(c.altitude.column) : null;
  const pressureIndex = c.pressure ? indexOf(c.pressure.column) : null;
  const humidityIndex = c.humidity ? indexOf(c.humidity.column) : null;
  let firstMs: number | null = null;
  return dataLines.map((line) => {
    const cells = line.split(DELIMITER[layout.delimiter]);
    let timeS: number;
    if (c.time.format === "iso-datetime") {
      const ms = Date.parse(cells[timeIndex] ?? "");
      firstMs ??= ms;
      timeS = (ms - firstMs) / 1000;
    } else {
      timeS = toNumber(cells[timeIndex]);
    }
    const altitude = altitudeIndex === null ? null : toNumber(cells[altitudeIndex]);
    return {
      timeS,
      altitudeM: altitude === null ? null : c.altitude?.unit === "ft" ? altitude * 0.3048 : altitude,
      temperatureRaw: toNumber(cells[temperatureIndex]),
      pressureHpa: pressureIndex === null ? null : toNumber(cells[pressureIndex]),
      humidityPct: humidityIndex === null ? null : toNumber(cells[humidityIndex]),
    };
  });
}
