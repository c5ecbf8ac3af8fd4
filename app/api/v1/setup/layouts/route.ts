import { createLayout, layoutInputSchema } from "@/lib/ingest";
import { currentActor } from "@/app/_lib/viewer";
import { getDb } from "@/lib/db";
import { listSetupLayouts } from "@/lib/query/setup-pages";
import { jsonOk, withErrors } from "../../_lib/respond";
import { refuseVisitors, idParam, readJson, refuseUnlessAllowed, setupFailure } from "../_lib/setup-api";

export const runtime = "nodejs";

/** GET /api/v1/setup/layouts[?school=ID] */
export const GET = withErrors(async (request: Request) => {
  const refused = await refuseVisitors();
  if (refused) return refused;
  const school = idParam(request, "school");
  const layouts = await listSetupLayouts();
  return jsonOk({ layouts: school ? layouts.filter((l) => l.schoolId === school) : layouts });
});

/** POST /api/v1/setup/layouts {schoolId, spec} */
export const POST = withErrors(async (request: Request) => {
  const body = await readJson(request, layoutInputSchema);
  if ("response" in body) return body.response;
  const refused = await refuseUnlessAllowed(body.data.schoolId);
  if (refused) return refused;
  try {
    return jsonOk({ layout: await createLayout(getDb(), body.data, await currentActor("api")) }, 201);
  } catch (error) {
    return setupFailure(error);
  }
});
