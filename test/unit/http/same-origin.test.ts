import { describe, expect, test } from "vitest";
import { hasBearerToken, isSameOriginRequest } from "@/lib/http/same-origin";

// Fetch Metadata (W3C Fetch Metadata Request Headers) and the Origin header (RFC 6454) [P]:
// another port of the same host is the same site but a different origin.
describe("same-origin writes", () => {
  test.each([
    ["no Origin, no Sec-Fetch-Site (a script)", { host: "lab.test:3000" }, true],
    ["own page", { host: "lab.test:3000", origin: "http://lab.test:3000", "sec-fetch-site": "same-origin" }, true],
    ["own page, older browser without Fetch Metadata", { host: "lab.test:3000", origin: "http://lab.test:3000" }, true],
    ["another port of the same host", { host: "lab.test:3000", origin: "http://lab.test:8080" }, false],
    ["another port, Fetch Metadata only", { host: "lab.test:3000", "sec-fetch-site": "same-site" }, false],
    ["another site", { host: "lab.test:3000", origin: "http://elsewhere.test", "sec-fetch-site": "cross-site" }, false],
    ["cross-site without Origin", { host: "lab.test:3000", "sec-fetch-site": "cross-site" }, false],
    ["opaque origin (sandboxed frame)", { host: "lab.test:3000", origin: "null" }, false],
    ["behind a reverse proxy that sets X-Forwarded-Host", { host: "127.0.0.1:3000", "x-forwarded-host": "archive.school.test", origin: "https://archive.school.test" }, true],
    ["host names compare without case", { host: "Lab.Test:3000", origin: "http://lab.test:3000" }, true],
  ])("%s", (_label, headers, expected) => {
    expect(isSameOriginRequest(new Headers(headers as Record<string, string>))).toBe(expected);
  });

  test("without a Host header the request URL names the host", () => {
    expect(isSameOriginRequest(new Headers({ origin: "http://lab.test:3000" }), "http://lab.test:3000/api/v1/flights")).toBe(true);
    expect(isSameOriginRequest(new Headers({ origin: "http://lab.test:3001" }), "http://lab.test:3000/api/v1/flights")).toBe(false);
  });

  test("only a well-formed bearer token counts as a token", () => {
    expect(hasBearerToken(new Headers({ authorization: "Bearer abc" }))).toBe(true);
    expect(hasBearerToken(new Headers({ authorization: "Bearer " }))).toBe(false);
    expect(hasBearerToken(new Headers({ authorization: "Basic abc" }))).toBe(false);
    expect(hasBearerToken(new Headers())).toBe(false);
  });
});
