import { BlockList, isIP } from "node:net";

/**
 * Header that `lib/cli/app-server.mjs` sets on every request to the TCP peer's address, after
 * removing any copy the client sent. Nothing else can tell a route handler the socket address:
 * Next.js fills `x-forwarded-for` from the socket only when the client did not send one.
 */
export const PEER_ADDRESS_HEADER = "x-lapsebank-peer-address";

/** Label used when the peer address is unknown (the app was started without app-server.mjs). */
export const UNKNOWN_ADDRESS = "unknown";

/**
 * Which proxies in front of the app are believed about the client (LAPSEBANK_TRUSTED_PROXY):
 * none (default: the socket address is the client), a hop count (that many proxies always stand
 * in front, the nearest being the socket peer), or a list of proxy addresses and CIDR ranges.
 */
export type TrustedProxy =
  | { kind: "none" }
  | { kind: "hops"; count: number }
  | { kind: "list"; entries: string[]; blockList: BlockList };

/** An IPv4-mapped IPv6 address (`::ffff:10.0.0.1`) is the IPv4 address. */
export function normaliseAddress(address: string): string {
  const trimmed = address.trim().replace(/^\[(.*)\]$/, "$1").toLowerCase();
  const mapped = trimmed.match(/^::ffff:(\d+\.\d+\.\d+\.\d+)$/);
  return mapped?.[1] ?? trimmed;
}

/** Parses LAPSEBANK_TRUSTED_PROXY; throws with a readable message on anything it does not understand. */
export function parseTrustedProxy(text: string | undefined): TrustedProxy {
  const value = text?.trim() ?? "";
  if (value === "" || value === "none" || value === "0") return { kind: "none" };
  if (/^\d+$/.test(value)) {
    const count = Number(value);
    if (count > 20) throw new Error("LAPSEBANK_TRUSTED_PROXY: a hop count above 20 is not plausible");
    return { kind: "hops", count };
  }
  const blockList = new BlockList();
  const entries = value.split(",").map((s) => s.trim()).filter(Boolean);
  for (const entry of entries) {
    const [address = "", prefixText] = entry.split("/");
    const normal = normaliseAddress(address);
    const family = isIP(normal);
    if (family === 0) throw new Error(`LAPSEBANK_TRUSTED_PROXY: "${entry}" is neither a hop count nor an IP address or CIDR range`);
    const type = family === 4 ? "ipv4" : "ipv6";
    if (prefixText === undefined) {
      blockList.addAddress(normal, type);
      continue;
    }
    const prefix = Number(prefixText);
    if (!/^\d+$/.test(prefixText) || prefix > (family === 4 ? 32 : 128)) throw new Error(`LAPSEBANK_TRUSTED_PROXY: "${entry}" has an invalid prefix length`);
    blockList.addSubnet(normal, prefix, type);
  }
  return { kind: "list", entries, blockList };
}

function isTrustedAddress(proxy: Extract<TrustedProxy, { kind: "list" }>, address: string): boolean {
  const family = isIP(address);
  if (family === 0) return false;
  return proxy.blockList.check(address, family === 4 ? "ipv4" : "ipv6");
}

export interface ForwardingHeaders {
  /** The socket peer's address (from PEER_ADDRESS_HEADER), or null when unknown. */
  peerAddress: string | null;
  /** The raw `X-Forwarded-For` header (client, proxy1, proxy2, …), possibly sent by anybody. */
  forwardedFor: string | null;
}

/** Reads the two headers the client-address rule needs. */
export function forwardingHeaders(headers: { get(name: string): string | null }): ForwardingHeaders {
  const peer = headers.get(PEER_ADDRESS_HEADER)?.trim();
  return { peerAddress: peer ? normaliseAddress(peer) : null, forwardedFor: headers.get("x-forwarded-for") };
}

/** X-Forwarded-For hops nearest first (the right-most entry was written by the proxy nearest to us). */
function hopsNearestFirst(forwardedFor: string | null): string[] {
  if (!forwardedFor) return [];
  return forwardedFor.split(",").map((s) => normaliseAddress(s)).filter(Boolean).reverse();
}

/** Bounded, printable label for an address taken from a header (a key in the throttle table). */
function label(address: string): string {
  return address.replace(/[^0-9a-z.:_-]/gi, "").slice(0, 64) || UNKNOWN_ADDRESS;
}

/**
 * The client address used for sign-in limits. Without a trusted proxy it is the socket peer and
 * X-Forwarded-For is ignored (anybody can send it). With a hop count N it is the N-th address
 * counting the peer as 0 and then X-Forwarded-For from the right (fewer hops: the left-most).
 * With a list it walks from the peer leftwards through X-Forwarded-For while the address is a
 * listed proxy and returns the first one that is not (all listed: the left-most).
 * Hop counts are believed even when the peer is unknown (the operator states the app is reachable
 * only through the proxies); a list needs the peer, else the result is UNKNOWN_ADDRESS.
 */
export function clientAddress(forwarding: ForwardingHeaders, proxy: TrustedProxy): string {
  const peer = forwarding.peerAddress;
  if (proxy.kind === "none") return peer ? label(peer) : UNKNOWN_ADDRESS;
  const hops = hopsNearestFirst(forwarding.forwardedFor);
  if (proxy.kind === "hops") {
    if (proxy.count === 0) return peer ? label(peer) : UNKNOWN_ADDRESS;
    const chain = [peer, ...hops];
    const chosen = chain[Math.min(proxy.count, chain.length - 1)];
    return chosen ? label(chosen) : UNKNOWN_ADDRESS;
  }
  if (!peer) return UNKNOWN_ADDRESS;
  let current = peer;
  for (const hop of hops) {
    if (!isTrustedAddress(proxy, current)) break;
    current = hop;
  }
  return label(current);
}

/** Whether the request's forwarding headers (host, protocol) come from a trusted proxy. */
export function fromTrustedProxy(forwarding: ForwardingHeaders, proxy: TrustedProxy): boolean {
  if (proxy.kind === "none") return false;
  if (proxy.kind === "hops") return proxy.count > 0;
  return forwarding.peerAddress !== null && isTrustedAddress(proxy, forwarding.peerAddress);
}

const HOST_PATTERN = /^(?:[a-z0-9](?:[a-z0-9-]{0,61}[a-z0-9])?(?:\.[a-z0-9](?:[a-z0-9-]{0,61}[a-z0-9])?)*|\[[0-9a-f:.]+\])(?::\d{1,5})?$/i;

/**
 * The origin (`https://host[:port]`) links and `Location` headers should use: the configured public
 * URL first; else the host and protocol a trusted proxy forwarded (`X-Forwarded-Host`, or `Host`,
 * and `X-Forwarded-Proto`; the first value of each when proxies chain); else the request's own URL.
 */
export function publicOrigin(input: { requestUrl: string; headers: { get(name: string): string | null }; publicUrl: string | undefined; proxy: TrustedProxy }): string {
  if (input.publicUrl) return new URL(input.publicUrl).origin;
  if (fromTrustedProxy(forwardingHeaders(input.headers), input.proxy)) {
    const host = (input.headers.get("x-forwarded-host") ?? input.headers.get("host"))?.split(",")[0]?.trim();
    const protoHeader = input.headers.get("x-forwarded-proto")?.split(",")[0]?.trim().toLowerCase();
    const proto = protoHeader === "https" || protoHeader === "http" ? protoHeader : new URL(input.requestUrl).protocol.replace(":", "");
    if (host && HOST_PATTERN.test(host)) return `${proto}://${host.toLowerCase()}`;
  }
  return new URL(input.requestUrl).origin;
}
