/**
 * Shapes the demo generator hands to the loader. LoggerLayoutSpec mirrors the layout
 * contract the ingest code accepts (columns named by header text, or by 1-based index
 * when the file has no header).
 */
export type { TemperatureCalibration } from "../lib/analysis/types.ts";

export type ColumnRef = string | number;

export interface LoggerLayoutSpec {
  name: string;
  delimiter: "comma" | "semicolon" | "tab" | "whitespace";
  hasHeader: boolean;
  commentPrefix: string | null;
  decimalSeparator: "." | ",";
  columns: {
    time: { column: ColumnRef; format: "elapsed-seconds" | "clock-time" | "iso-datetime" };
    altitude?: { column: ColumnRef; unit: "m" | "ft" };
    temperature: { column: ColumnRef; unit: "counts" | "V" | "mV" | "degC" | "K" | "degF" };
    pressure?: { column: ColumnRef; unit: "hPa" | "Pa" | "mbar" };
    /** Relative humidity, percent. */
    humidity?: { column: ColumnRef };
    latitude?: { column: ColumnRef };
    longitude?: { column: ColumnRef };
  };
}
