import { describe, expect, test } from "vitest";
import { clientAddressOf, normaliseAddress, trustedProxyHops } from "@/lib/auth/client-address";

describe("clientAddressOf", () => {
  // Expected values follow proxy-addr's documented walk (github.com/jshttp/proxy-addr README, "trust"
  // as a function of the hop number): addresses from the socket leftwards through X-Forwarded-For,
  // the first one not trusted is the client's.
  test.each<[string, string | null, string | null, number, string]>([
    ["no proxy trusted: the socket, whatever the client forwarded", "192.0.2.10", "203.0.113.5", 0, "192.0.2.10"],
    ["no proxy trusted, a forged chain", "192.0.2.10", "1.1.1.1, 2.2.2.2", 0, "192.0.2.10"],
    ["one proxy: the last forwarded entry", "10.0.0.2", "198.51.100.1, 203.0.113.5", 1, "203.0.113.5"],
    ["two proxies: two from the right", "10.0.0.2", "198.51.100.1, 203.0.113.5, 10.0.0.1", 2, "203.0.113.5"],
    ["one proxy, but nothing forwarded: the socket", "10.0.0.2", null, 1, "10.0.0.2"],
    ["more hops trusted than entries: the leftmost entry", "10.0.0.2", "203.0.113.5", 3, "203.0.113.5"],
    ["no socket address at all", null, "203.0.113.5", 1, "unknown"],
  ])("%s", (_label, peer, forwardedFor, hops, expected) => {
    expect(clientAddressOf({ peer, forwardedFor, hops })).toBe(expected);
  });
});

describe("normaliseAddress", () => {
  // IPv4-mapped IPv6 per RFC 4291 §2.5.5.2; /64 as the usual end-site prefix per RFC 6177 (common practice for limits).
  test.each<[string, string]>([
    ["203.0.113.7", "203.0.113.7"],
    ["::ffff:203.0.113.7", "203.0.113.7"],
    ["2001:db8:1:2:aaaa::1", "2001:db8:1:2::/64"],
    ["2001:db8:1:2:bbbb:cccc:dddd:eeee", "2001:db8:1:2::/64"],
    ["not an address", "other:not an address"],
  ])("%s → %s", (input, expected) => {
    expect(normaliseAddress(input)).toBe(expected);
  });
});

describe("trustedProxyHops", () => {
  test.each<[string | undefined, number]>([
    [undefined, 0],
    ["", 0],
    ["0", 0],
    ["1", 1],
    ["2", 2],
    ["-1", 0],
    ["1.5", 0],
    ["yes", 0],
  ])("TWINLEAF_TRUSTED_PROXY_HOPS=%s → %i", (value, expected) => {
    expect(trustedProxyHops(value)).toBe(expected);
  });
});
