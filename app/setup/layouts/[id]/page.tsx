import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { connection } from "next/server";
import { loggerLayoutSpecSchema } from "@/lib/ingest/layout";
import { getSetupLayout, listSetupSchools } from "@/lib/query/setup-pages";
import { getSetupItemUses } from "@/lib/ingest/setup-reads";
import { LayoutForm } from "@/app/_components/setup/layout-form";
import { getViewer } from "@/app/_lib/viewer";
import { membersOnly } from "@/app/setup/_lib/members-only";
import { DeleteItemButton } from "@/app/_components/setup/delete-item-button";

export const metadata: Metadata = { title: "Logger layout · Setup" };

export default async function LayoutPage({ params }: { params: Promise<{ id: string }> }) {
  const gate = await membersOnly();
  if (gate) return gate;
  await connection();
  await getViewer();
  const { id } = await params;
  const [layout, schools] = await Promise.all([getSetupLayout(id), listSetupSchools()]);
  if (!layout) notFound();
  const usedBy = await getSetupItemUses("layout", layout.id);
  const spec = loggerLayoutSpecSchema.safeParse(layout.spec);
  return (
    <>
      <p className="small"><Link href="/setup/layouts">← Logger layouts</Link></p>
      <h1>{layout.name}</h1>
      <p className="muted">
        {layout.schoolName} · used by {layout.flightCount} flight(s). Their runs keep the layout they were read with; after a change they are
        listed for re-analysis. {layout.flightCount > 0 && <Link href={`/setup/reprocess?layout=${layout.id}`}>Flights using it</Link>}
      </p>
      {!spec.success && <p className="notice notice-warn">The stored layout could not be read ({spec.error.issues[0]?.message}); enter it again.</p>}
      <LayoutForm schools={schools} initial={{ id: layout.id, schoolId: layout.schoolId, spec: spec.success ? spec.data : null }} />
      <h2>Delete</h2>
      <DeleteItemButton kind="layout" id={layout.id} name={layout.name} usedBy={usedBy} />
    </>
  );
}
