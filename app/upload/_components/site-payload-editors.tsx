"use client";

import { useId, useState, type KeyboardEvent } from "react";
import type { UploadChoices } from "@/lib/query/setup";
import { createPayloadFromForm, createSiteFromForm } from "../actions";

type Site = UploadChoices["sites"][number];
type Payload = UploadChoices["payloads"][number];

/** Enter inside an inline editor saves the editor instead of submitting the surrounding upload form. */
export function saveOnEnter(save: () => void) {
  return (event: KeyboardEvent<HTMLElement>) => {
    if (event.key === "Enter" && event.target instanceof HTMLInputElement) {
      event.preventDefault();
      save();
    }
  };
}

export function FieldErrors({ errors }: { errors: Record<string, string[]> }) {
  const entries = Object.entries(errors);
  if (entries.length === 0) return null;
  return (
    <ul className="issue-list field-error" role="alert">
      {entries.map(([key, messages]) => <li key={key}><strong>{key}</strong>: {messages.join("; ")}</li>)}
    </ul>
  );
}

export function SiteEditor({ schoolId, onSaved, onCancel }: { schoolId: string; onSaved: (site: Site) => void; onCancel: () => void }) {
  const uid = useId();
  const [values, setValues] = useState({ name: "", latitudeDeg: "", longitudeDeg: "", elevationM: "", timeZone: Intl.DateTimeFormat().resolvedOptions().timeZone });
  const [errors, setErrors] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [saving, setSaving] = useState(false);
  const set = (key: keyof typeof values) => (e: { target: { value: string } }) => setValues((v) => ({ ...v, [key]: e.target.value }));

  async function save() {
    setSaving(true);
    const form = new FormData();
    form.append("schoolId", schoolId);
    for (const [k, v] of Object.entries(values)) form.append(k, v);
    const result = await createSiteFromForm(form);
    setSaving(false);
    if (result.ok) onSaved(result.data);
    else { setErrors(result.fieldErrors); setMessage(result.message); }
  }

  return (
    <div className="inline-editor" role="group" aria-labelledby={`${uid}-t`} onKeyDown={saveOnEnter(save)}>
      <h3 id={`${uid}-t`}>New launch site</h3>
      {message && <p className="field-error">{message}</p>}
      <FieldErrors errors={errors} />
      <div className="form-grid">
        <div className="field"><label htmlFor={`${uid}-n`}>Name</label><input id={`${uid}-n`} type="text" value={values.name} onChange={set("name")} /></div>
        <div className="field"><label htmlFor={`${uid}-la`}>Latitude (°N, −90 to 90)</label><input id={`${uid}-la`} type="number" step="any" value={values.latitudeDeg} onChange={set("latitudeDeg")} /></div>
        <div className="field"><label htmlFor={`${uid}-lo`}>Longitude (°E, −180 to 180)</label><input id={`${uid}-lo`} type="number" step="any" value={values.longitudeDeg} onChange={set("longitudeDeg")} /></div>
        <div className="field"><label htmlFor={`${uid}-e`}>Elevation (m above sea level)</label><input id={`${uid}-e`} type="number" step="any" value={values.elevationM} onChange={set("elevationM")} /></div>
        <div className="field"><label htmlFor={`${uid}-tz`}>Time zone (IANA name)</label><input id={`${uid}-tz`} type="text" value={values.timeZone} onChange={set("timeZone")} /></div>
      </div>
      <div className="actions" style={{ marginTop: "0.6rem" }}>
        <button type="button" onClick={save} disabled={saving}>{saving ? "Saving…" : "Save site"}</button>
        <button type="button" className="button-secondary" onClick={onCancel}>Cancel</button>
      </div>
    </div>
  );
}

export function PayloadEditor({ schoolId, onSaved, onCancel }: { schoolId: string; onSaved: (payload: Payload) => void; onCancel: () => void }) {
  const uid = useId();
  const [name, setName] = useState("");
  const [notes, setNotes] = useState("");
  const [errors, setErrors] = useState<Record<string, string[]>>({});
  const [saving, setSaving] = useState(false);

  async function save() {
    setSaving(true);
    const form = new FormData();
    form.append("schoolId", schoolId);
    form.append("name", name);
    form.append("notes", notes);
    const result = await createPayloadFromForm(form);
    setSaving(false);
    if (result.ok) onSaved(result.data);
    else setErrors(result.fieldErrors);
  }

  return (
    <div className="inline-editor" role="group" aria-labelledby={`${uid}-t`} onKeyDown={saveOnEnter(save)}>
      <h3 id={`${uid}-t`}>New payload</h3>
      <FieldErrors errors={errors} />
      <div className="form-grid">
        <div className="field"><label htmlFor={`${uid}-n`}>Name</label><input id={`${uid}-n`} type="text" value={name} onChange={(e) => setName(e.target.value)} /></div>
        <div className="field field-wide"><label htmlFor={`${uid}-no`}>Notes</label><input id={`${uid}-no`} type="text" value={notes} onChange={(e) => setNotes(e.target.value)} /></div>
      </div>
      <div className="actions" style={{ marginTop: "0.6rem" }}>
        <button type="button" onClick={save} disabled={saving}>{saving ? "Saving…" : "Save payload"}</button>
        <button type="button" className="button-secondary" onClick={onCancel}>Cancel</button>
      </div>
    </div>
  );
}
