import http from "node:http";
import type { AddressInfo } from "node:net";
import { describe, expect, test } from "vitest";
// @ts-expect-error plain JavaScript module without type declarations
import { PEER_ADDRESS_HEADER as STAMPED_HEADER, stampPeerAddress } from "../../../lib/cli/peer-address.mjs";
import { PEER_ADDRESS_HEADER } from "../../../lib/auth/trusted-proxy.ts";

describe("app-server stamps the socket address", () => {
  test("a client-sent copy of the header is replaced by the real peer address", async () => {
    expect(STAMPED_HEADER).toBe(PEER_ADDRESS_HEADER);
    const seen: Array<{ header: unknown; raw: string[] }> = [];
    const server = http.createServer((request, response) => {
      stampPeerAddress(request);
      seen.push({ header: request.headers[PEER_ADDRESS_HEADER], raw: request.rawHeaders.filter((_, i, all) => all[i - 1]?.toLowerCase() === PEER_ADDRESS_HEADER) });
      response.end("ok");
    });
    await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
    const { port } = server.address() as AddressInfo;
    try {
      await fetch(`http://127.0.0.1:${port}/`, { headers: { [PEER_ADDRESS_HEADER]: "203.0.113.66", "x-forwarded-for": "203.0.113.66" } });
    } finally {
      server.close();
    }
    expect(seen).toEqual([{ header: expect.stringMatching(/^(::ffff:)?127\.0\.0\.1$/), raw: [expect.stringMatching(/127\.0\.0\.1$/)] }]);
  });
});
