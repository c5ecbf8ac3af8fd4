import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { connection } from "next/server";
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
  const usedBy = await getSetupItemUses("site", site.id);
  return (
    <>
      <p className="small"><Link href="/setup/sites">← Sites</Link></p>
      <h1>{site.name}</h1>
      <p className="muted">{site.schoolName}. Corrections apply to new analyses; re-analyse the site&apos;s flights to update their launch-time facts.</p>
      <SiteForm schools={schools} initial={{ id: site.id, schoolId: site.schoolId, name: site.name, latitudeDeg: site.latitudeDeg, longitudeDeg: site.longitudeDeg, elevationM: site.elevationM, timeZone: site.timeZone }} />
      <h2>Delete</h2>
      <DeleteItemButton kind="site" id={site.id} name={site.name} usedBy={usedBy} />
    </>
  );
}
