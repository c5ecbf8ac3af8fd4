import type { Db } from "../db/index.ts";
import { countUsers, viewerFromSession, viewerFromToken } from "./accounts.ts";
import { LOCAL_VIEWER, type Viewer } from "./visibility.ts";

export type ViewerResolution = { viewer: Viewer } | { viewer: null; error: "invalid-token" };

/**
 * Who is asking, from the request's session cookie or `Authorization: Bearer` token. With no
 * account in the database the install is a single-user laptop ("local"): full access.
 * A bad or revoked token is an error (401), never a silent fall-back to anonymous.
 */
export async function resolveViewer(db: Db, request: { sessionSecret?: string | undefined; authorization?: string | null }): Promise<ViewerResolution> {
  if ((await countUsers(db)) === 0) return { viewer: LOCAL_VIEWER };
  const bearer = request.authorization?.match(/^Bearer\s+(\S+)$/i)?.[1];
  if (bearer) {
    const viewer = await viewerFromToken(db, bearer);
    return viewer ? { viewer } : { viewer: null, error: "invalid-token" };
  }
  const viewer = await viewerFromSession(db, request.sessionSecret);
  return { viewer: viewer ?? { kind: "anonymous" } };
}
