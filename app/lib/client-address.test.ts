import { describe, expect, it } from "vitest";
import { pickClientAddress } from "./client-address";

// X-Forwarded-For: each proxy appends the address it received the request from (RFC 7239 §5.2
// describes the same order for Forwarded's "for="); so with n trusted proxies the client is
// the n-th entry from the right, and every entry left of it may be forged by the client.
describe("pickClientAddress", () => {
  it("uses the socket's address and ignores X-Forwarded-For when no proxy is trusted", () => {
    expect(pickClientAddress("127.0.0.2", null, 0)).toBe("127.0.0.2");
    expect(pickClientAddress("127.0.0.2", "203.0.113.9", 0)).toBe("127.0.0.2");
  });

  it("walks back one hop per trusted proxy, never further than the chain", () => {
    expect(pickClientAddress("10.0.0.1", "203.0.113.9", 1)).toBe("203.0.113.9");
    expect(pickClientAddress("10.0.0.1", "198.51.100.7, 203.0.113.9", 1)).toBe("203.0.113.9"); // the left one is the client's claim
    expect(pickClientAddress("10.0.0.1", "198.51.100.7, 203.0.113.9, 10.0.0.2", 2)).toBe("203.0.113.9");
    expect(pickClientAddress("10.0.0.1", "203.0.113.9", 5)).toBe("203.0.113.9");
    expect(pickClientAddress("10.0.0.1", null, 1)).toBe("10.0.0.1");
  });

  it("treats an IPv4-mapped IPv6 address as the IPv4 one, and names a missing address", () => {
    expect(pickClientAddress("::ffff:127.0.0.1", null, 0)).toBe("127.0.0.1");
    expect(pickClientAddress("::1", null, 0)).toBe("::1");
    expect(pickClientAddress(null, null, 0)).toBe("unknown");
    expect(pickClientAddress("", " , ", 1)).toBe("unknown");
  });
});
