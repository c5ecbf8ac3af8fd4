import { getRawFile } from "@/lib/query/flights";
import { getViewer } from "@/app/_lib/viewer";
import { notFoundError, withErrors } from "../../../_lib/respond";

export const runtime = "nodejs";

/** RFC 6266 Content-Disposition with an ASCII fallback and the UTF-8 original name. */
function attachmentHeader(name: string): string {
  const ascii = name.replace(/[^\x20-\x7e]/g, "_").replace(/["\\]/g, "_");
  return `attachment; filename="${ascii}"; filename*=UTF-8''${encodeURIComponent(name)}`;
}

/** GET /api/v1/flights/{id}/raw: the uploaded bytes exactly as received. */
export const GET = withErrors(async (_request: Request, { params }: { params: Promise<{ id: string }> }) => {
  const { id } = await params;
  const raw = await getRawFile(await getViewer(), id);
  if (!raw) return notFoundError();
  return new Response(raw.bytes, {
    status: 200,
    headers: {
      "Content-Type": "application/octet-stream",
      "Content-Disposition": attachmentHeader(raw.name),
      "Content-Length": String(raw.bytes.byteLength),
      "X-Content-SHA256": raw.sha256,
      "Cache-Control": "private, no-store",
    },
  });
});
