import { archiveFilterSchema, searchParamsToRecord } from "@/lib/query/archive-filter";
import { getFlight, listFlights } from "@/lib/query/flights";
import { ingestFlightFile } from "@/lib/ingest";
import { getDb } from "@/lib/db";
import { getEnv } from "@/lib/env";
import { getViewer } from "@/app/_lib/viewer";
import { requirePermission, requirePermissionSomewhere } from "@/lib/auth/permissions";
import { readMultipartBody } from "@/lib/http/request-body";
import { absoluteUrl, jsonError, jsonOk, withErrors } from "../_lib/respond";

export const runtime = "nodejs";

/**
 * GET /api/v1/flights?school=&site=&from=&to=&season=&sort=&page=&pageSize= — a query that does not
 * validate, an unknown parameter included, is 422 naming the parameter (as GET /api/v1/climatology).
 */
export const GET = withErrors(async (request: Request) => {
  const parsed = archiveFilterSchema.safeParse(searchParamsToRecord(new URL(request.url).searchParams));
  if (!parsed.success) return jsonError(422, "invalid-query", parsed.error.issues.map((i) => `${i.path.join(".") || "query"}: ${i.message}`).join("; "));
  const result = await listFlights(await getViewer(), parsed.data);
  return jsonOk({
    flights: result.rows.map((row) => ({ ...row, url: absoluteUrl(request, `/flights/${row.id}`), apiUrl: absoluteUrl(request, `/api/v1/flights/${row.id}`) })),
    paging: { page: result.page, pageSize: result.pageSize, total: result.total, pageCount: Math.ceil(result.total / result.pageSize) },
  });
});

/**
 * POST /api/v1/flights (multipart/form-data): `file` plus the upload metadata fields. Who is asking
 * is settled before any of the body is read; the body is streamed with a byte limit
 * (LAPSEBANK_MAX_UPLOAD_MB) into one buffer. Send the metadata fields before the file and a
 * school you may not upload to is refused before the file is read.
 */
export const POST = withErrors(async (request: Request) => {
  const viewer = await getViewer();
  requirePermissionSomewhere(viewer, "flight.upload");
  const { fields: metadata, file } = await readMultipartBody(request, {
    fileField: "file",
    maxFileBytes: getEnv().LAPSEBANK_MAX_UPLOAD_MB * 1024 * 1024,
    beforeFile: (fields) => {
      if (fields.schoolId !== undefined) requirePermission(viewer, "flight.upload", { schoolId: fields.schoolId });
    },
  });
  if (!file) return jsonError(400, "invalid-request", "The `file` field is missing or is not a file");
  requirePermission(viewer, "flight.upload", { schoolId: metadata.schoolId ?? null });
  const bytes = file.bytes;
  const actor = viewer.kind === "member" ? { userId: viewer.userId, label: `api (${viewer.email ?? viewer.userId})` } : { userId: null, label: "api" };
  const result = await ingestFlightFile(getDb(), { file: { name: file.name || "upload.txt", bytes }, metadata, actor });
  const detail = await getFlight(viewer, result.flightId);
  const summary = detail?.currentRun?.summary ?? null;
  return jsonOk(
    {
      flight: { id: result.flightId, url: absoluteUrl(request, `/flights/${result.flightId}`), title: result.title, launchAtUtc: result.launchAtUtc.toISOString() },
      summary: summary && {
        season: summary.season,
        seasonName: summary.seasonName,
        localHour: summary.localHour,
        surfaceTemperatureK: summary.surfaceTemperatureK,
        troposphericLapseRateKPerKm: summary.troposphericLapseRateKPerKm,
        troposphericLapseRateStdErrKPerKm: summary.troposphericLapseRateStdErrKPerKm,
        tropopauseAltitudeM: summary.tropopauseAltitudeM,
        tropopauseTemperatureK: summary.tropopauseTemperatureK,
        tropopauseStatus: summary.tropopauseStatus,
        secondTropopauseAltitudeM: summary.secondTropopauseAltitudeM,
        hasSurfaceInversion: summary.hasSurfaceInversion,
        surfaceInversionDepthM: summary.surfaceInversionDepthM,
        surfaceInversionStrengthK: summary.surfaceInversionStrengthK,
        burstAltitudeM: summary.burstAltitudeM,
        maxAltitudeM: summary.maxAltitudeM,
        qcFlagged: summary.qcFlagged,
      },
      warnings: result.warnings,
      skippedRowCount: result.skippedRowCount,
    },
    201,
    { Location: absoluteUrl(request, `/api/v1/flights/${result.flightId}`) },
  );
});
