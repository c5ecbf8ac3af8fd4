import { getDbHandle } from "@/lib/db";
import { createExport, ExportRequestError } from "@/lib/export/export";
import { searchRecord } from "@/lib/query/climatology-params";
import { getViewer } from "@/app/_lib/viewer";
import { jsonError, withErrors } from "../_lib/respond";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

/**
 * GET /api/v1/export?source=archive|flight|climatology&format=csv|json|package|netcdf&table=&raw=yes&licence=&title=&flight=
 * plus the source page's own parameters (Archive filter or Climatology query), unchanged. Streams
 * the file as it is produced; only flights the requester may see are included.
 */
export const GET = withErrors(async (request: Request) => {
  const record = searchRecord(new URL(request.url).searchParams);
  let output;
  try {
    output = await createExport(getDbHandle(), await getViewer(), record);
  } catch (error) {
    if (error instanceof ExportRequestError) return jsonError(error.status, error.code, error.message);
    throw error;
  }
  const iterator = output.body[Symbol.asyncIterator]();
  const stream = new ReadableStream<Uint8Array>({
    async pull(controller) {
      try {
        const { value, done } = await iterator.next();
        if (done) controller.close();
        else controller.enqueue(value);
      } catch (error) {
        console.error("[api/v1/export]", error);
        controller.error(error);
      }
    },
    async cancel() {
      await iterator.return?.();
    },
  });
  return new Response(stream, {
    status: 200,
    headers: {
      "Content-Type": output.contentType,
      "Content-Disposition": `attachment; filename="${output.fileName}"`,
      "Cache-Control": "no-store",
      "X-Lapsebank-Flight-Count": String(output.scope.flightIds.length),
    },
  });
});
