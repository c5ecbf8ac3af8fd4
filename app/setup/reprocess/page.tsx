import type { Metadata } from "next";
import Link from "next/link";
import { connection } from "next/server";
import { getDb } from "@/lib/db";
import { selectFlights, type ReprocessSelection } from "@/lib/ingest";
import { listFlightsForReprocess } from "@/lib/query/setup-pages";
import { ReprocessPanel } from "@/app/_components/setup/reprocess-panel";
import { getViewer } from "@/app/_lib/viewer";
import { pickId, type SearchParams } from "../_lib/search-params";
import { membersOnly } from "@/app/setup/_lib/members-only";

export const metadata: Metadata = { title: "Re-analysis · Setup" };

function selectionOf(params: Awaited<SearchParams>): { selection: ReprocessSelection; label: string } | null {
  const calibrationId = pickId(params.calibration);
  if (calibrationId) return { selection: { calibrationId }, label: "flights whose analysis uses this calibration (its sensor's flights in its validity period, and flights whose current run used it)" };
  const layoutId = pickId(params.layout);
  if (layoutId) return { selection: { layoutId }, label: "flights read with this logger layout" };
  const siteId = pickId(params.site);
  if (siteId) return { selection: { siteId }, label: "flights launched from this site" };
  const flights = [params.flight].flat().filter((v): v is string => typeof v === "string" && v.length > 0 && v.length <= 64);
  if (flights.length) return { selection: { flightIds: flights }, label: "the chosen flights" };
  if (params.all === "1") return { selection: { all: true }, label: "every flight in the archive" };
  return null;
}

export default async function ReprocessPage({ searchParams }: { searchParams: SearchParams }) {
  const gate = await membersOnly();
  if (gate) return gate;
  await connection();
  const viewer = await getViewer();
  const params = await searchParams;
  const chosen = selectionOf(params);
  const reasonParam = typeof params.reason === "string" ? params.reason.slice(0, 200) : "";
  if (!chosen) {
    return (
      <>
        <h1>Re-analysis</h1>
        <p>Choose what to re-analyse: <Link href="/setup/reprocess?all=1">every flight</Link>, or open a calibration, a logger layout or a site and follow its “Flights using it” link.</p>
      </>
    );
  }
  const ids = await selectFlights(getDb(), chosen.selection);
  const flights = await listFlightsForReprocess(viewer, ids);
  return (
    <>
      <h1>Re-analysis</h1>
      <p className="lead">
        Affected: {chosen.label}. Re-analysis re-runs the pipeline from each flight&apos;s stored raw file with today&apos;s calibration, logger layout,
        analysis parameters and site, as a new run; the previous run is kept. Flights whose current run already used exactly these inputs are reported as up to date.
        Stopping is safe: run it again to resume.
      </p>
      <ReprocessPanel flights={flights} defaultReason={reasonParam || "re-analysis from Setup"} />
      <p className="small muted">The command line does the same: <code>npm run lapsebank -- reprocess --all | --flight ID | --calibration ID | --layout ID | --site ID</code></p>
    </>
  );
}
