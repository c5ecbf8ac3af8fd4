/**
 * Sets the `x-lapsebank-peer-address` request header to the TCP peer's address, replacing any
 * copy the client sent, before Next.js sees the request. Route handlers and server actions cannot
 * read the socket themselves (lib/auth/trusted-proxy.ts reads this header).
 * Plain JavaScript: loaded by app-server.mjs, which needs no TypeScript loader.
 */
export const PEER_ADDRESS_HEADER = "x-lapsebank-peer-address";

/** @param {import("node:http").IncomingMessage} request */
export function stampPeerAddress(request) {
  delete request.headers[PEER_ADDRESS_HEADER];
  for (let i = request.rawHeaders.length - 2; i >= 0; i -= 2) {
    if (request.rawHeaders[i]?.toLowerCase() === PEER_ADDRESS_HEADER) request.rawHeaders.splice(i, 2);
  }
  const address = request.socket.remoteAddress;
  if (address) {
    request.headers[PEER_ADDRESS_HEADER] = address;
    request.rawHeaders.push(PEER_ADDRESS_HEADER, address);
  }
}
