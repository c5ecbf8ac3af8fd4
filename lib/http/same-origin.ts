/**
 * Whether a request that changes something came from one of our own pages (or from no browser
 * page at all), so that another site (or another port of this host) cannot make a signed-in
 * browser act for it (cross-site request forgery).
 *
 * - `Sec-Fetch-Site`, which browsers set and pages cannot, must be `same-origin` (or `none`, a
 *   request the person started themselves). `same-site` is refused: another port of the same
 *   host is the same site but a different origin.
 * - `Origin`, when present, must name the host the request was sent to: `X-Forwarded-Host` (first
 *   value) when a reverse proxy set it, else `Host`, else the host of `fallbackUrl`. This is the
 *   comparison Next.js makes for server actions, so pages and the API agree.
 * - No `Origin` and no `Sec-Fetch-Site`: not sent by a browser page (a script, curl); such a
 *   client holds no one else's cookie, so there is nothing to forge.
 */
export function isSameOriginRequest(headers: Headers, fallbackUrl?: string): boolean {
  const site = headers.get("sec-fetch-site");
  if (site !== null && site !== "same-origin" && site !== "none") return false;
  const origin = headers.get("origin");
  if (origin === null) return true;
  let originHost: string;
  try {
    originHost = new URL(origin).host;
  } catch {
    return false; // "null" (a sandboxed frame, a file) or garbage
  }
  const host = requestedHost(headers, fallbackUrl);
  return host !== null && originHost.toLowerCase() === host.toLowerCase();
}

function requestedHost(headers: Headers, fallbackUrl: string | undefined): string | null {
  const forwarded = headers.get("x-forwarded-host")?.split(",")[0]?.trim();
  if (forwarded) return forwarded;
  const host = headers.get("host");
  if (host) return host;
  if (!fallbackUrl) return null;
  try {
    return new URL(fallbackUrl).host;
  } catch {
    return null;
  }
}

/** Methods that change nothing; every other method is a write. */
export const SAFE_METHODS: ReadonlySet<string> = new Set(["GET", "HEAD", "OPTIONS"]);

/** True when the request carries an `Authorization: Bearer` token (scripts; a page on another site cannot add one). */
export function hasBearerToken(headers: Headers): boolean {
  return /^Bearer\s+\S+$/i.test(headers.get("authorization") ?? "");
}
