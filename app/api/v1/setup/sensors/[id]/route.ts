import { getDb } from "@/lib/db";
import { sensorUpdateSchema, updateSensor } from "@/lib/ingest/setup-more";
import { getSetupSensor } from "@/lib/query/setup-pages";
import { jsonOk, notFoundError, withErrors } from "../../../_lib/respond";
import { refuseVisitors, readJson, refuseUnlessAllowed, setupFailure } from "../../_lib/setup-api";
import { currentActor } from "@/app/_lib/viewer";

export const runtime = "nodejs";

type Context = { params: Promise<{ id: string }> };

/** GET /api/v1/setup/sensors/ID: the sensor with its payload mounts and calibrations. */
export const GET = withErrors(async (_request: Request, { params }: Context) => {
  const refused = await refuseVisitors();
  if (refused) return refused;
  const sensor = await getSetupSensor((await params).id);
  return sensor ? jsonOk({ sensor }) : notFoundError("Sensor");
});

/** PUT /api/v1/setup/sensors/ID {serial, kind, timeConstantS, notes} */
export const PUT = withErrors(async (request: Request, { params }: Context) => {
  const existing = await getSetupSensor((await params).id);
  if (!existing) return notFoundError("Sensor");
  const refused = await refuseUnlessAllowed(existing.schoolId);
  if (refused) return refused;
  const body = await readJson(request, sensorUpdateSchema);
  if ("response" in body) return body.response;
  try {
    return jsonOk({ sensor: await updateSensor(getDb(), existing.id, body.data, await currentActor("api")) });
  } catch (error) {
    return setupFailure(error);
  }
});
