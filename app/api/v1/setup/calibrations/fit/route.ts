import { calibrationFitInputSchema, fitCalibrationPoints } from "@/lib/ingest/setup-more";
import { jsonOk, withErrors } from "../../../_lib/respond";
import { readJson, setupFailure } from "../../_lib/setup-api";

export const runtime = "nodejs";

/**
 * POST /api/v1/setup/calibrations/fit {template, points: [{raw, referenceC}], fit?: "auto"|"correction"|"model"}:
 * the calibration helper's fit (coefficients, residuals, curve). Nothing is stored.
 */
export const POST = withErrors(async (request: Request) => {
  const body = await readJson(request, calibrationFitInputSchema);
  if ("response" in body) return body.response;
  try {
    return jsonOk({ fit: fitCalibrationPoints(body.data) });
  } catch (error) {
    return setupFailure(error);
  }
});
