import { loggerLayoutSpecSchema } from "@/lib/ingest/layout";
import { LAYOUT_PREVIEW_BYTES, previewLayoutSample } from "@/lib/ingest/setup-more";
import { jsonError, jsonOk, validationError, withErrors } from "../../../_lib/respond";

export const runtime = "nodejs";

/**
 * POST /api/v1/setup/layouts/preview (multipart/form-data: `file`, `spec` as JSON): reads the first
 * 64 KB of the sample with the layout and returns the rows and every problem with line and column.
 */
export const POST = withErrors(async (request: Request) => {
  let form: FormData;
  try {
    form = await request.formData();
  } catch {
    return jsonError(400, "invalid-request", "Send multipart/form-data with a `file` and a `spec` (JSON) field");
  }
  const file = form.get("file");
  if (!(file instanceof File)) return jsonError(400, "invalid-request", "file: attach a sample logger file");
  let specJson: unknown;
  try {
    specJson = JSON.parse(String(form.get("spec") ?? ""));
  } catch {
    return jsonError(400, "invalid-request", "spec: send the layout as JSON");
  }
  const spec = loggerLayoutSpecSchema.safeParse(specJson);
  if (!spec.success) return validationError(spec.error);
  const bytes = new Uint8Array(await file.slice(0, LAYOUT_PREVIEW_BYTES + 1).arrayBuffer());
  return jsonOk({ preview: await previewLayoutSample(bytes, spec.data, file.name || "sample") });
});
