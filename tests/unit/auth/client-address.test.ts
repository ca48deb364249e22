import { describe, expect, it } from "vitest";
import { clientAddress, normalizeAddress, parseTrustedProxy } from "@/lib/auth/client-address";

// X-Forwarded-For is read from the right and only past proxies we trust (RFC 7239 §8.3; OWASP WSTG
// on spoofed client addresses): a client can write anything into the header it sends.
describe("client address", () => {
  it("ignores X-Forwarded-For without TRUSTED_PROXY", () => {
    const none = parseTrustedProxy(undefined);
    expect(none).toEqual({ kind: "none" });
    expect(parseTrustedProxy("")).toEqual({ kind: "none" });
    expect(clientAddress("127.0.0.1", "203.0.113.9", none)).toBe("127.0.0.1");
    expect(clientAddress("::ffff:10.1.2.3", undefined, none)).toBe("10.1.2.3");
  });

  it("with a hop count, takes the address that many hops from the server", () => {
    expect(clientAddress("10.0.0.1", "198.51.100.1, 203.0.113.9", parseTrustedProxy("1"))).toBe("203.0.113.9");
    expect(clientAddress("10.0.0.1", "198.51.100.1, 203.0.113.9", parseTrustedProxy("2"))).toBe("198.51.100.1");
    // A client's own extra entries sit further left and are never reached.
    expect(clientAddress("10.0.0.1", ["6.6.6.6", "203.0.113.9"], parseTrustedProxy("1"))).toBe("203.0.113.9");
    // Fewer entries than hops: the furthest one there is.
    expect(clientAddress("10.0.0.1", undefined, parseTrustedProxy("2"))).toBe("10.0.0.1");
  });

  it("with a list, believes the header only from those proxies and walks past each trusted one", () => {
    const trust = parseTrustedProxy("10.0.0.0/8, 192.168.1.5, ::1");
    expect(clientAddress("192.168.1.5", "203.0.113.9", trust)).toBe("203.0.113.9");
    expect(clientAddress("::1", "203.0.113.9", trust)).toBe("203.0.113.9");
    expect(clientAddress("::ffff:10.9.9.9", "6.6.6.6, 203.0.113.9, 10.1.1.1", trust)).toBe("203.0.113.9");
    // Not from a trusted proxy: the header is the client's own claim.
    expect(clientAddress("198.51.100.20", "10.0.0.7", trust)).toBe("198.51.100.20");
    expect(clientAddress("192.168.1.6", "203.0.113.9", trust)).toBe("192.168.1.6");
  });

  it("refuses a setting it cannot read, so a typo fails at start-up", () => {
    for (const bad of ["proxy.example", "10.0.0.0/33", "10.0.0.1/8/2", "::1/129", "11", "1.2.3"])
      expect(() => parseTrustedProxy(bad), bad).toThrow();
    expect(parseTrustedProxy("2001:db8::/32").kind).toBe("list");
  });

  it("writes addresses one way", () => {
    expect(normalizeAddress("::FFFF:127.0.0.1")).toBe("127.0.0.1");
    expect(normalizeAddress("[2001:DB8::1]")).toBe("2001:db8::1");
    expect(normalizeAddress("not-an-address")).toBe("not-an-address");
  });
});
