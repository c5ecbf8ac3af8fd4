import { NextResponse, type NextRequest } from "next/server";
import { isSameOriginRequest } from "@/lib/http/same-origin";

/**
 * Server actions posted from another origin get a plain 403. Next.js refuses them too, but with
 * a 500 that reads like a crash in the logs and in monitoring.
 *
 * Only possible server-action posts that the browser did not mark `Sec-Fetch-Site: same-origin`
 * reach this function (see `config`): those with a `Next-Action` header, and multipart posts to a
 * page (a plain HTML form names its action in the body). Next buffers the body of every request
 * its proxy handles, so the Upload page's own posts (same-origin) and every /api/v1 upload stay
 * out of it.
 */
export function proxy(request: NextRequest): NextResponse {
  if (!isSameOriginRequest(request.headers)) {
    return NextResponse.json(
      { error: { code: "cross-origin", message: "This form was sent from another site; use Lapsebank's own pages" } },
      { status: 403, headers: { "Cache-Control": "no-store" } },
    );
  }
  return NextResponse.next();
}

export const config = {
  matcher: [
    {
      source: "/:path*",
      has: [{ type: "header", key: "next-action" }],
      missing: [{ type: "header", key: "sec-fetch-site", value: "same-origin" }],
    },
    {
      source: "/((?!api/|_next/).*)",
      has: [{ type: "header", key: "content-type", value: "multipart/form-data.*" }],
      missing: [{ type: "header", key: "sec-fetch-site", value: "same-origin" }],
    },
  ],
};
