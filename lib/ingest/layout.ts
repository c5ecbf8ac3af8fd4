import { z } from "zod";
import { isClockZoneSetting } from "./clock-zone.ts";

/** A column reference: the header name when the file has a header row, else a 1-based index. */
const columnRef = z.union([z.string().trim().min(1), z.number().int().positive()]);

/**
 * How to read one logger's files. Stored as JSON in LoggerLayout.spec and validated here,
 * the one schema shared by the upload form, the API, the CLI and the demo generator.
 */
export const loggerLayoutSpecSchema = z.object({
  name: z.string().trim().min(1).max(120),
  delimiter: z.enum(["comma", "semicolon", "tab", "whitespace"]),
  hasHeader: z.boolean(),
  commentPrefix: z.string().max(3).nullable(),
  decimalSeparator: z.enum([".", ","]),
  columns: z.object({
    time: z.object({
      column: columnRef,
      format: z.enum(["elapsed-seconds", "clock-time", "iso-datetime"]),
      /**
       * The zone the logger's clock keeps, for clock times and for date-times written without an offset:
       * "utc" (the default when absent), "site" (the flight's site's zone) or an IANA name such as "Europe/Berlin".
       */
      clockZone: z
        .string()
        .trim()
        .refine(isClockZoneSetting, 'Clock zone must be "utc", "site" or an IANA time-zone name such as Europe/Berlin')
        .optional(),
    }),
    altitude: z.object({ column: columnRef, unit: z.enum(["m", "ft"]) }).optional(),
    temperature: z.object({ column: columnRef, unit: z.enum(["counts", "V", "mV", "degC", "K", "degF"]) }),
    pressure: z.object({ column: columnRef, unit: z.enum(["hPa", "Pa", "mbar"]) }).optional(),
    humidity: z.object({ column: columnRef }).optional(),
    latitude: z.object({ column: columnRef }).optional(),
    longitude: z.object({ column: columnRef }).optional(),
  }),
}).superRefine((layout, ctx) => {
  if (layout.delimiter === "comma" && layout.decimalSeparator === ",") {
    ctx.addIssue({ code: "custom", path: ["decimalSeparator"], message: "A decimal comma needs a delimiter other than comma" });
  }
  const { format, clockZone } = layout.columns.time;
  if (format === "elapsed-seconds" && clockZone !== undefined && clockZone !== "utc") {
    ctx.addIssue({ code: "custom", path: ["columns", "time", "clockZone"], message: "Elapsed seconds have no clock: a clock zone applies only to clock times and date-times" });
  }
  if (!layout.columns.altitude && !layout.columns.pressure) {
    ctx.addIssue({ code: "custom", path: ["columns", "altitude"], message: "Map an altitude column or a pressure column (altitude is then derived from pressure)" });
  }
});

export type LoggerLayoutSpec = z.infer<typeof loggerLayoutSpecSchema>;
export type LayoutColumnKey = keyof LoggerLayoutSpec["columns"];

export const DELIMITER_CHARACTERS: Record<LoggerLayoutSpec["delimiter"], string> = {
  comma: ",",
  semicolon: ";",
  tab: "\t",
  whitespace: " ",
};

/** The temperature unit of a layout column, in the analysis core's vocabulary. */
export function temperatureInputOf(unit: LoggerLayoutSpec["columns"]["temperature"]["unit"]) {
  const map = { counts: "counts", V: "volts", mV: "millivolts", degC: "celsius", K: "kelvin", degF: "fahrenheit" } as const;
  return map[unit];
}

/** Plain-language description of a column reference, e.g. `"gps_alt_m"` or `column 3`. */
export function describeColumn(ref: string | number): string {
  return typeof ref === "number" ? `column ${ref}` : `"${ref}"`;
}
