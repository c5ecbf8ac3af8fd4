import "server-only";
import type { Viewer } from "@/lib/auth/visibility";

/**
 * Whether a viewer may change a school's setup (sites, payloads, sensors, calibrations, layouts)
 * or re-analyse its flights. Local mode edits everything; members edit their own schools.
 */
export function mayEditSchool(viewer: Viewer, schoolId: string): boolean {
  switch (viewer.kind) {
    case "local":
      return true;
    case "anonymous":
      return false;
    case "member":
      return viewer.isProgramAdmin || viewer.schoolIds.includes(schoolId);
  }
}

/** Program-wide analysis parameters are for the program's administrators. */
export function mayEditProgram(viewer: Viewer): boolean {
  return viewer.kind === "local" || (viewer.kind === "member" && viewer.isProgramAdmin);
}

export const NOT_ALLOWED = "You may not change this school's setup";
