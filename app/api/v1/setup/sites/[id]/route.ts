import { getDb } from "@/lib/db";
import { flightsAnalysedWithOtherSite } from "@/lib/ingest";
import { siteUpdateSchema, updateSite } from "@/lib/ingest/setup-more";
import { getSetupSite } from "@/lib/query/setup-pages";
import { jsonOk, notFoundError, withErrors } from "../../../_lib/respond";
import { refuseVisitors, readJson, refuseUnlessAllowed, setupFailure } from "../../_lib/setup-api";
import { currentActor } from "@/app/_lib/viewer";

export const runtime = "nodejs";

type Context = { params: Promise<{ id: string }> };

export const GET = withErrors(async (_request: Request, { params }: Context) => {
  const refused = await refuseVisitors();
  if (refused) return refused;
  const site = await getSetupSite((await params).id);
  return site ? jsonOk({ site }) : notFoundError("Site");
});

/**
 * PUT /api/v1/setup/sites/ID {name, latitudeDeg, longitudeDeg, elevationM, timeZone}: the answer lists the
 * site's flights whose current run used other site values, to re-analyse (selection `{siteId}`).
 */
export const PUT = withErrors(async (request: Request, { params }: Context) => {
  const existing = await getSetupSite((await params).id);
  if (!existing) return notFoundError("Site");
  const refused = await refuseUnlessAllowed(existing.schoolId);
  if (refused) return refused;
  const body = await readJson(request, siteUpdateSchema);
  if ("response" in body) return body.response;
  const db = getDb();
  try {
    const site = await updateSite(db, existing.id, body.data, await currentActor("api"));
    return jsonOk({ site, affectedFlightIds: await flightsAnalysedWithOtherSite(db, site.id), reprocess: { siteId: site.id } });
  } catch (error) {
    return setupFailure(error);
  }
});
