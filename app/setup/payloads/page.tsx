import type { Metadata } from "next";
import Link from "next/link";
import { connection } from "next/server";
import { listSetupPayloads, listSetupSchools } from "@/lib/query/setup-pages";
import { PayloadForm } from "@/app/_components/setup/payload-form";
import { getViewer } from "@/app/_lib/viewer";
import { schoolFilter, type SearchParams } from "../_lib/search-params";
import { SchoolFilterLinks } from "../_lib/school-filter-links";
import { membersOnly } from "@/app/setup/_lib/members-only";

export const metadata: Metadata = { title: "Payloads · Setup" };

export default async function SetupPayloadsPage({ searchParams }: { searchParams: SearchParams }) {
  const gate = await membersOnly();
  if (gate) return gate;
  await connection();
  await getViewer();
  const school = await schoolFilter(searchParams);
  const [schools, payloads] = await Promise.all([listSetupSchools(), listSetupPayloads()]);
  const shown = school ? payloads.filter((p) => p.schoolId === school) : payloads;
  return (
    <>
      <h1>Payloads</h1>
      <SchoolFilterLinks path="/setup/payloads" schools={schools} current={school} />
      <div className="table-wrap" role="region" aria-label="Payloads" tabIndex={0}>
        <table>
          <thead><tr><th scope="col">Payload</th><th scope="col">School</th><th scope="col">Sensors in it now</th><th scope="col" className="num">Flights</th></tr></thead>
          <tbody>
            {shown.map((p) => (
              <tr key={p.id}>
                <td><Link href={`/setup/payloads/${p.id}`}>{p.name}</Link></td><td>{p.schoolName}</td>
                <td>{p.sensorsNow.length ? p.sensorsNow.map((s, i) => <span key={s.id}>{i > 0 ? ", " : ""}<Link href={`/setup/sensors/${s.id}`}>{s.serial}</Link> <span className="muted small">since {s.sinceUtc.slice(0, 10)}</span></span>) : <span className="muted">none</span>}</td>
                <td className="num">{p.flightCount}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <h2>New payload</h2>
      <PayloadForm schools={schools} initial={{ schoolId: school ?? "", name: "", notes: "" }} />
    </>
  );
}
