import type { Db } from "../db/index.ts";
import { countUsers, viewerFromSession, viewerFromToken } from "./accounts.ts";
import { LOCAL_VIEWER, type Viewer } from "./visibility.ts";

/** How long "this database has accounts" is trusted before asking again. */
const ACCOUNTS_EXIST_TTL_MS = 5_000;
const accountsSeenAt = new WeakMap<Db, number>();

/**
 * Whether any account exists. Asked on every request, so a yes is remembered for a few seconds
 * (per database client): accounts are only ever removed by wiping the whole database, and a
 * stale yes means a wiped laptop install asks for sign-in for at most that long. A no is never
 * remembered, so the first account takes effect at once in every app process.
 */
async function accountsExist(db: Db): Promise<boolean> {
  const seenAt = accountsSeenAt.get(db);
  if (seenAt !== undefined && Date.now() - seenAt < ACCOUNTS_EXIST_TTL_MS) return true;
  const exist = (await countUsers(db)) > 0;
  if (exist) accountsSeenAt.set(db, Date.now());
  else accountsSeenAt.delete(db);
  return exist;
}

export type ViewerResolution = { viewer: Viewer } | { viewer: null; error: "invalid-token" };

/**
 * Who is asking, from the request's session cookie or `Authorization: Bearer` token. With no
 * account in the database the install is a single-user laptop ("local"): full access.
 * A bad or revoked token is an error (401), never a silent fall-back to anonymous.
 */
export async function resolveViewer(db: Db, request: { sessionSecret?: string | undefined; authorization?: string | null }): Promise<ViewerResolution> {
  if (!(await accountsExist(db))) return { viewer: LOCAL_VIEWER };
  const bearer = request.authorization?.match(/^Bearer\s+(\S+)$/i)?.[1];
  if (bearer) {
    const viewer = await viewerFromToken(db, bearer);
    return viewer ? { viewer } : { viewer: null, error: "invalid-token" };
  }
  const viewer = await viewerFromSession(db, request.sessionSecret);
  return { viewer: viewer ?? { kind: "anonymous" } };
}
