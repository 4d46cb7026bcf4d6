import { describe, expect, it } from "vitest";
import { hashToken, newToken, tokenMatches, tokenState } from "./tokens.server";

describe("link tokens", () => {
  it("stores only a hash that matches the raw token", () => {
    const { token, hash } = newToken();
    expect(hash).not.toContain(token);
    expect(hash).toMatch(/^[0-9a-f]{64}$/);
    expect(tokenMatches(token, hash)).toBe(true);
    expect(tokenMatches(`${token}x`, hash)).toBe(false);
    // SHA-256 of "abc" (FIPS 180-2, Appendix B.1 example).
    expect(hashToken("abc")).toBe("ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  });

  it("tokens are unique and long enough to not be guessed", () => {
    const seen = new Set(Array.from({ length: 200 }, () => newToken().token));
    expect(seen.size).toBe(200);
    for (const t of seen) expect(Buffer.from(t, "base64url").length).toBe(32);
  });

  it("expires at the deadline and is single-use", () => {
    const now = new Date("2026-03-01T12:00:00Z");
    const later = new Date(now.getTime() + 1000);
    expect(tokenState({ expiresAt: later, usedAt: null }, now)).toBe("valid");
    expect(tokenState({ expiresAt: now, usedAt: null }, now)).toBe("expired");
    expect(tokenState({ expiresAt: later, usedAt: now }, now)).toBe("used");
    expect(tokenState({ expiresAt: new Date(0), usedAt: now }, now)).toBe("used");
  });
});
