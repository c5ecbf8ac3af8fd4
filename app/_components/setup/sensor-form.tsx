"use client";

import { useId, useState, type FormEvent } from "react";
import { useRouter } from "next/navigation";
import { addSensorMount, saveSensor } from "@/app/setup/actions";
import { Field, FormMessage, numberFrom } from "./form-bits";

export interface SensorFormValues {
  id?: string;
  schoolId: string;
  serial: string;
  kind: string;
  timeConstantS: number;
  notes: string;
}

/** Create or describe a temperature sensor: serial, kind, time constant (s), notes. */
export function SensorForm({ initial, schools }: { initial: SensorFormValues; schools: Array<{ id: string; name: string }> }) {
  const uid = useId();
  const router = useRouter();
  const [v, setV] = useState({ schoolId: initial.schoolId, serial: initial.serial, kind: initial.kind, timeConstantS: String(initial.timeConstantS), notes: initial.notes });
  const [errors, setErrors] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [saved, setSaved] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const set = (key: keyof typeof v) => (e: { target: { value: string } }) => setV((old) => ({ ...old, [key]: e.target.value }));

  async function submit(event: FormEvent) {
    event.preventDefault();
    setBusy(true);
    setSaved(null);
    const result = await saveSensor({ ...(initial.id ? { id: initial.id } : {}), schoolId: v.schoolId, serial: v.serial, kind: v.kind, timeConstantS: numberFrom(v.timeConstantS), notes: v.notes });
    setBusy(false);
    if (!result.ok) { setErrors(result.fieldErrors); setMessage(result.message); return; }
    setErrors({}); setMessage(null);
    if (initial.id) { setSaved("Sensor saved."); router.refresh(); }
    else router.push(`/setup/sensors/${result.data.id}`);
  }

  return (
    <form onSubmit={submit} aria-label={initial.id ? "Edit sensor" : "New sensor"}>
      <div className="form-grid">
        <Field id={`${uid}-school`} label="School" error={errors.schoolId}>
          <select id={`${uid}-school`} value={v.schoolId} onChange={set("schoolId")} disabled={Boolean(initial.id)}>
            <option value="">Choose…</option>
            {schools.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
          </select>
        </Field>
        <Field id={`${uid}-serial`} label="Serial" error={errors.serial}><input id={`${uid}-serial`} type="text" value={v.serial} onChange={set("serial")} /></Field>
        <Field id={`${uid}-kind`} label="Kind" hint="e.g. 10 mV/K voltage sensor, 10 kΩ NTC bead" error={errors.kind}><input id={`${uid}-kind`} type="text" value={v.kind} onChange={set("kind")} /></Field>
        <Field id={`${uid}-tau`} label="Time constant (s)" hint="0 when unknown; used by the lag correction" error={errors.timeConstantS}><input id={`${uid}-tau`} type="number" step="any" min="0" value={v.timeConstantS} onChange={set("timeConstantS")} /></Field>
        <Field id={`${uid}-notes`} label="Notes" wide error={errors.notes}><textarea id={`${uid}-notes`} value={v.notes} onChange={set("notes")} /></Field>
      </div>
      <FormMessage error={message} ok={saved} />
      <p className="actions"><button type="submit" disabled={busy}>{busy ? "Saving…" : initial.id ? "Save sensor" : "Create sensor"}</button></p>
    </form>
  );
}

/** Records that the sensor went into a payload on a date (an earlier open mount ends that day). */
export function MountForm({ sensorId, payloads }: { sensorId: string; payloads: Array<{ id: string; name: string }> }) {
  const uid = useId();
  const router = useRouter();
  const [v, setV] = useState({ payloadId: "", from: "", to: "" });
  const [errors, setErrors] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const set = (key: keyof typeof v) => (e: { target: { value: string } }) => setV((old) => ({ ...old, [key]: e.target.value }));

  async function submit(event: FormEvent) {
    event.preventDefault();
    setBusy(true);
    const result = await addSensorMount({ sensorId, payloadId: v.payloadId, fromUtc: v.from ? `${v.from}T00:00:00Z` : "", toUtc: v.to ? `${v.to}T00:00:00Z` : null });
    setBusy(false);
    if (!result.ok) { setErrors(result.fieldErrors); setMessage(result.message); return; }
    setErrors({}); setMessage(null); setV({ payloadId: "", from: "", to: "" });
    router.refresh();
  }

  return (
    <form onSubmit={submit} aria-label="Mount in a payload">
      <div className="form-grid">
        <Field id={`${uid}-p`} label="Payload" error={errors.payloadId}>
          <select id={`${uid}-p`} value={v.payloadId} onChange={set("payloadId")}>
            <option value="">Choose…</option>
            {payloads.map((p) => <option key={p.id} value={p.id}>{p.name}</option>)}
          </select>
        </Field>
        <Field id={`${uid}-f`} label="From (UTC date)" error={errors.fromUtc}><input id={`${uid}-f`} type="date" value={v.from} onChange={set("from")} /></Field>
        <Field id={`${uid}-t`} label="To (UTC date, optional)" hint="empty: still mounted" error={errors.toUtc}><input id={`${uid}-t`} type="date" value={v.to} onChange={set("to")} /></Field>
      </div>
      <FormMessage error={message} />
      <p className="actions"><button type="submit" disabled={busy}>{busy ? "Saving…" : "Add mount"}</button></p>
    </form>
  );
}
