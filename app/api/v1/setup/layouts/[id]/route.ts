import { selectFlights } from "@/lib/ingest";
import { getDb } from "@/lib/db";
import { layoutUpdateSchema, updateLayout } from "@/lib/ingest/setup-more";
import { getSetupLayout } from "@/lib/query/setup-pages";
import { jsonOk, notFoundError, withErrors } from "../../../_lib/respond";
import { refuseVisitors, readJson, refuseUnlessAllowed, setupFailure } from "../../_lib/setup-api";
import { currentActor } from "@/app/_lib/viewer";

export const runtime = "nodejs";

type Context = { params: Promise<{ id: string }> };

export const GET = withErrors(async (_request: Request, { params }: Context) => {
  const refused = await refuseVisitors();
  if (refused) return refused;
  const layout = await getSetupLayout((await params).id);
  return layout ? jsonOk({ layout }) : notFoundError("Logger layout");
});

/** PUT /api/v1/setup/layouts/ID {spec}: the answer lists the flights read with it, to re-analyse. */
export const PUT = withErrors(async (request: Request, { params }: Context) => {
  const existing = await getSetupLayout((await params).id);
  if (!existing) return notFoundError("Logger layout");
  const refused = await refuseUnlessAllowed(existing.schoolId);
  if (refused) return refused;
  const body = await readJson(request, layoutUpdateSchema);
  if ("response" in body) return body.response;
  const db = getDb();
  try {
    const layout = await updateLayout(db, existing.id, body.data, await currentActor("api"));
    return jsonOk({ layout, affectedFlightIds: await selectFlights(db, { layoutId: layout.id }), reprocess: { layoutId: layout.id } });
  } catch (error) {
    return setupFailure(error);
  }
});
