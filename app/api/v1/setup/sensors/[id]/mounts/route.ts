import { z } from "zod";
import { getDb } from "@/lib/db";
import { mountSensor, sensorMountInputSchema } from "@/lib/ingest/setup-more";
import { getSetupSensor } from "@/lib/query/setup-pages";
import { jsonOk, notFoundError, validationError, withErrors } from "../../../../_lib/respond";
import { readJson, refuseUnlessAllowed, setupFailure } from "../../../_lib/setup-api";
import { currentActor } from "@/app/_lib/viewer";

export const runtime = "nodejs";

type Context = { params: Promise<{ id: string }> };

/** POST /api/v1/setup/sensors/ID/mounts {payloadId, fromUtc, toUtc?}: the sensor moves into a payload (an earlier open mount ends then). */
export const POST = withErrors(async (request: Request, { params }: Context) => {
  const sensor = await getSetupSensor((await params).id);
  if (!sensor) return notFoundError("Sensor");
  const refused = await refuseUnlessAllowed(sensor.schoolId);
  if (refused) return refused;
  const body = await readJson(request, z.record(z.string(), z.unknown()));
  if ("response" in body) return body.response;
  const parsed = sensorMountInputSchema.safeParse({ ...body.data, sensorId: sensor.id });
  if (!parsed.success) return validationError(parsed.error);
  try {
    const actor = await currentActor("api");
    const mount = await getDb().$transaction((tx) => mountSensor(tx, parsed.data, actor));
    return jsonOk({ mount }, 201);
  } catch (error) {
    return setupFailure(error);
  }
});
