import { getFlight } from "@/lib/query/flights";
import { getViewer } from "@/app/_lib/viewer";
import { absoluteUrl, jsonOk, notFoundError, withErrors } from "../../_lib/respond";

export const runtime = "nodejs";

/** GET /api/v1/flights/{id}: the flight with its current run, summary, layers and run history. */
export const GET = withErrors(async (request: Request, { params }: { params: Promise<{ id: string }> }) => {
  const { id } = await params;
  const flight = await getFlight(await getViewer(), id);
  if (!flight) return notFoundError();
  return jsonOk({
    flight: {
      ...flight,
      url: absoluteUrl(request, `/flights/${flight.id}`),
      levelsUrl: absoluteUrl(request, `/api/v1/flights/${flight.id}/levels`),
      rawUrl: absoluteUrl(request, `/api/v1/flights/${flight.id}/raw`),
    },
  });
});
