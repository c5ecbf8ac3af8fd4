"use client";

import { useId, useState } from "react";
import type { UploadChoices } from "@/lib/query/setup";
import type { LoggerLayoutSpec } from "@/lib/ingest/layout";
import { saveLoggerLayout } from "../actions";
import { ClockZoneField } from "@/app/_components/setup/clock-zone-field";
import { FieldErrors, saveOnEnter } from "./site-payload-editors";

type Layout = UploadChoices["layouts"][number];
type ColumnKey = keyof LoggerLayoutSpec["columns"];

interface ColumnField {
  key: ColumnKey;
  label: string;
  required: boolean;
  optionLabel?: string;
  options?: Array<[string, string]>;
}

const COLUMN_FIELDS: ColumnField[] = [
  { key: "time", label: "Time", required: true, optionLabel: "Format", options: [["elapsed-seconds", "seconds since start"], ["clock-time", "clock time HH:MM:SS"], ["iso-datetime", "ISO date-time"]] },
  { key: "altitude", label: "Altitude", required: false, optionLabel: "Unit", options: [["m", "m"], ["ft", "ft"]] },
  { key: "temperature", label: "Temperature", required: true, optionLabel: "Unit", options: [["counts", "raw ADC counts"], ["V", "V"], ["mV", "mV"], ["degC", "°C"], ["K", "K"], ["degF", "°F"]] },
  { key: "pressure", label: "Pressure", required: false, optionLabel: "Unit", options: [["hPa", "hPa"], ["Pa", "Pa"], ["mbar", "mbar"]] },
  { key: "humidity", label: "Relative humidity (%)", required: false },
  { key: "latitude", label: "Latitude (°)", required: false },
  { key: "longitude", label: "Longitude (°)", required: false },
];

const DEFAULT_OPTION: Partial<Record<ColumnKey, string>> = { time: "elapsed-seconds", altitude: "m", temperature: "counts", pressure: "hPa" };

type ColumnState = Record<ColumnKey, { column: string; option: string }>;

function initialColumns(spec: LoggerLayoutSpec | null): ColumnState {
  const state = {} as ColumnState;
  for (const field of COLUMN_FIELDS) {
    const mapping = spec?.columns[field.key] as { column: string | number; unit?: string; format?: string } | undefined;
    state[field.key] = { column: mapping ? String(mapping.column) : "", option: mapping?.unit ?? mapping?.format ?? DEFAULT_OPTION[field.key] ?? "" };
  }
  return state;
}

/** Builds a layout spec from the editor's text fields; the server validates it with the shared schema. */
function buildSpec(base: { name: string; delimiter: LoggerLayoutSpec["delimiter"]; hasHeader: boolean; commentPrefix: string; decimalSeparator: "." | "," }, columns: ColumnState, clockZone: string): LoggerLayoutSpec {
  const ref = (text: string): string | number => {
    const trimmed = text.trim();
    return !base.hasHeader && /^\d+$/.test(trimmed) ? Number(trimmed) : trimmed;
  };
  const mapped: Record<string, unknown> = {};
  for (const field of COLUMN_FIELDS) {
    const { column, option } = columns[field.key];
    if (column.trim() === "" && !field.required) continue;
    const entry: Record<string, unknown> = { column: ref(column) };
    if (field.key === "time") {
      entry.format = option;
      // Elapsed seconds have no clock, so no clock zone.
      if (option !== "elapsed-seconds") entry.clockZone = clockZone;
    }
    else if (field.options) entry.unit = option;
    mapped[field.key] = entry;
  }
  return {
    name: base.name,
    delimiter: base.delimiter,
    hasHeader: base.hasHeader,
    commentPrefix: base.commentPrefix.trim() === "" ? null : base.commentPrefix.trim(),
    decimalSeparator: base.decimalSeparator,
    columns: mapped as LoggerLayoutSpec["columns"],
  };
}

/** Inline editor for a new logger layout, usually started from the suggested layout. */
export function LayoutEditor({
  schoolId, initialSpec, headerNames, onSaved, onCancel,
}: {
  schoolId: string;
  initialSpec: LoggerLayoutSpec | null;
  headerNames: string[] | null;
  onSaved: (layout: Layout) => void;
  onCancel: () => void;
}) {
  const uid = useId();
  const [base, setBase] = useState({
    name: initialSpec?.name ?? "New layout",
    delimiter: initialSpec?.delimiter ?? "comma",
    hasHeader: initialSpec?.hasHeader ?? true,
    commentPrefix: initialSpec?.commentPrefix ?? "",
    decimalSeparator: initialSpec?.decimalSeparator ?? ".",
  });
  const [columns, setColumns] = useState<ColumnState>(() => initialColumns(initialSpec));
  const [clockZone, setClockZone] = useState(initialSpec?.columns.time.clockZone ?? "utc");
  const [errors, setErrors] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [saving, setSaving] = useState(false);
  const listId = `${uid}-headers`;

  async function save() {
    setSaving(true);
    const result = await saveLoggerLayout({ schoolId, spec: buildSpec(base, columns, clockZone) });
    setSaving(false);
    if (result.ok) onSaved(result.data);
    else { setErrors(result.fieldErrors); setMessage(result.message); }
  }

  return (
    <div className="inline-editor" role="group" aria-labelledby={`${uid}-t`} onKeyDown={saveOnEnter(save)}>
      <h3 id={`${uid}-t`}>New logger layout</h3>
      <p className="small muted">How to read this logger&apos;s files. Columns are named by their header text, or numbered from 1 when the file has no header row.</p>
      {message && <p className="field-error">{message}</p>}
      <FieldErrors errors={errors} />
      <div className="form-grid">
        <div className="field"><label htmlFor={`${uid}-n`}>Layout name</label><input id={`${uid}-n`} type="text" value={base.name} onChange={(e) => setBase({ ...base, name: e.target.value })} /></div>
        <div className="field">
          <label htmlFor={`${uid}-d`}>Delimiter</label>
          <select id={`${uid}-d`} value={base.delimiter} onChange={(e) => setBase({ ...base, delimiter: e.target.value as LoggerLayoutSpec["delimiter"] })}>
            <option value="comma">comma ,</option>
            <option value="semicolon">semicolon ;</option>
            <option value="tab">tab</option>
            <option value="whitespace">spaces or tabs</option>
          </select>
        </div>
        <div className="field">
          <span className="label">Header row</span>
          <label><input type="checkbox" checked={base.hasHeader} onChange={(e) => setBase({ ...base, hasHeader: e.target.checked })} /> The first row names the columns</label>
        </div>
        <div className="field">
          <label htmlFor={`${uid}-c`}>Comment lines start with</label>
          <input id={`${uid}-c`} type="text" maxLength={3} value={base.commentPrefix} onChange={(e) => setBase({ ...base, commentPrefix: e.target.value })} placeholder="none" />
        </div>
        <div className="field">
          <label htmlFor={`${uid}-s`}>Decimal separator</label>
          <select id={`${uid}-s`} value={base.decimalSeparator} onChange={(e) => setBase({ ...base, decimalSeparator: e.target.value as "." | "," })}>
            <option value=".">point 1.5</option>
            <option value=",">comma 1,5</option>
          </select>
        </div>
      </div>
      {headerNames && (
        <datalist id={listId}>
          {headerNames.map((h) => <option key={h} value={h} />)}
        </datalist>
      )}
      <div className="table-wrap" role="region" aria-label="Column mapping" tabIndex={0}>
        <table>
          <caption>Column mapping (leave optional columns empty when the file does not have them; map altitude or pressure, or both)</caption>
          <thead><tr><th scope="col">Quantity</th><th scope="col">Column (header text or number)</th><th scope="col">Unit or format</th></tr></thead>
          <tbody>
            {COLUMN_FIELDS.map((field) => {
              const state = columns[field.key];
              const inputId = `${uid}-col-${field.key}`;
              return (
                <tr key={field.key}>
                  <th scope="row"><label htmlFor={inputId}>{field.label}{field.required ? " (required)" : ""}</label></th>
                  <td>
                    <input
                      id={inputId}
                      type="text"
                      list={headerNames ? listId : undefined}
                      value={state.column}
                      onChange={(e) => setColumns({ ...columns, [field.key]: { ...state, column: e.target.value } })}
                    />
                  </td>
                  <td>
                    {field.options ? (
                      <select
                        aria-label={`${field.label} ${field.optionLabel ?? ""}`}
                        value={state.option}
                        onChange={(e) => setColumns({ ...columns, [field.key]: { ...state, option: e.target.value } })}
                      >
                        {field.options.map(([value, label]) => <option key={value} value={value}>{label}</option>)}
                      </select>
                    ) : (
                      <span className="muted">—</span>
                    )}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      {columns.time.option !== "elapsed-seconds" && (
        <ClockZoneField id={`${uid}-clock-zone`} value={clockZone} onChange={setClockZone} error={errors["spec.columns.time.clockZone"]} />
      )}
      <div className="actions">
        <button type="button" onClick={save} disabled={saving}>{saving ? "Saving…" : "Save layout"}</button>
        <button type="button" className="button-secondary" onClick={onCancel}>Cancel</button>
      </div>
    </div>
  );
}
