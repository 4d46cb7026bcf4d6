import { describe, expect, it } from "vitest";
import { newNonce, pagePolicy } from "./csp.server";

describe("CSP nonces", () => {
  it("makes a different 128-bit nonce each time", () => {
    const seen = new Set(Array.from({ length: 1000 }, newNonce));
    expect(seen.size).toBe(1000);
    for (const n of seen) expect(Buffer.from(n, "base64")).toHaveLength(16);
  });

  it("puts the nonce in the page policy for scripts and styles, with no unsafe-inline for either and no eval", () => {
    const p = pagePolicy("abc");
    expect(p).toContain("script-src 'self' 'nonce-abc'");
    expect(p).toContain("style-src 'self' 'nonce-abc'");
    expect(p).toContain("default-src 'self'");
    expect(p).not.toMatch(/script-src[^;]*unsafe/);
    expect(p).not.toMatch(/style-src [^;]*unsafe/);
  });
});
