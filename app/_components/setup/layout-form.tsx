"use client";

import { useEffect, useId, useRef, useState, type DragEvent, type FormEvent } from "react";
import { useRouter } from "next/navigation";
import type { LoggerLayoutSpec } from "@/lib/ingest/layout";
import type { LayoutPreview } from "@/lib/ingest/setup-more";
import { previewLayout, saveLayout, suggestLayoutFromSample } from "@/app/setup/actions";
import { ClockZoneField } from "./clock-zone-field";
import { Field, FieldErrorList, FormMessage } from "./form-bits";

type ColumnKey = keyof LoggerLayoutSpec["columns"];

const COLUMNS: Array<{ key: ColumnKey; label: string; required: boolean; option?: { name: "format" | "unit"; choices: Array<[string, string]> } }> = [
  { key: "time", label: "Time", required: true, option: { name: "format", choices: [["elapsed-seconds", "seconds since start"], ["clock-time", "clock time HH:MM:SS"], ["iso-datetime", "ISO date-time"]] } },
  { key: "altitude", label: "Altitude", required: false, option: { name: "unit", choices: [["m", "m"], ["ft", "ft"]] } },
  { key: "temperature", label: "Temperature", required: true, option: { name: "unit", choices: [["counts", "ADC counts"], ["V", "V"], ["mV", "mV"], ["degC", "°C"], ["K", "K"], ["degF", "°F"]] } },
  { key: "pressure", label: "Pressure", required: false, option: { name: "unit", choices: [["hPa", "hPa"], ["Pa", "Pa"], ["mbar", "mbar"]] } },
  { key: "humidity", label: "Relative humidity (%)", required: false },
  { key: "latitude", label: "Latitude (°)", required: false },
  { key: "longitude", label: "Longitude (°)", required: false },
];

type ColumnState = Record<ColumnKey, { column: string; option: string }>;

function columnsFrom(spec: LoggerLayoutSpec | null): ColumnState {
  const state = {} as ColumnState;
  for (const c of COLUMNS) {
    const mapping = spec?.columns[c.key] as { column: string | number; unit?: string; format?: string } | undefined;
    state[c.key] = { column: mapping ? String(mapping.column) : "", option: mapping?.format ?? mapping?.unit ?? c.option?.choices[0]?.[0] ?? "" };
  }
  return state;
}

function buildSpec(base: { name: string; delimiter: LoggerLayoutSpec["delimiter"]; hasHeader: boolean; commentPrefix: string; decimalSeparator: "." | "," }, columns: ColumnState, clockZone: string): LoggerLayoutSpec {
  const mapped: Record<string, unknown> = {};
  for (const c of COLUMNS) {
    const { column, option } = columns[c.key];
    const text = column.trim();
    if (text === "" && !c.required) continue;
    const ref = !base.hasHeader && /^\d+$/.test(text) ? Number(text) : text;
    mapped[c.key] = c.option ? { column: ref, [c.option.name]: option } : { column: ref };
    // Elapsed seconds have no clock, so no clock zone.
    if (c.key === "time" && option !== "elapsed-seconds") mapped[c.key] = { column: ref, format: option, clockZone };
  }
  return {
    name: base.name, delimiter: base.delimiter, hasHeader: base.hasHeader, decimalSeparator: base.decimalSeparator,
    commentPrefix: base.commentPrefix.trim() === "" ? null : base.commentPrefix.trim(),
    columns: mapped as LoggerLayoutSpec["columns"],
  };
}

const cell = (n: number | null, digits = 2) => (n === null ? "—" : Number(n.toFixed(digits)).toString());

/**
 * Logger layout editor with a live preview: drop a sample file and every change to the layout
 * re-reads its first 64 KB on the server, showing the rows read and each problem with line and column.
 */
export function LayoutForm({ initial, schools }: { initial: { id?: string; schoolId: string; spec: LoggerLayoutSpec | null }; schools: Array<{ id: string; name: string }> }) {
  const uid = useId();
  const router = useRouter();
  const [schoolId, setSchoolId] = useState(initial.schoolId);
  const [base, setBase] = useState({
    name: initial.spec?.name ?? "", delimiter: initial.spec?.delimiter ?? "comma", hasHeader: initial.spec?.hasHeader ?? true,
    commentPrefix: initial.spec?.commentPrefix ?? "", decimalSeparator: initial.spec?.decimalSeparator ?? ".",
  } as { name: string; delimiter: LoggerLayoutSpec["delimiter"]; hasHeader: boolean; commentPrefix: string; decimalSeparator: "." | "," });
  const [columns, setColumns] = useState<ColumnState>(() => columnsFrom(initial.spec));
  const [clockZone, setClockZone] = useState(initial.spec?.columns.time.clockZone ?? "utc");
  const [sample, setSample] = useState<File | null>(null);
  const [preview, setPreview] = useState<LayoutPreview | null>(null);
  const [previewError, setPreviewError] = useState<string | null>(null);
  const [previewing, setPreviewing] = useState(false);
  const [errors, setErrors] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [saved, setSaved] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [dragging, setDragging] = useState(false);
  const [notes, setNotes] = useState<string[]>([]);
  const request = useRef(0);
  const spec = buildSpec(base, columns, clockZone);
  const specKey = JSON.stringify(spec);

  useEffect(() => {
    if (!sample) return;
    const mine = ++request.current;
    const timer = setTimeout(async () => {
      setPreviewing(true);
      const form = new FormData();
      form.append("file", sample);
      form.append("spec", specKey);
      const result = await previewLayout(form);
      if (mine !== request.current) return;
      setPreviewing(false);
      if (result.ok) { setPreview(result.data); setPreviewError(null); }
      else {
        setPreview(null);
        const details = Object.entries(result.fieldErrors).map(([k, m]) => `${k}: ${m.join("; ")}`).join(" · ");
        setPreviewError(details ? `${result.message}: ${details}` : result.message);
      }
    }, 250);
    return () => clearTimeout(timer);
  }, [sample, specKey]);

  function onDrop(event: DragEvent<HTMLDivElement>) {
    event.preventDefault();
    setDragging(false);
    const file = event.dataTransfer.files[0];
    if (file) setSample(file);
  }

  async function fillFromSample() {
    if (!sample) return;
    const form = new FormData();
    form.append("file", sample);
    const result = await suggestLayoutFromSample(form);
    if (!result.ok) { setPreviewError(result.message); return; }
    const suggested = result.data.spec;
    setBase({ name: base.name || suggested.name, delimiter: suggested.delimiter, hasHeader: suggested.hasHeader, commentPrefix: suggested.commentPrefix ?? "", decimalSeparator: suggested.decimalSeparator });
    setColumns(columnsFrom(suggested));
    setClockZone(suggested.columns.time.clockZone ?? "utc");
    setNotes(result.data.notes);
  }

  async function submit(event: FormEvent) {
    event.preventDefault();
    setBusy(true);
    setSaved(null);
    const result = await saveLayout({ ...(initial.id ? { id: initial.id } : {}), schoolId, spec });
    setBusy(false);
    if (!result.ok) { setErrors(result.fieldErrors); setMessage(result.message); return; }
    setErrors({}); setMessage(null);
    if (result.data.affectedFlightCount > 0) {
      router.push(`/setup/reprocess?layout=${encodeURIComponent(result.data.id)}&reason=${encodeURIComponent(`logger layout ${spec.name} changed`)}`);
    } else if (initial.id) {
      setSaved("Layout saved. No flights use it yet.");
      router.refresh();
    } else {
      router.push(`/setup/layouts/${result.data.id}`);
    }
  }

  const headerNames = preview?.header ?? null;
  const listId = `${uid}-headers`;
  return (
    <form onSubmit={submit} aria-label={initial.id ? "Edit logger layout" : "New logger layout"}>
      <section className="panel">
        <h2>How to read the file</h2>
        <div className="form-grid">
          <Field id={`${uid}-school`} label="School" error={errors.schoolId}>
            <select id={`${uid}-school`} value={schoolId} onChange={(e) => setSchoolId(e.target.value)} disabled={Boolean(initial.id)}>
              <option value="">Choose…</option>
              {schools.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
            </select>
          </Field>
          <Field id={`${uid}-name`} label="Layout name" error={errors["spec.name"]}><input id={`${uid}-name`} type="text" value={base.name} onChange={(e) => setBase({ ...base, name: e.target.value })} /></Field>
          <Field id={`${uid}-delim`} label="Delimiter" error={errors["spec.delimiter"]}>
            <select id={`${uid}-delim`} value={base.delimiter} onChange={(e) => setBase({ ...base, delimiter: e.target.value as LoggerLayoutSpec["delimiter"] })}>
              <option value="comma">comma ,</option>
              <option value="semicolon">semicolon ;</option>
              <option value="tab">tab</option>
              <option value="whitespace">spaces or tabs</option>
            </select>
          </Field>
          <Field id={`${uid}-dec`} label="Decimal separator" error={errors["spec.decimalSeparator"]}>
            <select id={`${uid}-dec`} value={base.decimalSeparator} onChange={(e) => setBase({ ...base, decimalSeparator: e.target.value as "." | "," })}>
              <option value=".">point 1.5</option>
              <option value=",">comma 1,5</option>
            </select>
          </Field>
          <Field id={`${uid}-comment`} label="Comment lines start with" hint="empty: no comment lines" error={errors["spec.commentPrefix"]}>
            <input id={`${uid}-comment`} type="text" maxLength={3} value={base.commentPrefix} onChange={(e) => setBase({ ...base, commentPrefix: e.target.value })} />
          </Field>
          <div className="field">
            <span className="label">Header row</span>
            <label><input type="checkbox" checked={base.hasHeader} onChange={(e) => setBase({ ...base, hasHeader: e.target.checked })} /> The first row names the columns</label>
          </div>
        </div>
        {headerNames && <datalist id={listId}>{headerNames.map((h) => <option key={h} value={h} />)}</datalist>}
        <div className="table-wrap" role="region" aria-label="Column mapping" tabIndex={0}>
          <table>
            <caption>Columns by header text, or numbered from 1 when there is no header row. Map altitude or pressure (or both).</caption>
            <thead><tr><th scope="col">Quantity</th><th scope="col">Column</th><th scope="col">Unit or format</th></tr></thead>
            <tbody>
              {COLUMNS.map((c) => {
                const state = columns[c.key];
                const inputId = `${uid}-col-${c.key}`;
                const columnErrors = Object.entries(errors).filter(([k]) => k.startsWith(`spec.columns.${c.key}`)).flatMap(([, m]) => m);
                return (
                  <tr key={c.key}>
                    <th scope="row"><label htmlFor={inputId}>{c.label}{c.required ? " (required)" : ""}</label></th>
                    <td>
                      <input id={inputId} type="text" list={headerNames ? listId : undefined} value={state.column} onChange={(e) => setColumns({ ...columns, [c.key]: { ...state, column: e.target.value } })} />
                      {columnErrors.length > 0 && <span className="field-error">{columnErrors.join("; ")}</span>}
                    </td>
                    <td>
                      {c.option ? (
                        <select aria-label={`${c.label} ${c.option.name}`} value={state.option} onChange={(e) => setColumns({ ...columns, [c.key]: { ...state, option: e.target.value } })}>
                          {c.option.choices.map(([value, label]) => <option key={value} value={value}>{label}</option>)}
                        </select>
                      ) : <span className="muted">—</span>}
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
      </section>

      <section className="panel" aria-labelledby={`${uid}-preview`}>
        <h2 id={`${uid}-preview`}>Live preview</h2>
        <div
          className={dragging ? "inline-editor setup-drop setup-drop-active" : "inline-editor setup-drop"}
          onDragOver={(e) => { e.preventDefault(); setDragging(true); }}
          onDragLeave={() => setDragging(false)}
          onDrop={onDrop}
        >
          <label htmlFor={`${uid}-sample`}>Drop a sample logger file here, or choose one</label>{" "}
          <input id={`${uid}-sample`} type="file" onChange={(e) => setSample(e.target.files?.[0] ?? null)} />
          <p className="small muted">Only the first 64 KB are read; nothing is stored.</p>
          {sample && <p className="actions"><button type="button" className="button-secondary" onClick={fillFromSample}>Fill in the layout from this sample</button></p>}
          {notes.length > 0 && <ul className="small">{notes.map((n) => <li key={n}>{n}</li>)}</ul>}
        </div>
        <div role="status" aria-live="polite" className="small">
          {sample ? (previewing ? `Reading ${sample.name}…` : preview ? (preview.issues.length ? `${preview.fileName}: not readable with this layout.` : `${preview.fileName}: ${preview.dataRowCount} data rows read${preview.partial ? " from the first 64 KB" : ""}, ${preview.skipped.length} row(s) not readable.`) : "") : "No sample file yet."}
        </div>
        {previewError && <p className="notice notice-warn">{previewError}</p>}
        {preview && preview.issues.length > 0 && (
          <div className="notice notice-error" role="alert">
            <strong>This layout cannot read the file:</strong>
            <ul>{preview.issues.map((issue, i) => <li key={i}>{issue.line !== null ? `line ${issue.line}` : "file"}{issue.column !== null ? `, column ${issue.column}` : ""}{issue.columnName ? ` (${issue.columnName})` : ""}: {issue.message}</li>)}</ul>
          </div>
        )}
        {preview && preview.skipped.length > 0 && (
          <div className="notice notice-warn">
            <strong>Rows the layout cannot read:</strong>
            <ul>{preview.skipped.map((issue, i) => <li key={i}>line {issue.line ?? "?"}{issue.column !== null ? `, column ${issue.column}` : ""}{issue.columnName ? ` (${issue.columnName})` : ""}: {issue.message}</li>)}</ul>
          </div>
        )}
        {preview && preview.rows.length > 0 && (
          <div className="table-wrap" role="region" aria-label="Preview rows" tabIndex={0}>
            <table>
              <caption>First rows as the layout reads them (raw temperature in the column&apos;s unit, before calibration)</caption>
              <thead>
                <tr><th scope="col" className="num">Line</th><th scope="col" className="num">Time (s)</th><th scope="col" className="num">Altitude (m)</th><th scope="col" className="num">Raw temperature</th><th scope="col" className="num">Pressure (hPa)</th><th scope="col" className="num">RH (%)</th><th scope="col" className="num">Lat (°)</th><th scope="col" className="num">Lon (°)</th></tr>
              </thead>
              <tbody>
                {preview.rows.map((r) => (
                  <tr key={r.line}>
                    <td className="num">{r.line}</td><td className="num">{cell(r.elapsedS, 1)}</td><td className="num">{cell(r.altitudeM, 1)}</td><td className="num">{cell(r.rawTemperature, 4)}</td>
                    <td className="num">{cell(r.pressureHpa, 1)}</td><td className="num">{cell(r.relativeHumidityPct, 1)}</td><td className="num">{cell(r.latitudeDeg, 5)}</td><td className="num">{cell(r.longitudeDeg, 5)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </section>

      <FormMessage error={message} ok={saved} />
      <FieldErrorList errors={Object.fromEntries(Object.entries(errors).filter(([k]) => !k.startsWith("spec.columns.") && k !== "spec.name"))} />
      <p className="actions"><button type="submit" disabled={busy}>{busy ? "Saving…" : initial.id ? "Save layout" : "Create layout"}</button></p>
    </form>
  );
}
