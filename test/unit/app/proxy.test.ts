import { describe, expect, test } from "vitest";
import { NextRequest } from "next/server";
import { unstable_doesMiddlewareMatch } from "next/experimental/testing/server";
import { config, proxy } from "@/proxy";

const HOST = "127.0.0.1:3000";

function actionPost(headers: Record<string, string>): NextRequest {
  return new NextRequest(`http://${HOST}/account`, { method: "POST", headers: { host: HOST, "next-action": "abc123", "content-type": "text/plain;charset=UTF-8", ...headers }, body: "[]" });
}

describe("server actions from another origin", () => {
  test("a foreign Origin or a same-site (other port) post answers 403, not Next's 500", async () => {
    const forged: Array<Record<string, string>> = [{ origin: "http://attacker.invalid" }, { origin: "http://127.0.0.1:8081", "sec-fetch-site": "same-site" }, { "sec-fetch-site": "cross-site" }];
    for (const headers of forged) {
      const response = proxy(actionPost(headers));
      expect(response.status).toBe(403);
      expect((await response.json()).error.code).toBe("cross-origin");
    }
  });

  test("our own pages' posts go on to the action", () => {
    const response = proxy(actionPost({ origin: `http://${HOST}` }));
    expect(response.headers.get("x-middleware-next")).toBe("1");
  });

  test("the proxy sees server-action posts not marked same-origin, and nothing else (no upload bodies buffered)", () => {
    const matches = (url: string, headers: Record<string, string>) => unstable_doesMiddlewareMatch({ config, url, headers });
    expect(matches("/account", { "next-action": "abc", origin: "http://attacker.invalid" })).toBe(true);
    expect(matches("/upload", { "next-action": "abc", "sec-fetch-site": "cross-site" })).toBe(true);
    expect(matches("/upload", { "next-action": "abc", "sec-fetch-site": "same-origin" })).toBe(false);
    expect(matches("/api/v1/flights", { "content-type": "multipart/form-data; boundary=x" })).toBe(false);
    expect(matches("/flights", {})).toBe(false);
    // A plain HTML form names its action in a multipart body, without the header.
    expect(matches("/account", { "content-type": "multipart/form-data; boundary=x", "sec-fetch-site": "same-site" })).toBe(true);
    expect(matches("/", { "content-type": "multipart/form-data; boundary=x" })).toBe(true);
    expect(matches("/account", { "content-type": "multipart/form-data; boundary=x", "sec-fetch-site": "same-origin" })).toBe(false);
    expect(matches("/api/v1/setup/layouts/preview", { "content-type": "multipart/form-data; boundary=x", "sec-fetch-site": "cross-site" })).toBe(false);
  });
});
