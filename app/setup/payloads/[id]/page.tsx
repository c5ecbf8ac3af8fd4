import type { Metadata } from "next";
import { describeSensorKind } from "@/app/_lib/format";
import Link from "next/link";
import { notFound } from "next/navigation";
import { connection } from "next/server";
import { getSetupPayload, listSetupSchools } from "@/lib/query/setup-pages";
import { getSetupItemUses } from "@/lib/ingest/setup-reads";
import { PayloadForm } from "@/app/_components/setup/payload-form";
import { getViewer } from "@/app/_lib/viewer";
import { membersOnly } from "@/app/setup/_lib/members-only";
import { DeleteItemButton } from "@/app/_components/setup/delete-item-button";

export const metadata: Metadata = { title: "Payload · Setup" };

export default async function SetupPayloadPage({ params }: { params: Promise<{ id: string }> }) {
  const gate = await membersOnly();
  if (gate) return gate;
  await connection();
  await getViewer();
  const { id } = await params;
  const [payload, schools] = await Promise.all([getSetupPayload(id), listSetupSchools()]);
  if (!payload) notFound();
  const usedBy = await getSetupItemUses("payload", payload.id);
  return (
    <>
      <p className="small"><Link href="/setup/payloads">← Payloads</Link></p>
      <h1>{payload.name}</h1>
      <p className="muted">{payload.schoolName}</p>
      <PayloadForm schools={schools} initial={{ id: payload.id, schoolId: payload.schoolId, name: payload.name, notes: payload.notes }} />
      <h2>Sensors carried over time</h2>
      {payload.mounts.length === 0 ? <p className="muted">No sensor has been mounted in this payload. Mount one from its sensor page.</p> : (
        <div className="table-wrap" role="region" aria-label="Sensor mounts" tabIndex={0}>
          <table>
            <thead><tr><th scope="col">Sensor</th><th scope="col">Kind</th><th scope="col">From (UTC)</th><th scope="col">To (UTC)</th></tr></thead>
            <tbody>
              {payload.mounts.map((m) => (
                <tr key={m.id}><td><Link href={`/setup/sensors/${m.sensorId}`}>{m.serial}</Link></td><td>{describeSensorKind(m.kind)}</td><td>{m.fromUtc.slice(0, 10)}</td><td>{m.toUtc ? m.toUtc.slice(0, 10) : "still mounted"}</td></tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <h2>Delete</h2>
      <DeleteItemButton kind="payload" id={payload.id} name={payload.name} usedBy={usedBy} />
    </>
  );
}
