import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { connection } from "next/server";
import type { TemperatureCalibration } from "@/lib/analysis/types";
import { temperatureCalibrationSchema } from "@/lib/ingest/schemas";
import { getSetupSensor } from "@/lib/query/setup-pages";
import { CalibrationForm } from "@/app/_components/setup/calibration-form";
import { getViewer } from "@/app/_lib/viewer";
import { pickId, type SearchParams } from "../../_lib/search-params";
import { membersOnly } from "@/app/setup/_lib/members-only";

export const metadata: Metadata = { title: "New calibration · Setup" };

export default async function NewCalibrationPage({ searchParams }: { searchParams: SearchParams }) {
  const gate = await membersOnly();
  if (gate) return gate;
  await connection();
  await getViewer();
  const sensorId = pickId((await searchParams).sensor);
  const sensor = sensorId ? await getSetupSensor(sensorId) : null;
  if (!sensor) notFound();
  // Start from the sensor's latest model (without its correction): a new period usually keeps the hardware.
  const latest = temperatureCalibrationSchema.safeParse(sensor.calibrations.at(-1)?.spec);
  let template: TemperatureCalibration | null = null;
  if (latest.success) {
    const { correction: _correction, ...model } = latest.data;
    template = model;
  }
  return (
    <>
      <p className="small"><Link href={`/setup/sensors/${sensor.id}`}>← Sensor {sensor.serial}</Link></p>
      <h1>New calibration for {sensor.serial}</h1>
      <CalibrationForm sensor={{ id: sensor.id, serial: sensor.serial }} initial={{ spec: template, validFromUtc: null, validToUtc: null, method: "", notes: "", referenceReadings: null }} />
    </>
  );
}
