import "server-only";
import { can } from "@/lib/auth/permissions";
import type { Viewer } from "@/lib/auth/visibility";

/** May the viewer change a school's setup (sites, payloads, sensors, calibrations, layouts) or re-analyse its flights? */
export function mayEditSchool(viewer: Viewer, schoolId: string): boolean {
  return can(viewer, "setup.edit", { schoolId });
}

/** Program-wide analysis parameters are for the program's administrators. */
export function mayEditProgram(viewer: Viewer): boolean {
  return can(viewer, "program.settings", { schoolId: null });
}

export const NOT_ALLOWED = "You may not change this school's setup";
