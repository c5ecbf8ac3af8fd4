import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { connection } from "next/server";
import { temperatureCalibrationSchema } from "@/lib/ingest/schemas";
import { getSetupCalibration } from "@/lib/query/setup-pages";
import { getSetupItemUses } from "@/lib/ingest/setup-reads";
import { CalibrationForm } from "@/app/_components/setup/calibration-form";
import { getViewer } from "@/app/_lib/viewer";
import { membersOnly } from "@/app/setup/_lib/members-only";
import { DeleteItemButton } from "@/app/_components/setup/delete-item-button";

export const metadata: Metadata = { title: "Calibration · Setup" };

export default async function CalibrationPage({ params }: { params: Promise<{ id: string }> }) {
  const gate = await membersOnly();
  if (gate) return gate;
  await connection();
  await getViewer();
  const { id } = await params;
  const calibration = await getSetupCalibration(id);
  if (!calibration) notFound();
  const usedBy = await getSetupItemUses("calibration", calibration.id);
  const spec = temperatureCalibrationSchema.safeParse(calibration.spec);
  return (
    <>
      <p className="small"><Link href={`/setup/sensors/${calibration.sensor.id}`}>← Sensor {calibration.sensor.serial}</Link></p>
      <h1>Calibration of {calibration.sensor.serial}</h1>
      <p className="muted">
        {calibration.sensor.schoolName} · valid {calibration.validFromUtc.slice(0, 10)} to {calibration.validToUtc ? calibration.validToUtc.slice(0, 10) : "open end"} ·
        used by {calibration.runCount} analysis run(s). Runs keep their own copy of the calibration they used; after a correction the affected
        flights are listed for re-analysis. <Link href={`/setup/reprocess?calibration=${calibration.id}`}>Flights using it</Link>
      </p>
      {!spec.success && <p className="notice notice-warn">The stored model could not be read ({spec.error.issues[0]?.message}); enter it again.</p>}
      <CalibrationForm
        sensor={{ id: calibration.sensor.id, serial: calibration.sensor.serial }}
        initial={{ id: calibration.id, spec: spec.success ? spec.data : null, validFromUtc: calibration.validFromUtc, validToUtc: calibration.validToUtc, method: calibration.method, notes: calibration.notes, referenceReadings: calibration.referenceReadings }}
      />
      <h2>Delete</h2>
      <DeleteItemButton kind="calibration" id={calibration.id} name={calibration.id} usedBy={usedBy} />
    </>
  );
}
