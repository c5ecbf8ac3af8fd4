import type { Metadata } from "next";
import Link from "next/link";
import { connection } from "next/server";
import { listSetupSchools } from "@/lib/query/setup-pages";
import { LayoutForm } from "@/app/_components/setup/layout-form";
import { getViewer } from "@/app/_lib/viewer";
import { schoolFilter, type SearchParams } from "../../_lib/search-params";
import { membersOnly } from "@/app/setup/_lib/members-only";

export const metadata: Metadata = { title: "New logger layout · Setup" };

export default async function NewLayoutPage({ searchParams }: { searchParams: SearchParams }) {
  const gate = await membersOnly();
  if (gate) return gate;
  await connection();
  await getViewer();
  const school = await schoolFilter(searchParams);
  const schools = await listSetupSchools();
  return (
    <>
      <p className="small"><Link href="/setup/layouts">← Logger layouts</Link></p>
      <h1>New logger layout</h1>
      <LayoutForm schools={schools} initial={{ schoolId: school ?? "", spec: null }} />
    </>
  );
}
