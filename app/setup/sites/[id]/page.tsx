import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { connection } from "next/server";
import { getDb } from "@/lib/db";
import { flightsAnalysedWithOtherSite } from "@/lib/ingest";
import { getSetupSite, listSetupSchools } from "@/lib/query/setup-pages";
import { getSetupItemUses } from "@/lib/ingest/setup-reads";
import { SiteForm } from "@/app/_components/setup/site-form";
import { getViewer } from "@/app/_lib/viewer";
import { membersOnly } from "@/app/setup/_lib/members-only";
import { DeleteItemButton } from "@/app/_components/setup/delete-item-button";

export const metadata: Metadata = { title: "Site · Setup" };

export default async function SetupSitePage({ params }: { params: Promise<{ id: string }> }) {
  const gate = await membersOnly();
  if (gate) return gate;
  await connection();
  await getViewer();
  const { id } = await params;
  const [site, schools] = await Promise.all([getSetupSite(id), listSetupSchools()]);
  if (!site) notFound();
  const [usedBy, outOfDate] = await Promise.all([getSetupItemUses("site", site.id), flightsAnalysedWithOtherSite(getDb(), site.id)]);
  return (
    <>
      <p className="small"><Link href="/setup/sites">← Sites</Link></p>
      <h1>{site.name}</h1>
      <p className="muted">
        {site.schoolName} · {site.flightCount} flight(s). Each run keeps the position, elevation and time zone it was analysed with; after a
        correction the flights it changes are listed for re-analysis. {site.flightCount > 0 && <Link href={`/setup/reprocess?site=${site.id}`}>Flights using it</Link>}
      </p>
      {outOfDate.length > 0 && (
        <p className="notice notice-warn">
          {outOfDate.length} flight(s) were analysed with other site values than these.{" "}
          <Link href={`/setup/reprocess?site=${site.id}&reason=${encodeURIComponent(`site ${site.name} corrected`)}`}>Re-analyse them</Link>
        </p>
      )}
      <SiteForm schools={schools} initial={{ id: site.id, schoolId: site.schoolId, name: site.name, latitudeDeg: site.latitudeDeg, longitudeDeg: site.longitudeDeg, elevationM: site.elevationM, timeZone: site.timeZone }} />
      <h2>Delete</h2>
      <DeleteItemButton kind="site" id={site.id} name={site.name} usedBy={usedBy} />
    </>
  );
}
