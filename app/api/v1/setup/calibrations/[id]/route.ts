import { calibrationInputSchema, selectFlights, updateCalibration } from "@/lib/ingest";
import { getDb } from "@/lib/db";
import { getSetupCalibration } from "@/lib/query/setup-pages";
import { jsonError, jsonOk, notFoundError, withErrors } from "../../../_lib/respond";
import { refuseVisitors, readJson, refuseUnlessAllowed, setupFailure } from "../../_lib/setup-api";

export const runtime = "nodejs";

type Context = { params: Promise<{ id: string }> };

export const GET = withErrors(async (_request: Request, { params }: Context) => {
  const refused = await refuseVisitors();
  if (refused) return refused;
  const calibration = await getSetupCalibration((await params).id);
  return calibration ? jsonOk({ calibration }) : notFoundError("Calibration");
});

/**
 * PUT /api/v1/setup/calibrations/ID (same body as POST): corrects a calibration in place. Stored runs
 * keep the spec they used; the answer lists the flights to re-analyse (POST /api/v1/setup/reprocess).
 */
export const PUT = withErrors(async (request: Request, { params }: Context) => {
  const existing = await getSetupCalibration((await params).id);
  if (!existing) return notFoundError("Calibration");
  const refused = await refuseUnlessAllowed(existing.sensor.schoolId);
  if (refused) return refused;
  const body = await readJson(request, calibrationInputSchema);
  if ("response" in body) return body.response;
  if (body.data.sensorId !== existing.sensor.id) return jsonError(422, "invalid-request", "sensorId: a calibration cannot move to another sensor");
  const db = getDb();
  try {
    const calibration = await updateCalibration(db, existing.id, body.data);
    const affectedFlightIds = await selectFlights(db, { calibrationId: calibration.id });
    return jsonOk({ calibration, affectedFlightIds, reprocess: { calibrationId: calibration.id } });
  } catch (error) {
    return setupFailure(error);
  }
});
