import { getDb } from "@/lib/db";
import { payloadUpdateSchema, updatePayload } from "@/lib/ingest/setup-more";
import { getSetupPayload } from "@/lib/query/setup-pages";
import { jsonOk, notFoundError, withErrors } from "../../../_lib/respond";
import { refuseVisitors, readJson, refuseUnlessAllowed, setupFailure } from "../../_lib/setup-api";
import { currentActor } from "@/app/_lib/viewer";

export const runtime = "nodejs";

type Context = { params: Promise<{ id: string }> };

/** GET /api/v1/setup/payloads/ID: the payload with the sensors it carried over time. */
export const GET = withErrors(async (_request: Request, { params }: Context) => {
  const refused = await refuseVisitors();
  if (refused) return refused;
  const payload = await getSetupPayload((await params).id);
  return payload ? jsonOk({ payload }) : notFoundError("Payload");
});

/** PUT /api/v1/setup/payloads/ID {name, notes} */
export const PUT = withErrors(async (request: Request, { params }: Context) => {
  const existing = await getSetupPayload((await params).id);
  if (!existing) return notFoundError("Payload");
  const refused = await refuseUnlessAllowed(existing.schoolId);
  if (refused) return refused;
  const body = await readJson(request, payloadUpdateSchema);
  if ("response" in body) return body.response;
  try {
    return jsonOk({ payload: await updatePayload(getDb(), existing.id, body.data, await currentActor("api")) });
  } catch (error) {
    return setupFailure(error);
  }
});
