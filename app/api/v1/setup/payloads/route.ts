import { createPayload, payloadInputSchema } from "@/lib/ingest";
import { currentActor } from "@/app/_lib/viewer";
import { getDb } from "@/lib/db";
import { listSetupPayloads } from "@/lib/query/setup-pages";
import { jsonOk, withErrors } from "../../_lib/respond";
import { refuseVisitors, idParam, readJson, refuseUnlessAllowed, setupFailure } from "../_lib/setup-api";

export const runtime = "nodejs";

/** GET /api/v1/setup/payloads[?school=ID] */
export const GET = withErrors(async (request: Request) => {
  const refused = await refuseVisitors();
  if (refused) return refused;
  const school = idParam(request, "school");
  const payloads = await listSetupPayloads();
  return jsonOk({ payloads: school ? payloads.filter((p) => p.schoolId === school) : payloads });
});

/** POST /api/v1/setup/payloads {schoolId, name, notes?} */
export const POST = withErrors(async (request: Request) => {
  const body = await readJson(request, payloadInputSchema);
  if ("response" in body) return body.response;
  const refused = await refuseUnlessAllowed(body.data.schoolId);
  if (refused) return refused;
  try {
    return jsonOk({ payload: await createPayload(getDb(), body.data, await currentActor("api")) }, 201);
  } catch (error) {
    return setupFailure(error);
  }
});
