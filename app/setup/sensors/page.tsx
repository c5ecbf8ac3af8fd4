import type { Metadata } from "next";
import { describeSensorKind } from "@/app/_lib/format";
import Link from "next/link";
import { connection } from "next/server";
import { listSetupSchools, listSetupSensors } from "@/lib/query/setup-pages";
import { SensorForm } from "@/app/_components/setup/sensor-form";
import { getViewer } from "@/app/_lib/viewer";
import { schoolFilter, type SearchParams } from "../_lib/search-params";
import { SchoolFilterLinks } from "../_lib/school-filter-links";
import { membersOnly } from "@/app/setup/_lib/members-only";

export const metadata: Metadata = { title: "Sensors · Setup" };

const day = (iso: string | null) => (iso ? iso.slice(0, 10) : "open");

export default async function SetupSensorsPage({ searchParams }: { searchParams: SearchParams }) {
  const gate = await membersOnly();
  if (gate) return gate;
  await connection();
  await getViewer();
  const school = await schoolFilter(searchParams);
  const [schools, sensors] = await Promise.all([listSetupSchools(), listSetupSensors()]);
  const shown = school ? sensors.filter((s) => s.schoolId === school) : sensors;
  return (
    <>
      <h1>Sensors and calibrations</h1>
      <SchoolFilterLinks path="/setup/sensors" schools={schools} current={school} />
      <div className="table-wrap" role="region" aria-label="Sensors" tabIndex={0}>
        <table>
          <thead><tr><th scope="col">Serial</th><th scope="col">School</th><th scope="col">Kind</th><th scope="col" className="num">Time constant (s)</th><th scope="col">Latest payload</th><th scope="col">Calibrations (valid from–to)</th></tr></thead>
          <tbody>
            {shown.map((s) => (
              <tr key={s.id}>
                <td><Link href={`/setup/sensors/${s.id}`}>{s.serial}</Link></td><td>{s.schoolName}</td><td>{describeSensorKind(s.kind)}</td><td className="num">{s.timeConstantS}</td>
                <td>{s.latestMount ? `${s.latestMount.payloadName} (${day(s.latestMount.fromUtc)} to ${s.latestMount.toUtc ? day(s.latestMount.toUtc) : "now"})` : <span className="muted">not recorded</span>}</td>
                <td>{s.calibrations.length ? s.calibrations.map((c, i) => <span key={c.id}>{i > 0 ? "; " : ""}<Link href={`/setup/calibrations/${c.id}`}>{c.method}</Link> {day(c.validFromUtc)}–{day(c.validToUtc)}</span>) : <span className="muted">none</span>}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <h2>New sensor</h2>
      <SensorForm schools={schools} initial={{ schoolId: school ?? "", serial: "", kind: "", timeConstantS: 0, notes: "" }} />
    </>
  );
}
