import type { Prisma } from "../db/index.ts";

/**
 * Who is asking. Until accounts exist (sharing issue), the app runs in single-user "local"
 * mode where the person at the machine sees and edits everything.
 */
export type Viewer =
  | { kind: "local" }
  | { kind: "anonymous" }
  | { kind: "member"; userId: string; isProgramAdmin: boolean; schoolIds: string[] };

export const LOCAL_VIEWER: Viewer = { kind: "local" };

/** The one place that decides which flights a viewer may see; every read goes through it. */
export function flightVisibilityWhere(viewer: Viewer): Prisma.FlightWhereInput {
  const notDeleted: Prisma.FlightWhereInput = { deletedAt: null };
  switch (viewer.kind) {
    case "local":
      return notDeleted;
    case "anonymous":
      return { ...notDeleted, visibility: "public" };
    case "member":
      if (viewer.isProgramAdmin) return notDeleted;
      return { ...notDeleted, OR: [{ visibility: { in: ["public", "program"] } }, { schoolId: { in: viewer.schoolIds } }] };
  }
}
