import { ClimatologyQueryError, getClimatologyCached } from "@/lib/query/climatology";
import { climatologySearchParams, parseClimatologyQuery, searchRecord } from "@/lib/query/climatology-params";
import { getViewer } from "@/app/_lib/viewer";
import { absoluteUrl, jsonError, jsonOk, withErrors } from "../_lib/respond";

export const runtime = "nodejs";

/**
 * GET /api/v1/climatology — the Climatology page's query and claim check as JSON. Takes the same
 * search parameters as /climatology (one zod schema validates both) and returns the same numbers.
 * Bad input (fields that do not validate, contradictory filters, unknown ids, empty groups) is 422.
 */
export const GET = withErrors(async (request: Request) => {
  const record = searchRecord(new URL(request.url).searchParams);
  const parsed = parseClimatologyQuery(record);
  if (!parsed.ok) return jsonError(422, "invalid-query", parsed.message);
  const query = parsed.query;
  let result;
  try {
    result = await getClimatologyCached(await getViewer(), query);
  } catch (error) {
    if (error instanceof ClimatologyQueryError) return jsonError(422, error.code, error.field ? `${error.field}: ${error.message}` : error.message);
    throw error;
  }
  const search = climatologySearchParams(query, record).toString();
  return jsonOk({
    query: {
      ...query,
      pageUrl: absoluteUrl(request, `/climatology${search ? `?${search}` : ""}`),
      apiUrl: absoluteUrl(request, `/api/v1/climatology${search ? `?${search}` : ""}`),
    },
    metric: result.metric,
    band: result.band,
    matchedFlightCount: result.matchedFlightCount,
    excludedCount: result.excludedCount,
    excluded: result.excluded,
    overall: result.overall,
    groups: result.groups.map((group) => ({
      ...group,
      flights: group.flights.map((flight) => ({ ...flight, url: absoluteUrl(request, `/flights/${flight.flightId}`) })),
    })),
    claim: result.claim,
    crossTable: result.crossTable,
    profiles: result.profiles,
    warnings: result.warnings,
  });
});
