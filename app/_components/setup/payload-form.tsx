"use client";

import { useId, useState, type FormEvent } from "react";
import { useRouter } from "next/navigation";
import { savePayload } from "@/app/setup/actions";
import { Field, FormMessage } from "./form-bits";

/** Create or rename a payload (the box that carries sensors). */
export function PayloadForm({ initial, schools }: { initial: { id?: string; schoolId: string; name: string; notes: string }; schools: Array<{ id: string; name: string }> }) {
  const uid = useId();
  const router = useRouter();
  const [v, setV] = useState({ schoolId: initial.schoolId, name: initial.name, notes: initial.notes });
  const [errors, setErrors] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [saved, setSaved] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const set = (key: keyof typeof v) => (e: { target: { value: string } }) => setV((old) => ({ ...old, [key]: e.target.value }));

  async function submit(event: FormEvent) {
    event.preventDefault();
    setBusy(true);
    setSaved(null);
    const result = await savePayload({ ...(initial.id ? { id: initial.id } : {}), ...v });
    setBusy(false);
    if (!result.ok) { setErrors(result.fieldErrors); setMessage(result.message); return; }
    setErrors({}); setMessage(null);
    if (initial.id) { setSaved("Payload saved."); router.refresh(); }
    else router.push(`/setup/payloads/${result.data.id}`);
  }

  return (
    <form onSubmit={submit} aria-label={initial.id ? "Edit payload" : "New payload"}>
      <div className="form-grid">
        <Field id={`${uid}-school`} label="School" error={errors.schoolId}>
          <select id={`${uid}-school`} value={v.schoolId} onChange={set("schoolId")} disabled={Boolean(initial.id)}>
            <option value="">Choose…</option>
            {schools.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
          </select>
        </Field>
        <Field id={`${uid}-name`} label="Payload name" error={errors.name}><input id={`${uid}-name`} type="text" value={v.name} onChange={set("name")} /></Field>
        <Field id={`${uid}-notes`} label="Notes" wide error={errors.notes}><textarea id={`${uid}-notes`} value={v.notes} onChange={set("notes")} /></Field>
      </div>
      <FormMessage error={message} ok={saved} />
      <p className="actions"><button type="submit" disabled={busy}>{busy ? "Saving…" : initial.id ? "Save payload" : "Create payload"}</button></p>
    </form>
  );
}
