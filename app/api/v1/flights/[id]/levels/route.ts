import { z } from "zod";
import { getFlightLevels } from "@/lib/query/flights";
import { getViewer } from "@/app/_lib/viewer";
import { jsonOk, notFoundError, validationError, withErrors } from "../../../_lib/respond";

export const runtime = "nodejs";

const levelsQuerySchema = z.object({ run: z.string().min(1).max(64).optional() });

/** GET /api/v1/flights/{id}/levels[?run=]: binned levels of the current (or a given) run. */
export const GET = withErrors(async (request: Request, { params }: { params: Promise<{ id: string }> }) => {
  const { id } = await params;
  const query = levelsQuerySchema.safeParse({ run: new URL(request.url).searchParams.get("run") || undefined });
  if (!query.success) return validationError(query.error);
  const result = await getFlightLevels(await getViewer(), id, query.data.run);
  if (!result) return notFoundError(query.data.run ? "Flight or analysis run" : "Flight");
  return jsonOk({
    flightId: id,
    runId: result.runId,
    units: { altitudeM: "m", baseM: "m", topM: "m", temperatureK: "K", temperatureSdK: "K", pressureHpa: "hPa", relativeHumidityPct: "%" },
    levels: result.levels,
  });
});
