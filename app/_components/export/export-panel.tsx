"use client";

import { useId, useState } from "react";
import { LICENCES, type ExportSource } from "@/lib/export/request";

const TABLE_CHOICES: Array<{ value: string; label: string; climatologyOnly?: boolean }> = [
  { value: "flights", label: "Flight summaries" },
  { value: "layers", label: "Layer statistics" },
  { value: "levels", label: "Binned levels" },
  { value: "runs", label: "Analysis runs (provenance)" },
  { value: "calibrations", label: "Calibrations used" },
  { value: "query-values", label: "Query values per flight", climatologyOnly: true },
];

export interface ExportPanelProps {
  source: ExportSource;
  /** The source page's own parameters (Archive filter or Climatology query), sent unchanged. */
  query?: Record<string, string>;
  /** For a single flight's page. */
  flightId?: string;
  /** How many flights the export will hold, when the page knows. */
  flightCount?: number;
}

/**
 * The Export panel: format (CSV table, JSON, zip data package, NetCDF-4/CF), raw files, licence and title.
 * A plain GET form to /api/v1/export, so the browser downloads the streamed file itself.
 */
export function ExportPanel({ source, query = {}, flightId, flightCount }: ExportPanelProps) {
  const [format, setFormat] = useState<"package" | "csv" | "json" | "netcdf">("package");
  const id = useId();
  const hidden = Object.entries(query).filter(([key]) => !["source", "format", "table", "raw", "licence", "title", "flight", "page", "pageSize", "sort"].includes(key));
  return (
    <section className="export-panel" aria-labelledby={`${id}-heading`}>
      <h2 id={`${id}-heading`}>Export</h2>
      <p className="muted">
        Download {flightCount === undefined ? "these flights" : `${flightCount} flight${flightCount === 1 ? "" : "s"}`} as a dataset
        a reviewer can read without Lapsebank: SI units, UTC times, full-precision numbers, and a data dictionary in the data package.
      </p>
      <form method="get" action="/api/v1/export" className="export-form">
        <input type="hidden" name="source" value={source} />
        {flightId && <input type="hidden" name="flight" value={flightId} />}
        {hidden.map(([key, value]) => <input key={key} type="hidden" name={key} value={value} />)}
        <fieldset>
          <legend>Format</legend>
          <label>
            <input type="radio" name="format" value="package" checked={format === "package"} onChange={() => setFormat("package")} /> Data package (zip: every table, datapackage.json, CITATION.cff, README)
          </label>
          <label>
            <input type="radio" name="format" value="csv" checked={format === "csv"} onChange={() => setFormat("csv")} /> One CSV table
          </label>
          <label>
            <input type="radio" name="format" value="json" checked={format === "json"} onChange={() => setFormat("json")} /> JSON (every table and its data dictionary)
          </label>
          <label>
            <input type="radio" name="format" value="netcdf" checked={format === "netcdf"} onChange={() => setFormat("netcdf")} /> NetCDF-4 (CF profiles: one per flight, its ascent levels and summary; opens in netCDF tools)
          </label>
        </fieldset>
        {format === "csv" && (
          <label>
            Table{" "}
            <select name="table" defaultValue="flights">
              {TABLE_CHOICES.filter((t) => !t.climatologyOnly || source === "climatology").map((t) => <option key={t.value} value={t.value}>{t.label}</option>)}
            </select>
          </label>
        )}
        {format === "package" && (
          <label>
            <input type="checkbox" name="raw" value="yes" /> Include the raw logger files
          </label>
        )}
        <label>
          Licence{" "}
          <select name="licence" defaultValue="CC-BY-4.0">
            {LICENCES.map((l) => <option key={l.id} value={l.id}>{l.title} ({l.id})</option>)}
          </select>
        </label>
        <label>
          Title (optional){" "}
          <input type="text" name="title" maxLength={200} placeholder="Dataset title for the citation" />
        </label>
        <p className="actions">
          <button type="submit" className="button">Download export</button>
        </p>
      </form>
    </section>
  );
}
