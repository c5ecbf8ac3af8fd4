/**
 * The one schema for an export request: where the flights come from (Archive filter, one flight,
 * a Climatology query or claim check), the format (CSV, JSON, zip data package, NetCDF-4/CF), which table (CSV), raw files and licence.
 * The export's own keys never clash with the Archive's or the Climatology's search params, so the
 * query's parameters travel alongside unchanged: /api/v1/export?source=climatology&format=package&<query>.
 * Pure: no database, no environment.
 */
import { z } from "zod";
import { TABLE_NAMES, type TableName } from "./tables.ts";

export const EXPORT_FORMATS = ["csv", "json", "package", "netcdf"] as const;
export type ExportFormat = (typeof EXPORT_FORMATS)[number];

export const EXPORT_SOURCES = ["archive", "flight", "climatology"] as const;
export type ExportSource = (typeof EXPORT_SOURCES)[number];

export interface LicenceChoice {
  /** SPDX identifier, also the Frictionless licence `name`. */
  id: string;
  title: string;
  path: string;
}

/** Open licences a dataset can carry [S: SPDX licence list ids and the licences' own pages]. */
export const LICENCES: readonly LicenceChoice[] = [
  { id: "CC-BY-4.0", title: "Creative Commons Attribution 4.0", path: "https://creativecommons.org/licenses/by/4.0/" },
  { id: "CC0-1.0", title: "Creative Commons Zero v1.0 Universal (public domain dedication)", path: "https://creativecommons.org/publicdomain/zero/1.0/" },
  { id: "CC-BY-SA-4.0", title: "Creative Commons Attribution-ShareAlike 4.0", path: "https://creativecommons.org/licenses/by-sa/4.0/" },
  { id: "ODC-By-1.0", title: "Open Data Commons Attribution License v1.0", path: "https://opendatacommons.org/licenses/by/1-0/" },
  { id: "ODbL-1.0", title: "Open Data Commons Open Database License v1.0", path: "https://opendatacommons.org/licenses/odbl/1-0/" },
];

const LICENCE_IDS = LICENCES.map((l) => l.id) as [string, ...string[]];

/** The keys the export itself reads; everything else is the source query's own parameters. */
export const EXPORT_KEYS = ["source", "format", "table", "raw", "licence", "title", "flight"] as const;

const blankToUndefined = (v: unknown) => (typeof v === "string" && v.trim() === "" ? undefined : v);

const yesNo = z.preprocess(
  (v) => (v === undefined || v === "" ? "no" : String(v).toLowerCase()),
  z.enum(["yes", "no", "true", "false", "1", "0", "on", "off"], { error: "raw must be yes or no" }),
).transform((v) => v === "yes" || v === "true" || v === "1" || v === "on");

export const exportOptionsSchema = z
  .object({
    source: z.preprocess(blankToUndefined, z.enum(EXPORT_SOURCES, { error: `source must be one of: ${EXPORT_SOURCES.join(", ")}` }).default("archive")),
    format: z.preprocess(blankToUndefined, z.enum(EXPORT_FORMATS, { error: `format must be one of: ${EXPORT_FORMATS.join(", ")}` }).default("package")),
    table: z.preprocess(blankToUndefined, z.enum(TABLE_NAMES as unknown as [TableName, ...TableName[]], { error: `table must be one of: ${TABLE_NAMES.join(", ")}` }).default("flights")),
    raw: yesNo,
    licence: z.preprocess(blankToUndefined, z.enum(LICENCE_IDS, { error: `licence must be one of: ${LICENCE_IDS.join(", ")}` }).default("CC-BY-4.0")),
    title: z.preprocess(blankToUndefined, z.string().trim().max(200).optional()),
    flight: z.preprocess(blankToUndefined, z.string().regex(/^[A-Za-z0-9_-]{1,64}$/, { message: "flight must be a flight id" }).optional()),
  })
  .superRefine((o, ctx) => {
    if (o.source === "flight" && !o.flight) ctx.addIssue({ code: "custom", path: ["flight"], message: "a flight export needs flight=<flight id>" });
    if (o.raw && o.format !== "package") ctx.addIssue({ code: "custom", path: ["raw"], message: "raw files travel only in a data package (format=package)" });
    if (o.table === "query-values" && o.source !== "climatology") ctx.addIssue({ code: "custom", path: ["table"], message: "the query-values table exists only for a climatology export" });
  });

export type ExportOptions = z.output<typeof exportOptionsSchema>;

/** Splits a search-param record into the export's options and the source query's own parameters. */
export function splitExportRecord(record: Record<string, string>): { exportRecord: Record<string, string>; queryRecord: Record<string, string> } {
  const exportRecord: Record<string, string> = {};
  const queryRecord: Record<string, string> = {};
  for (const [key, value] of Object.entries(record)) {
    if ((EXPORT_KEYS as readonly string[]).includes(key)) exportRecord[key] = value;
    else queryRecord[key] = value;
  }
  return { exportRecord, queryRecord };
}

export function licenceById(id: string): LicenceChoice {
  const licence = LICENCES.find((l) => l.id === id);
  if (!licence) throw new Error(`unknown licence ${id}`);
  return licence;
}
