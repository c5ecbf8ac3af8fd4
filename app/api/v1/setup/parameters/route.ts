import { analysisParametersSchema } from "@/lib/ingest/schemas";
import { selectFlights } from "@/lib/ingest";
import { getDb } from "@/lib/db";
import { setProgramParameters } from "@/lib/ingest/setup-more";
import { getProgramSettings } from "@/lib/ingest/setup-reads";
import { jsonOk, withErrors } from "../../_lib/respond";
import { refuseVisitors, readJson, refuseUnlessAllowed } from "../_lib/setup-api";
import { currentActor } from "@/app/_lib/viewer";

export const runtime = "nodejs";

/** GET /api/v1/setup/parameters: the program's analysis parameters and the built-in defaults. */
export const GET = withErrors(async () => (await refuseVisitors()) ?? jsonOk(await getProgramSettings()));

/** PUT /api/v1/setup/parameters {binSizeM, tropopauseSearchFloorM, lagCorrection, smoothingWindowS, …}: recorded with every later run. */
export const PUT = withErrors(async (request: Request) => {
  const refused = await refuseUnlessAllowed(null);
  if (refused) return refused;
  const body = await readJson(request, analysisParametersSchema);
  if ("response" in body) return body.response;
  const db = getDb();
  const parameters = await setProgramParameters(db, body.data, await currentActor("api"));
  return jsonOk({ parameters, affectedFlightIds: await selectFlights(db, { all: true }), reprocess: { all: true } });
});
