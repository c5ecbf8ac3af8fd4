/**
 * Shapes the demo generator hands to the loader: the layout contract of the ingest code
 * and the calibration contract of the analysis core.
 */
export type { TemperatureCalibration } from "../lib/analysis/types.ts";
export type { LoggerLayoutSpec } from "../lib/ingest/layout.ts";

/** Header name when the layout has a header row, else a 1-based column number. */
export type ColumnRef = string | number;
