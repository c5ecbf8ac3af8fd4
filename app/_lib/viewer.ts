import "server-only";
import { cache } from "react";
import { cookies, headers } from "next/headers";
import { SESSION_COOKIE } from "@/lib/auth/accounts";
import { PermissionError } from "@/lib/auth/permissions";
import { resolveViewer } from "@/lib/auth/resolve-viewer";
import type { Viewer } from "@/lib/auth/visibility";
import { getDb } from "@/lib/db";
import { getEnv } from "@/lib/env";
import { clientAddress, forwardingHeaders, publicOrigin } from "@/lib/auth/trusted-proxy";

/**
 * Who is looking at the page or calling the API: the session cookie, an `Authorization: Bearer`
 * API token, or an anonymous visitor (single-user "local" while no account exists). Every page,
 * action and route handler asks here. An unknown or revoked token is refused with 401.
 */
export const getViewer = cache(async (): Promise<Viewer> => {
  const [cookieStore, headerStore] = await Promise.all([cookies(), headers()]);
  // API tokens are for scripts calling /api/v1; a server action (a browser form) acts only with the
  // signed-in session, so a token can never reach account or setup actions.
  const isServerAction = headerStore.has("next-action");
  const resolution = await resolveViewer(getDb(), {
    sessionSecret: cookieStore.get(SESSION_COOKIE)?.value,
    authorization: isServerAction ? null : headerStore.get("authorization"),
  });
  if (!resolution.viewer) throw new PermissionError(401, "The API token is unknown or has been revoked");
  return resolution.viewer;
});

/**
 * The client's address for sign-in limits: the socket peer, or what a configured trusted proxy
 * (LAPSEBANK_TRUSTED_PROXY) forwarded; never an X-Forwarded-For the client wrote itself.
 */
export async function getClientAddress(): Promise<string> {
  return clientAddress(forwardingHeaders(await headers()), getEnv().LAPSEBANK_TRUSTED_PROXY);
}

/**
 * The origin links shown on pages should use (pages and actions have no Request): LAPSEBANK_PUBLIC_URL,
 * else what a trusted proxy forwarded, else the Host this request came to (plain http: set
 * LAPSEBANK_PUBLIC_URL when the server sits behind TLS).
 */
export async function getPublicOrigin(): Promise<string> {
  const headerStore = await headers();
  const env = getEnv();
  let requestUrl = "http://localhost";
  try {
    requestUrl = new URL(`http://${headerStore.get("host") ?? "localhost"}`).toString();
  } catch {
    // A malformed Host header: fall back to localhost rather than fail the page.
  }
  return publicOrigin({ requestUrl, headers: headerStore, publicUrl: env.LAPSEBANK_PUBLIC_URL, proxy: env.LAPSEBANK_TRUSTED_PROXY });
}

/** Who to credit in the audit log for what this request changes. */
export async function currentActor(fallbackLabel: string): Promise<{ userId: string | null; label: string }> {
  const viewer = await getViewer();
  return viewer.kind === "member" ? { userId: viewer.userId, label: viewer.email ?? viewer.userId } : { userId: null, label: fallbackLabel };
}
