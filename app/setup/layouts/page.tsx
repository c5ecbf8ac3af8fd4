import type { Metadata } from "next";
import Link from "next/link";
import { connection } from "next/server";
import { listSetupLayouts, listSetupSchools } from "@/lib/query/setup-pages";
import { getViewer } from "@/app/_lib/viewer";
import { schoolFilter, type SearchParams } from "../_lib/search-params";
import { SchoolFilterLinks } from "../_lib/school-filter-links";
import { membersOnly } from "@/app/setup/_lib/members-only";

export const metadata: Metadata = { title: "Logger layouts · Setup" };

export default async function SetupLayoutsPage({ searchParams }: { searchParams: SearchParams }) {
  const gate = await membersOnly();
  if (gate) return gate;
  await connection();
  await getViewer();
  const school = await schoolFilter(searchParams);
  const [schools, layouts] = await Promise.all([listSetupSchools(), listSetupLayouts()]);
  const shown = school ? layouts.filter((l) => l.schoolId === school) : layouts;
  return (
    <>
      <h1>Logger layouts</h1>
      <p className="lead">How to read each logger&apos;s files: delimiter, header, and which column holds time, altitude, raw temperature, pressure, humidity and position.</p>
      <SchoolFilterLinks path="/setup/layouts" schools={schools} current={school} />
      <div className="table-wrap" role="region" aria-label="Logger layouts" tabIndex={0}>
        <table>
          <thead><tr><th scope="col">Layout</th><th scope="col">School</th><th scope="col" className="num">Flights</th><th scope="col">Last changed (UTC)</th></tr></thead>
          <tbody>
            {shown.map((l) => <tr key={l.id}><td><Link href={`/setup/layouts/${l.id}`}>{l.name}</Link></td><td>{l.schoolName}</td><td className="num">{l.flightCount}</td><td>{l.updatedAt.slice(0, 16).replace("T", " ")}</td></tr>)}
          </tbody>
        </table>
      </div>
      <p><Link className="button" href={school ? `/setup/layouts/new?school=${school}` : "/setup/layouts/new"}>New logger layout</Link></p>
    </>
  );
}
