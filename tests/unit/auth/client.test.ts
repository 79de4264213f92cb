import { describe, expect, it } from "vitest";
import { addressKey, checkTrustedProxies, clientAddress } from "@/lib/auth/client";

/**
 * Which address a sign-in try is counted against. X-Forwarded-For lists the client first and each
 * proxy appends the address it received from (the de-facto format, MDN "X-Forwarded-For"; RFC 7239
 * §5.2 for its successor); only entries added by proxies we run can be believed, so it is read from
 * the right, as Express's "trust proxy" reads it. Addresses are documentation ranges (RFC 5737, RFC 3849).
 */
describe("clientAddress", () => {
  it("with no trusted proxy, the TCP peer is the client, whatever X-Forwarded-For says", () => {
    expect(clientAddress("127.0.0.1", "198.51.100.1", undefined)).toBe("127.0.0.1");
    expect(clientAddress("192.0.2.9", "198.51.100.1, 198.51.100.2", "")).toBe("192.0.2.9");
  });

  it("behind a trusted proxy, the nearest address the proxy did not add itself", () => {
    expect(clientAddress("127.0.0.1", "203.0.113.5", "loopback")).toBe("203.0.113.5");
    // A client's forged first entry is passed on by the proxy, but the proxy's own entry is last.
    expect(clientAddress("127.0.0.1", "198.51.100.77, 203.0.113.5", "loopback")).toBe("203.0.113.5");
    // Two proxies of ours (a load balancer in 10.0.0.0/8 behind the local one).
    expect(clientAddress("127.0.0.1", "203.0.113.5, 10.1.2.3", "loopback, 10.0.0.0/8")).toBe("203.0.113.5");
    // A peer that is not a listed proxy is the client, even when proxies are listed.
    expect(clientAddress("192.0.2.9", "203.0.113.5", "loopback")).toBe("192.0.2.9");
  });

  it("unknown peer: no client key", () => {
    expect(clientAddress(undefined, "203.0.113.5", "loopback")).toBeUndefined();
  });

  it("reads IPv4-mapped IPv6 as IPv4 and counts IPv6 by its /64 (RFC 6177: a subscriber gets a /64 or more)", () => {
    expect(addressKey("::ffff:192.0.2.9")).toBe("192.0.2.9");
    expect(addressKey("2001:db8:1:2:aaaa::1")).toBe("2001:db8:1:2::/64");
    expect(addressKey("2001:db8:1:2:bbbb::9")).toBe(addressKey("2001:db8:1:2:aaaa::1"));
  });

  it("refuses a setting it cannot read", () => {
    expect(() => checkTrustedProxies("10.0.0.0/8, not-an-address")).toThrow();
    expect(() => checkTrustedProxies("loopback, 10.0.0.0/8, 2001:db8::/32")).not.toThrow();
  });
});
