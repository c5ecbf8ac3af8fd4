import type { Metadata } from "next";
import Link from "next/link";
import { connection } from "next/server";
import { listSetupSchools, listSetupSites } from "@/lib/query/setup-pages";
import { SiteForm } from "@/app/_components/setup/site-form";
import { getViewer } from "@/app/_lib/viewer";
import { schoolFilter, type SearchParams } from "../_lib/search-params";
import { SchoolFilterLinks } from "../_lib/school-filter-links";
import { membersOnly } from "@/app/setup/_lib/members-only";

export const metadata: Metadata = { title: "Sites · Setup" };

export default async function SetupSitesPage({ searchParams }: { searchParams: SearchParams }) {
  const gate = await membersOnly();
  if (gate) return gate;
  await connection();
  await getViewer();
  const school = await schoolFilter(searchParams);
  const [schools, sites] = await Promise.all([listSetupSchools(), listSetupSites()]);
  const shown = school ? sites.filter((s) => s.schoolId === school) : sites;
  return (
    <>
      <h1>Launch sites</h1>
      <SchoolFilterLinks path="/setup/sites" schools={schools} current={school} />
      <div className="table-wrap" role="region" aria-label="Sites" tabIndex={0}>
        <table>
          <thead><tr><th scope="col">Site</th><th scope="col">School</th><th scope="col" className="num">Latitude (°)</th><th scope="col" className="num">Longitude (°)</th><th scope="col" className="num">Elevation (m)</th><th scope="col">Time zone</th><th scope="col" className="num">Flights</th></tr></thead>
          <tbody>
            {shown.map((s) => (
              <tr key={s.id}>
                <td><Link href={`/setup/sites/${s.id}`}>{s.name}</Link></td><td>{s.schoolName}</td>
                <td className="num">{s.latitudeDeg.toFixed(4)}</td><td className="num">{s.longitudeDeg.toFixed(4)}</td><td className="num">{s.elevationM.toFixed(0)}</td>
                <td>{s.timeZone}</td><td className="num">{s.flightCount}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <h2>New site</h2>
      <SiteForm schools={schools} initial={{ schoolId: school ?? "", name: "", latitudeDeg: null, longitudeDeg: null, elevationM: null, timeZone: "UTC" }} />
    </>
  );
}
