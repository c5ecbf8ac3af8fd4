/**
 * The data package's descriptive files: datapackage.json (Frictionless Data Package v1 with a
 * Table Schema per resource [S: frictionlessdata.io specs, Data Package 1.0, Tabular Data
 * Resource, Table Schema]), CITATION.cff (Citation File Format 1.2.0 [S]) and a short README.
 * Pure: everything comes in as arguments, including the clock.
 */
import type { QueryDescription } from "./read.ts";
import type { ExportTable, FieldType } from "./tables.ts";
import type { LicenceChoice } from "./request.ts";

/** The empty cell is the only missing value the CSV files use. */
export const MISSING_VALUES = [""];

export interface ResourceFacts {
  table: ExportTable<never>;
  path: string;
  bytes: number;
  sha256: string;
  rowCount: number;
}

export interface PackageFacts {
  name: string;
  title: string;
  createdAtUtc: Date;
  lapsebankVersion: string;
  programName: string;
  licence: LicenceChoice;
  query: QueryDescription;
  schools: Array<{ id: string; name: string }>;
  analysisVersions: string[];
  analysisParameterSets: unknown[];
  calibrationIds: string[];
  flightCount: number;
  includesRawFiles: boolean;
  resources: ResourceFacts[];
}

interface TableSchemaField {
  name: string;
  type: FieldType;
  format?: string;
  title: string;
  description: string;
  unit?: string;
  cfStandardName?: string;
  constraints?: { required?: boolean; enum?: string[] };
}

/** A Table Schema descriptor for one export table. `unit` and `cfStandardName` are custom field properties (allowed by the spec). */
export function tableSchema(table: ExportTable<never>): Record<string, unknown> {
  const fields: TableSchemaField[] = table.fields.map((f) => {
    const constraints: TableSchemaField["constraints"] = {};
    if (f.required) constraints.required = true;
    if (f.enum) constraints.enum = [...f.enum];
    const unitWords = f.unit ? ` [${f.unit}]` : "";
    return {
      name: f.name,
      type: f.type,
      ...(f.type === "datetime" ? { format: "default" } : {}),
      title: f.name,
      description: `${f.description}${unitWords}.${f.type === "string" ? " Text cells that begin with = + - @ tab, CR or ' carry one extra leading ' (spreadsheet formula guard)." : ""}`,
      ...(f.unit ? { unit: f.unit } : {}),
      ...(f.cfStandardName ? { cfStandardName: f.cfStandardName } : {}),
      ...(Object.keys(constraints).length ? { constraints } : {}),
    };
  });
  return {
    fields,
    missingValues: MISSING_VALUES,
    primaryKey: table.primaryKey.length === 1 ? table.primaryKey[0] : table.primaryKey,
    ...(table.foreignKeys.length ? { foreignKeys: table.foreignKeys } : {}),
  };
}

/** datapackage.json as an object (callers serialise it). */
export function dataPackageDescriptor(facts: PackageFacts): Record<string, unknown> {
  return {
    profile: "tabular-data-package",
    name: facts.name,
    title: facts.title,
    description: `${facts.query.summary}. Exported from Lapsebank ${facts.lapsebankVersion} (${facts.programName}): ${facts.flightCount} flight${facts.flightCount === 1 ? "" : "s"}, SI units, times in UTC.`,
    created: facts.createdAtUtc.toISOString(),
    version: facts.lapsebankVersion,
    keywords: ["temperature sounding", "lapse rate", "tropopause", "temperature inversion", "high-altitude balloon"],
    licenses: [{ name: facts.licence.id, path: facts.licence.path, title: facts.licence.title }],
    ...(facts.schools.length ? { contributors: facts.schools.map((s) => ({ title: s.name, role: "author" })) } : {}),
    sources: [{ title: `Lapsebank archive of ${facts.programName}` }],
    resources: facts.resources.map((r) => ({
      name: r.table.name,
      path: r.path,
      profile: "tabular-data-resource",
      title: r.table.title,
      description: r.table.description,
      format: "csv",
      mediatype: "text/csv",
      encoding: "utf-8",
      bytes: r.bytes,
      hash: `sha256:${r.sha256}`,
      dialect: { delimiter: ",", lineTerminator: "\r\n", quoteChar: "\"", doubleQuote: true, header: true },
      schema: tableSchema(r.table),
    })),
    lapsebank: {
      lapsebankVersion: facts.lapsebankVersion,
      analysisVersions: facts.analysisVersions,
      analysisParameters: facts.analysisParameterSets,
      calibrationsUsed: facts.calibrationIds,
      query: facts.query,
      includesRawFiles: facts.includesRawFiles,
      rowCounts: Object.fromEntries(facts.resources.map((r) => [r.table.name, r.rowCount])),
      csvTextGuard: "Text cells that begin with = + - @ tab, CR or ' carry one extra leading ' so spreadsheets do not run them; remove exactly one leading ' to get the stored text.",
    },
  };
}

/** A YAML double-quoted scalar (escapes backslash, quote and control characters). */
function yamlString(text: string): string {
  return `"${text.replace(/\\/g, "\\\\").replace(/"/g, '\\"').replace(/\n/g, "\\n").replace(/\r/g, "\\r").replace(/\t/g, "\\t")}"`;
}

/** CITATION.cff for the dataset [S: Citation File Format 1.2.0: cff-version, message, title, authors required; type dataset]. */
export function citationCff(facts: PackageFacts): string {
  const authors = facts.schools.length ? facts.schools : [{ id: "program", name: facts.programName }];
  const lines = [
    "cff-version: 1.2.0",
    `message: ${yamlString("If you use this dataset, please cite it as below.")}`,
    "type: dataset",
    `title: ${yamlString(facts.title)}`,
    `version: ${yamlString(facts.lapsebankVersion)}`,
    `date-released: ${yamlString(facts.createdAtUtc.toISOString().slice(0, 10))}`,
    `abstract: ${yamlString(`${facts.query.summary}.`)}`,
    `license: ${yamlString(facts.licence.id)}`,
    "keywords:",
    ...["temperature sounding", "lapse rate", "tropopause"].map((k) => `  - ${yamlString(k)}`),
    "authors:",
    ...authors.map((a) => `  - name: ${yamlString(a.name)}`),
  ];
  return `${lines.join("\n")}\n`;
}

/** The README: what is inside, how to read it, where each number comes from. */
export function readmeText(facts: PackageFacts): string {
  const tables = facts.resources.map((r) => `- \`${r.path}\` (${r.rowCount} rows): ${r.table.description}`).join("\n");
  const params = Object.entries(facts.query.parameters).map(([k, v]) => `${k}=${v}`).join("&");
  return `# ${facts.title}

${facts.query.summary}.

Exported ${facts.createdAtUtc.toISOString()} from Lapsebank ${facts.lapsebankVersion} (${facts.programName}); ${facts.flightCount} flight${facts.flightCount === 1 ? "" : "s"}.
Licence: ${facts.licence.title} (${facts.licence.id}), ${facts.licence.path}.

## Files

${tables}
- \`datapackage.json\`: Frictionless Data Package descriptor: one Table Schema per table with types, units, descriptions,
  CF standard names, primary and foreign keys, and the query that produced this export (\`lapsebank.query\`).
- \`CITATION.cff\`: how to cite this dataset.${facts.includesRawFiles ? "\n- `raw/`: the raw logger files exactly as uploaded; `data/raw-files.csv` gives each file's SHA-256." : ""}

## Reading the tables

CSV, UTF-8, comma-separated, header row, CRLF line ends. Times are ISO 8601 UTC. Units are SI (temperatures in K,
altitudes in m above mean sea level, pressure in hPa, lapse rates in K/km); each column's unit is in datapackage.json.
A lapse rate is −dT/dz: positive when temperature falls with height. An empty cell is a missing value.
Numbers are written at full precision (shortest text that reads back to the stored double).
Text cells that begin with = + - @, a tab, a carriage return or ' carry one extra leading ' so that spreadsheets
do not run them as formulas; remove exactly one leading ' to get the stored text.

## Provenance

Every level, layer and summary comes from the flight's current analysis run (\`runs\` table): analysis version
${facts.analysisVersions.join(", ") || "(none)"}, the analysis parameters, the calibration and the logger layout exactly as applied,
and the raw file's SHA-256. Calibration records used: ${facts.calibrationIds.length}.
Selection: ${facts.query.source}${params ? ` (${params})` : ""}.

Derived stability and tropopause values are for research and teaching, not a weather forecast or a flight-safety decision.
`;
}
