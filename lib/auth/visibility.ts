import type { Prisma } from "../db/index.ts";

/**
 * Who is asking. While no account exists (a fresh laptop install), the app runs in single-user
 * "local" mode where the person at the machine sees and edits everything; the first account
 * created becomes program admin and from then on visitors are anonymous until they sign in.
 */
export type Viewer =
  | { kind: "local" }
  | { kind: "anonymous" }
  | {
      kind: "member";
      userId: string;
      isProgramAdmin: boolean;
      /** Schools the viewer belongs to (for an API token: the token's school only). */
      schoolIds: string[];
      memberships: Array<{ schoolId: string; role: Role }>;
      /** Set when the request came with an API token: what the token may do. */
      tokenScopes?: TokenScope[];
      email?: string;
      displayName?: string;
    };

export type Role = "school-admin" | "contributor" | "reader";
export type TokenScope = "read" | "upload";

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
