import type { IncomingMessage } from "node:http";
import ipaddr from "ipaddr.js";
import proxyaddr from "proxy-addr";

/**
 * Which address a request came from, for limits. The connection's own address is the only one a
 * client cannot choose: X-Forwarded-For is whatever the client wrote unless a proxy of ours wrote
 * it, so it is read only as far as TWINLEAF_TRUSTED_PROXY_HOPS says there are proxies of ours.
 */

/** The request header that carries the connection's address to pages and actions (see stampPeerAddress). */
export const PEER_HEADER = "x-twinleaf-peer";

/** TWINLEAF_TRUSTED_PROXY_HOPS: how many proxies of our own stand in front (0 when unset or not a whole number). */
export function trustedProxyHops(value = process.env.TWINLEAF_TRUSTED_PROXY_HOPS): number {
  const n = Number(value);
  return Number.isInteger(n) && n > 0 ? Math.min(n, 10) : 0;
}

/**
 * The client's address: the connection's when no proxy is trusted; with `hops` proxies of ours,
 * the X-Forwarded-For entry that many hops from the right (proxy-addr does the walking, as Express's
 * "trust proxy" with a number does). IPv4 written as IPv6 becomes IPv4, and IPv6 addresses are
 * counted by their /64 network, since one subscriber usually holds a whole /64.
 */
export function clientAddressOf(input: { peer: string | null | undefined; forwardedFor: string | null | undefined; hops: number }): string {
  const peer = input.peer?.trim();
  if (!peer) return "unknown";
  const req = { socket: { remoteAddress: peer }, headers: input.forwardedFor ? { "x-forwarded-for": input.forwardedFor } : {} };
  const chosen = proxyaddr(req as unknown as IncomingMessage, (_addr, i) => i < input.hops);
  return normaliseAddress(chosen);
}

export function normaliseAddress(address: string): string {
  const text = address.trim();
  if (!ipaddr.isValid(text)) return `other:${text.slice(0, 64)}`;
  const parsed = ipaddr.process(text);
  if (parsed.kind() === "ipv4") return parsed.toString();
  const network = ipaddr.IPv6.networkAddressFromCIDR(`${parsed.toString()}/64`);
  return `${network.toString()}/64`;
}
