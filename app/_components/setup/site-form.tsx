"use client";

import { useId, useState, type FormEvent } from "react";
import { useRouter } from "next/navigation";
import { saveSite } from "@/app/setup/actions";
import { Field, FieldErrorList, FormMessage, numberFrom } from "./form-bits";

export interface SiteFormValues {
  id?: string;
  schoolId: string;
  name: string;
  latitudeDeg: number | null;
  longitudeDeg: number | null;
  elevationM: number | null;
  timeZone: string;
}

/**
 * Create or correct a launch site; latitude, longitude, elevation and IANA zone are checked on the server.
 * A correction that changes what flights were analysed with goes on to the re-analysis page.
 */
export function SiteForm({ initial, schools }: { initial: SiteFormValues; schools: Array<{ id: string; name: string }> }) {
  const uid = useId();
  const router = useRouter();
  const text = (n: number | null) => (n === null ? "" : String(n));
  const [v, setV] = useState({ schoolId: initial.schoolId, name: initial.name, latitudeDeg: text(initial.latitudeDeg), longitudeDeg: text(initial.longitudeDeg), elevationM: text(initial.elevationM), timeZone: initial.timeZone });
  const [errors, setErrors] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [saved, setSaved] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const set = (key: keyof typeof v) => (e: { target: { value: string } }) => setV((old) => ({ ...old, [key]: e.target.value }));

  async function submit(event: FormEvent) {
    event.preventDefault();
    setBusy(true);
    setSaved(null);
    const result = await saveSite({
      ...(initial.id ? { id: initial.id } : {}), schoolId: v.schoolId, name: v.name, timeZone: v.timeZone,
      latitudeDeg: numberFrom(v.latitudeDeg), longitudeDeg: numberFrom(v.longitudeDeg), elevationM: numberFrom(v.elevationM),
    });
    setBusy(false);
    if (!result.ok) { setErrors(result.fieldErrors); setMessage(result.message); return; }
    setErrors({}); setMessage(null);
    if (initial.id && result.data.affectedFlightCount > 0) {
      router.push(`/setup/reprocess?site=${encodeURIComponent(result.data.id)}&reason=${encodeURIComponent(`site ${v.name.trim()} corrected`)}`);
    } else if (initial.id) { setSaved("Site saved. No flight was analysed with other values, so none needs re-analysis."); router.refresh(); }
    else router.push(`/setup/sites/${result.data.id}?saved=1`);
  }

  return (
    <form onSubmit={submit} aria-label={initial.id ? "Edit site" : "New site"}>
      <div className="form-grid">
        <Field id={`${uid}-school`} label="School" error={errors.schoolId}>
          <select id={`${uid}-school`} value={v.schoolId} onChange={set("schoolId")} disabled={Boolean(initial.id)}>
            <option value="">Choose…</option>
            {schools.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
          </select>
        </Field>
        <Field id={`${uid}-name`} label="Site name" error={errors.name}><input id={`${uid}-name`} type="text" value={v.name} onChange={set("name")} /></Field>
        <Field id={`${uid}-lat`} label="Latitude (°, north positive)" hint="−90 to 90" error={errors.latitudeDeg}><input id={`${uid}-lat`} type="number" step="any" value={v.latitudeDeg} onChange={set("latitudeDeg")} /></Field>
        <Field id={`${uid}-lon`} label="Longitude (°, east positive)" hint="−180 to 180" error={errors.longitudeDeg}><input id={`${uid}-lon`} type="number" step="any" value={v.longitudeDeg} onChange={set("longitudeDeg")} /></Field>
        <Field id={`${uid}-elev`} label="Elevation (m above sea level)" error={errors.elevationM}><input id={`${uid}-elev`} type="number" step="any" value={v.elevationM} onChange={set("elevationM")} /></Field>
        <Field id={`${uid}-tz`} label="Time zone (IANA name)" hint="e.g. Europe/Berlin, America/Denver" error={errors.timeZone}><input id={`${uid}-tz`} type="text" value={v.timeZone} onChange={set("timeZone")} /></Field>
      </div>
      <FormMessage error={message} ok={saved} />
      <FieldErrorList errors={Object.fromEntries(Object.entries(errors).filter(([k]) => !(k in v)))} />
      <p className="actions"><button type="submit" disabled={busy}>{busy ? "Saving…" : initial.id ? "Save site" : "Create site"}</button></p>
    </form>
  );
}
