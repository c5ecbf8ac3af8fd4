import { calibrationInputSchema, createCalibration, selectFlights } from "@/lib/ingest";
import { currentActor } from "@/app/_lib/viewer";
import { getDb } from "@/lib/db";
import { getSetupSensor } from "@/lib/query/setup-pages";
import { jsonError, jsonOk, withErrors } from "../../_lib/respond";
import { refuseVisitors, idParam, readJson, refuseUnlessAllowed, setupFailure } from "../_lib/setup-api";

export const runtime = "nodejs";

/** GET /api/v1/setup/calibrations?sensor=ID: the sensor's calibrations, oldest first. */
export const GET = withErrors(async (request: Request) => {
  const refused = await refuseVisitors();
  if (refused) return refused;
  const sensorId = idParam(request, "sensor");
  if (!sensorId) return jsonError(400, "invalid-request", "sensor: give ?sensor=ID");
  const sensor = await getSetupSensor(sensorId);
  if (!sensor) return jsonError(404, "not-found", "Sensor not found");
  return jsonOk({ sensorId: sensor.id, calibrations: sensor.calibrations });
});

/**
 * POST /api/v1/setup/calibrations {sensorId, spec, validFromUtc, validToUtc?, method, referenceReadings?, notes?}.
 * 409 when the validity overlaps another calibration of the sensor. The answer lists the flights it affects.
 */
export const POST = withErrors(async (request: Request) => {
  const body = await readJson(request, calibrationInputSchema);
  if ("response" in body) return body.response;
  const db = getDb();
  const sensor = await db.sensor.findUnique({ where: { id: body.data.sensorId }, select: { schoolId: true } });
  if (!sensor) return jsonError(422, "unknown-sensor", "That sensor does not exist");
  const refused = await refuseUnlessAllowed(sensor.schoolId);
  if (refused) return refused;
  try {
    const calibration = await createCalibration(db, body.data, await currentActor("api"));
    const affectedFlightIds = await selectFlights(db, { calibrationId: calibration.id });
    return jsonOk({ calibration, affectedFlightIds, reprocess: { calibrationId: calibration.id } }, 201);
  } catch (error) {
    return setupFailure(error);
  }
});
