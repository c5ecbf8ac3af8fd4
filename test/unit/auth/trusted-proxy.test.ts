import { describe, expect, test } from "vitest";
import { clientAddress, forwardingHeaders, parseTrustedProxy, PEER_ADDRESS_HEADER, publicOrigin, UNKNOWN_ADDRESS } from "@/lib/auth/trusted-proxy";

const headers = (fields: Record<string, string>) => new Headers(fields);
const from = (peer: string | null, forwardedFor?: string) =>
  forwardingHeaders(headers({ ...(peer ? { [PEER_ADDRESS_HEADER]: peer } : {}), ...(forwardedFor ? { "x-forwarded-for": forwardedFor } : {}) }));

describe("client address behind (or without) a trusted proxy", () => {
  test("unset, none and 0 mean no proxy: the socket address, whatever X-Forwarded-For says", () => {
    for (const setting of [undefined, "", "none", "0"]) {
      expect(clientAddress(from("::ffff:192.0.2.1", "203.0.113.9"), parseTrustedProxy(setting))).toBe("192.0.2.1");
    }
    // Started without app-server.mjs: no peer is known, and a client-sent header is still not believed.
    expect(clientAddress(from(null, "203.0.113.9"), parseTrustedProxy(undefined))).toBe(UNKNOWN_ADDRESS);
  });

  test("hop counts pick the N-th address from the socket; too few hops give the left-most", () => {
    expect(clientAddress(from("10.0.0.1", "198.51.100.1, 10.0.0.5"), parseTrustedProxy("2"))).toBe("198.51.100.1");
    expect(clientAddress(from("10.0.0.1", "198.51.100.1"), parseTrustedProxy("3"))).toBe("198.51.100.1");
    expect(clientAddress(from("10.0.0.1"), parseTrustedProxy("1"))).toBe("10.0.0.1");
  });

  test("address lists accept IPv4, IPv6 and CIDR ranges and refuse anything else", () => {
    const proxy = parseTrustedProxy("2001:db8::/32, 192.0.2.10");
    expect(clientAddress(from("2001:db8::7", "2001:db8:ffff::1, 198.51.100.3, 192.0.2.10"), proxy)).toBe("198.51.100.3");
    expect(clientAddress(from("[2001:db8::7]", "2001:DB8::1"), proxy)).toBe("2001:db8::1");
    expect(clientAddress(from(null, "198.51.100.3"), proxy)).toBe(UNKNOWN_ADDRESS);
    expect(() => parseTrustedProxy("10.0.0.0/33")).toThrow(/prefix/);
    expect(() => parseTrustedProxy("10.0.0.0/8, localhost")).toThrow(/neither a hop count/);
    expect(() => parseTrustedProxy("99")).toThrow(/hop count/);
  });

  test("a garbage forwarded entry becomes a short printable label", () => {
    const address = clientAddress(from("10.0.0.1", `${"x".repeat(500)}<script>`), parseTrustedProxy("1"));
    expect(address.length).toBeLessThanOrEqual(64);
    expect(address).toMatch(/^[0-9a-z.:_-]+$/i);
  });
});

describe("public origin for absolute URLs", () => {
  const requestUrl = "http://localhost:3000/api/v1/flights";
  test("the configured public URL wins", () => {
    expect(publicOrigin({ requestUrl, headers: headers({ "x-forwarded-host": "other.example" }), publicUrl: "https://archive.example.org", proxy: parseTrustedProxy("1") })).toBe("https://archive.example.org");
  });
  test("a trusted proxy's host and protocol; the first of a chain", () => {
    const h = headers({ [PEER_ADDRESS_HEADER]: "10.0.0.1", "x-forwarded-host": "balloons.example.net:8443, inner.local", "x-forwarded-proto": "https, http" });
    expect(publicOrigin({ requestUrl, headers: h, publicUrl: undefined, proxy: parseTrustedProxy("10.0.0.0/8") })).toBe("https://balloons.example.net:8443");
  });
  test("forwarded headers from anybody else, or a malformed host, leave the request's own origin", () => {
    const forged = headers({ [PEER_ADDRESS_HEADER]: "192.0.2.1", "x-forwarded-host": "evil.example" });
    expect(publicOrigin({ requestUrl, headers: forged, publicUrl: undefined, proxy: parseTrustedProxy("10.0.0.0/8") })).toBe("http://localhost:3000");
    expect(publicOrigin({ requestUrl, headers: forged, publicUrl: undefined, proxy: parseTrustedProxy(undefined) })).toBe("http://localhost:3000");
    const odd = headers({ [PEER_ADDRESS_HEADER]: "10.0.0.1", "x-forwarded-host": "evil.example/path@x" });
    expect(publicOrigin({ requestUrl, headers: odd, publicUrl: undefined, proxy: parseTrustedProxy("1") })).toBe("http://localhost:3000");
  });
});
