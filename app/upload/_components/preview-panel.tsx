"use client";

import type { LoggerLayoutSpec } from "@/lib/ingest/layout";
import { IssueList } from "@/app/_components/issue-list";
import type { PreviewResult, PreviewRow } from "../actions";

const COLUMNS: Array<{ key: keyof PreviewRow; label: string; digits: number }> = [
  { key: "line", label: "Line", digits: 0 },
  { key: "elapsedS", label: "Time since first row (s)", digits: 1 },
  { key: "altitudeM", label: "Altitude (m)", digits: 1 },
  { key: "rawTemperature", label: "Temperature column (as read)", digits: 3 },
  { key: "pressureHpa", label: "Pressure (hPa)", digits: 1 },
  { key: "relativeHumidityPct", label: "Humidity (%)", digits: 1 },
  { key: "latitudeDeg", label: "Latitude (°)", digits: 5 },
  { key: "longitudeDeg", label: "Longitude (°)", digits: 5 },
];

function cell(value: number | null, digits: number): string {
  return value === null ? "—" : value.toFixed(digits);
}

/** What the chosen layout reads from the start of the chosen file, or why it cannot, plus a suggested layout. */
export function PreviewPanel({
  fileName, loading, error, result, layoutName, launchTimeGiven, onUseSuggestion,
}: {
  fileName: string;
  loading: boolean;
  error: string | null;
  result: PreviewResult | null;
  layoutName: string | null;
  launchTimeGiven: boolean;
  onUseSuggestion: (spec: LoggerLayoutSpec) => void;
}) {
  const suggestion = result?.suggestion ?? null;
  const parsed = result?.parsed ?? null;
  const shownColumns = parsed ? COLUMNS.filter((c) => parsed.rows.some((r) => r[c.key] !== null)) : [];
  return (
    <section aria-labelledby="preview-title" aria-busy={loading} style={{ marginTop: "1rem" }}>
      <h3 id="preview-title">Preview of {fileName}{layoutName ? ` with “${layoutName}”` : ""}</h3>
      {loading && <p className="muted" role="status">Reading the first rows…</p>}
      {error && <p className="notice notice-error" role="alert">{error}</p>}
      {result && !loading && (
        <>
          {result.partial && <p className="small muted">Only the first 64 KB are previewed; the whole file is checked on upload.</p>}
          {!layoutName && <p className="notice notice-warn">Choose a logger layout to see how this file will be read, or start a new layout from the suggestion below.</p>}
          {result.issues.length > 0 && (
            <div className="notice notice-error" role="alert">
              <strong>This layout cannot read the file:</strong>
              <IssueList issues={result.issues} />
            </div>
          )}
          {parsed && (
            <>
              {result.needsLaunchTime && !launchTimeGiven && (
                <p className="notice notice-warn">This file&apos;s time column has no date: enter the launch time (UTC) above before uploading.</p>
              )}
              {parsed.firstRowUtc && <p className="small">The file carries dates; its first row is at {parsed.firstRowUtc.replace("T", " ").slice(0, 19)} UTC, and the launch time will be read from the file.</p>}
              {parsed.skipped.length > 0 && (
                <div className="notice notice-warn">
                  <strong>{parsed.skipped.length} row{parsed.skipped.length === 1 ? "" : "s"} in the preview could not be read.</strong> Strict mode refuses the file; lenient mode skips them and records how many.
                  <IssueList issues={parsed.skipped} limit={8} />
                </div>
              )}
              {parsed.rows.length > 0 ? (
                <div className="table-wrap" role="region" aria-label="Parsed rows" tabIndex={0}>
                  <table>
                    <caption>First {parsed.rows.length} rows as the layout reads them (altitude in m and pressure in hPa after unit conversion; temperature still raw)</caption>
                    <thead><tr>{shownColumns.map((c) => <th key={c.key} scope="col" className="num">{c.label}</th>)}</tr></thead>
                    <tbody>
                      {parsed.rows.map((row) => (
                        <tr key={row.line}>{shownColumns.map((c) => <td key={c.key} className="num">{cell(row[c.key], c.digits)}</td>)}</tr>
                      ))}
                    </tbody>
                  </table>
                </div>
              ) : (
                <p className="notice notice-warn">No data rows were read.</p>
              )}
            </>
          )}
          {suggestion && (!parsed || result.issues.length > 0 || !layoutName) && (
            <div className="inline-editor">
              <h4 style={{ margin: "0 0 0.4rem" }}>Suggested layout</h4>
              <ul className="small">{suggestion.notes.map((n) => <li key={n}>{n}</li>)}</ul>
              {suggestion.previewRows.length > 0 && (
                <div className="table-wrap" role="region" aria-label="Raw fields" tabIndex={0}>
                  <table>
                    <caption>First rows split into fields</caption>
                    {suggestion.previewHeader && (
                      <thead><tr>{suggestion.previewHeader.map((h, i) => <th key={`${i}-${h}`} scope="col">{i + 1}: {h}</th>)}</tr></thead>
                    )}
                    <tbody>
                      {suggestion.previewRows.slice(0, 6).map((r, i) => <tr key={i}>{r.map((f, j) => <td key={j}>{f}</td>)}</tr>)}
                    </tbody>
                  </table>
                </div>
              )}
              <button type="button" onClick={() => onUseSuggestion(suggestion.spec)}>Start a new layout from this suggestion</button>
            </div>
          )}
        </>
      )}
    </section>
  );
}
