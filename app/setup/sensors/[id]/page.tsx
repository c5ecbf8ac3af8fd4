import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { connection } from "next/server";
import { getSetupSensor, listSetupSchools } from "@/lib/query/setup-pages";
import { getSetupItemUses } from "@/lib/ingest/setup-reads";
import { MountForm, SensorForm } from "@/app/_components/setup/sensor-form";
import { describeCalibration, describeSensorKind } from "@/app/_lib/format";
import { getViewer } from "@/app/_lib/viewer";
import type { SearchParams } from "../../_lib/search-params";
import { membersOnly } from "@/app/setup/_lib/members-only";
import { DeleteItemButton } from "@/app/_components/setup/delete-item-button";

export const metadata: Metadata = { title: "Sensor · Setup" };

const day = (iso: string | null) => (iso ? iso.slice(0, 10) : "open end");

export default async function SetupSensorPage({ params, searchParams }: { params: Promise<{ id: string }>; searchParams: SearchParams }) {
  const gate = await membersOnly();
  if (gate) return gate;
  await connection();
  await getViewer();
  const { id } = await params;
  const saved = (await searchParams).saved === "calibration";
  const [sensor, schools] = await Promise.all([getSetupSensor(id), listSetupSchools()]);
  if (!sensor) notFound();
  const usedBy = await getSetupItemUses("sensor", sensor.id);
  return (
    <>
      <p className="small"><Link href="/setup/sensors">← Sensors</Link></p>
      <h1>Sensor {sensor.serial}</h1>
      <p className="muted">{sensor.schoolName} · {describeSensorKind(sensor.kind)}</p>
      {saved && <p className="notice notice-ok" role="status">Calibration saved. No stored flight is affected by it.</p>}
      <SensorForm schools={schools} initial={{ id: sensor.id, schoolId: sensor.schoolId, serial: sensor.serial, kind: sensor.kind, timeConstantS: sensor.timeConstantS, notes: sensor.notes }} />

      <h2>Calibrations</h2>
      {sensor.calibrations.length === 0 ? <p className="muted">No calibration yet.</p> : (
        <div className="table-wrap" role="region" aria-label="Calibrations" tabIndex={0}>
          <table>
            <thead><tr><th scope="col">Valid from (UTC)</th><th scope="col">Valid to (UTC)</th><th scope="col">Method</th><th scope="col">Model</th><th scope="col">Notes</th><th scope="col">Edit</th></tr></thead>
            <tbody>
              {sensor.calibrations.map((c) => (
                <tr key={c.id}>
                  <td className="nowrap">{day(c.validFromUtc)}</td><td className="nowrap">{day(c.validToUtc)}</td><td>{c.method}</td>
                  <td className="small">{describeCalibration(c.spec)}</td><td className="small">{c.notes}</td>
                  <td><Link href={`/setup/calibrations/${c.id}`} aria-label={`Edit the calibration valid from ${day(c.validFromUtc)}`}>Edit</Link></td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <p><Link className="button" href={`/setup/calibrations/new?sensor=${sensor.id}`}>New calibration</Link> <span className="small muted">Validity periods of one sensor may not overlap; close the open one first.</span></p>

      <h2>Payloads over time</h2>
      {sensor.mounts.length === 0 ? <p className="muted">Not recorded.</p> : (
        <div className="table-wrap" role="region" aria-label="Payload mounts" tabIndex={0}>
          <table>
            <thead><tr><th scope="col">Payload</th><th scope="col">From (UTC)</th><th scope="col">To (UTC)</th></tr></thead>
            <tbody>
              {sensor.mounts.map((m) => <tr key={m.id}><td><Link href={`/setup/payloads/${m.payloadId}`}>{m.payloadName}</Link></td><td>{day(m.fromUtc)}</td><td>{m.toUtc ? day(m.toUtc) : "still mounted"}</td></tr>)}
            </tbody>
          </table>
        </div>
      )}
      <h3>Move to a payload</h3>
      <MountForm sensorId={sensor.id} payloads={sensor.payloads} />
      <h2>Delete</h2>
      <DeleteItemButton kind="sensor" id={sensor.id} name={sensor.serial} usedBy={usedBy} />
    </>
  );
}
