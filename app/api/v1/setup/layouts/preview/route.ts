import { getViewer } from "@/app/_lib/viewer";
import { requirePermissionSomewhere } from "@/lib/auth/permissions";
import { getEnv } from "@/lib/env";
import { readMultipartBody } from "@/lib/http/request-body";
import { loggerLayoutSpecSchema } from "@/lib/ingest/layout";
import { LAYOUT_PREVIEW_BYTES, previewLayoutSample } from "@/lib/ingest/setup-more";
import { jsonError, jsonOk, validationError, withErrors } from "../../../_lib/respond";

export const runtime = "nodejs";

/**
 * POST /api/v1/setup/layouts/preview (multipart/form-data: `file`, `spec` as JSON): reads the first
 * 64 KB of the sample with the layout and returns the rows and every problem with line and column.
 * For people who may edit some school's setup (anyone in local mode); only the first 64 KB of the
 * sample is kept, the rest is counted against the upload limit and dropped.
 */
export const POST = withErrors(async (request: Request) => {
  requirePermissionSomewhere(await getViewer(), "setup.edit");
  const { fields, file } = await readMultipartBody(request, {
    fileField: "file",
    maxFileBytes: getEnv().LAPSEBANK_MAX_UPLOAD_MB * 1024 * 1024,
    keepFileBytes: LAYOUT_PREVIEW_BYTES + 1,
  });
  if (!file) return jsonError(400, "invalid-request", "file: attach a sample logger file");
  let specJson: unknown;
  try {
    specJson = JSON.parse(fields.spec ?? "");
  } catch {
    return jsonError(400, "invalid-request", "spec: send the layout as JSON");
  }
  const spec = loggerLayoutSpecSchema.safeParse(specJson);
  if (!spec.success) return validationError(spec.error);
  return jsonOk({ preview: await previewLayoutSample(file.bytes, spec.data, file.name || "sample") });
});
