import "server-only";
import type { z } from "zod";
import { can, refusalStatus, requirePermissionSomewhere, type Action } from "@/lib/auth/permissions";
import { readJsonBody } from "@/lib/http/request-body";
import { readingViewer } from "@/lib/auth/visibility";
import { OverlappingCalibrationError } from "@/lib/ingest";
import { CalibrationFitError, SetupConflictError } from "@/lib/ingest/setup-more";
import { getViewer } from "@/app/_lib/viewer";
import { jsonError, validationError } from "../../_lib/respond";

/**
 * Reads a JSON body and validates it with the one shared schema; a Response when it does not
 * validate. Before a byte is read the viewer must be someone who may edit some school's setup
 * (401/403 otherwise; the route still checks the school itself afterwards); the body must be
 * `application/json` (415) and at most MAX_JSON_BODY_BYTES (413).
 */
export async function readJson<S extends z.ZodType>(request: Request, schema: S): Promise<{ data: z.output<S> } | { response: Response }> {
  requirePermissionSomewhere(await getViewer(), "setup.edit");
  const parsed = await readJsonBody(request, schema);
  return parsed.success ? { data: parsed.data as z.output<S> } : { response: validationError(parsed.error) };
}

/** Null when the viewer may act on the school's setup (or on the program when schoolId is null), else the 401/403 answer. */
export async function refuseUnlessAllowed(schoolId: string | null, action: Action = schoolId === null ? "program.settings" : "setup.edit"): Promise<Response | null> {
  const viewer = await getViewer();
  if (can(viewer, action, { schoolId })) return null;
  const status = refusalStatus(viewer);
  return jsonError(status, status === 401 ? "unauthenticated" : "forbidden", status === 401 ? "Sign in or send an API token first" : "You may not change this setup");
}

/** Setup belongs to the program's members: visitors (and people in no school) get 401/403 before any read. */
export async function refuseVisitors(): Promise<Response | null> {
  const viewer = await getViewer();
  if (viewer.kind === "local" || (viewer.kind === "member" && readingViewer(viewer).kind === "member")) return null;
  return viewer.kind === "anonymous"
    ? jsonError(401, "unauthenticated", "Sign in or send an API token first")
    : jsonError(403, "forbidden", "Setup is visible to the program's members");
}

/** Known setup failures in the one error shape: conflicts 409, unfit data 422, missing rows 404. */
export function setupFailure(error: unknown): Response {
  if (error instanceof OverlappingCalibrationError) return jsonError(409, "overlapping-calibration", error.message);
  if (error instanceof SetupConflictError) return jsonError(409, "setup-conflict", error.message);
  if (error instanceof CalibrationFitError) return jsonError(422, "fit-failed", error.message);
  if (typeof error === "object" && error !== null && "code" in error) {
    if (error.code === "P2002") return jsonError(409, "duplicate-name", "That name is already used in this school");
    if (error.code === "P2025") return jsonError(404, "not-found", "Not found");
  }
  throw error;
}

/** `?school=` (or another id parameter), trimmed; undefined when absent. */
export function idParam(request: Request, name: string): string | undefined {
  const value = new URL(request.url).searchParams.get(name)?.trim();
  return value && value.length <= 64 ? value : undefined;
}
