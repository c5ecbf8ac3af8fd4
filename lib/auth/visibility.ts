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

/**
 * Whom a viewer counts as when reading flights: a signed-in person who belongs to no school (and is
 * not program admin) is not part of the program yet, and a token without the `read` scope reads
 * nothing private; both see what a visitor sees.
 */
export function readingViewer(viewer: Viewer): Viewer {
  if (viewer.kind !== "member") return viewer;
  if (viewer.tokenScopes && !viewer.tokenScopes.includes("read")) return { kind: "anonymous" };
  if (!viewer.isProgramAdmin && viewer.memberships.length === 0) return { kind: "anonymous" };
  return viewer;
}

/** The one place that decides which flights a viewer may see; every read goes through it. */
export function flightVisibilityWhere(asked: Viewer): Prisma.FlightWhereInput {
  const notDeleted: Prisma.FlightWhereInput = { deletedAt: null };
  const viewer = readingViewer(asked);
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
