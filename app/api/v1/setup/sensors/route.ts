import { createSensor, sensorInputSchema } from "@/lib/ingest";
import { currentActor } from "@/app/_lib/viewer";
import { getDb } from "@/lib/db";
import { listSetupSensors } from "@/lib/query/setup-pages";
import { jsonOk, withErrors } from "../../_lib/respond";
import { refuseVisitors, idParam, readJson, refuseUnlessAllowed, setupFailure } from "../_lib/setup-api";

export const runtime = "nodejs";

/** GET /api/v1/setup/sensors[?school=ID] */
export const GET = withErrors(async (request: Request) => {
  const refused = await refuseVisitors();
  if (refused) return refused;
  const school = idParam(request, "school");
  const sensors = await listSetupSensors();
  return jsonOk({ sensors: school ? sensors.filter((s) => s.schoolId === school) : sensors });
});

/** POST /api/v1/setup/sensors {schoolId, serial, kind, timeConstantS?, notes?, payloadId?, mountedFromUtc?, mountedToUtc?} */
export const POST = withErrors(async (request: Request) => {
  const body = await readJson(request, sensorInputSchema);
  if ("response" in body) return body.response;
  const refused = await refuseUnlessAllowed(body.data.schoolId);
  if (refused) return refused;
  try {
    return jsonOk({ sensor: await createSensor(getDb(), body.data, await currentActor("api")) }, 201);
  } catch (error) {
    return setupFailure(error);
  }
});
