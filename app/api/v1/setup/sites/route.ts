import { createSite, siteInputSchema } from "@/lib/ingest";
import { currentActor } from "@/app/_lib/viewer";
import { getDb } from "@/lib/db";
import { listSetupSites } from "@/lib/query/setup-pages";
import { jsonOk, withErrors } from "../../_lib/respond";
import { refuseVisitors, idParam, readJson, refuseUnlessAllowed, setupFailure } from "../_lib/setup-api";

export const runtime = "nodejs";

/** GET /api/v1/setup/sites[?school=ID] */
export const GET = withErrors(async (request: Request) => {
  const refused = await refuseVisitors();
  if (refused) return refused;
  const school = idParam(request, "school");
  const sites = await listSetupSites();
  return jsonOk({ sites: school ? sites.filter((s) => s.schoolId === school) : sites });
});

/** POST /api/v1/setup/sites {schoolId, name, latitudeDeg, longitudeDeg, elevationM, timeZone} */
export const POST = withErrors(async (request: Request) => {
  const body = await readJson(request, siteInputSchema);
  if ("response" in body) return body.response;
  const refused = await refuseUnlessAllowed(body.data.schoolId);
  if (refused) return refused;
  try {
    return jsonOk({ site: await createSite(getDb(), body.data, await currentActor("api")) }, 201);
  } catch (error) {
    return setupFailure(error);
  }
});
