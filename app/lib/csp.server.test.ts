import { describe, expect, it } from "vitest";
import { cspMiddleware, newNonce, nonceContext, pagePolicy, swapNonce, withRequestNonce } from "./csp.server";

const page = (nonce: string) => `<script nonce="${nonce}">a</script><link rel="modulepreload" nonce="${nonce}" href="/x.js"><p>${"text ".repeat(50)}</p><script nonce="${nonce}">b</script>`;
const bytes = (s: string) => new TextEncoder().encode(s);
const text = (b: Uint8Array) => new TextDecoder().decode(b);

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

  it("swaps every nonce of a stored page and its header for the new one, leaving the stored bytes alone", () => {
    const old = newNonce();
    const next = newNonce();
    const stored = bytes(page(old));
    const headers = new Headers({ "content-security-policy": pagePolicy(old) });
    const out = swapNonce(stored, headers, next);
    expect(text(out)).toBe(page(next));
    expect(headers.get("content-security-policy")).toBe(pagePolicy(next));
    expect(text(stored)).toBe(page(old));
  });

  it("leaves a response without a nonce, or with this one, as it is", () => {
    const n = newNonce();
    const body = bytes(page(n));
    expect(swapNonce(body, new Headers({ "content-security-policy": pagePolicy(n) }), n)).toBe(body);
    expect(swapNonce(body, new Headers({ "content-security-policy": "default-src 'none'" }), newNonce())).toBe(body);
    expect(withRequestNonce(new Request("http://x/"), body, new Headers({ "content-security-policy": pagePolicy(newNonce()) }))).toBe(body);
  });

  it("middleware: gives the request a nonce, and swaps it into a page rendered for another request", async () => {
    const request = new Request("http://x/procedures/a");
    const values = new Map<unknown, string>();
    const context = { set: (c: typeof nonceContext, v: string) => void values.set(c, v) };
    const old = newNonce();
    let seenByCache = "";
    const res = await cspMiddleware({ request, context }, async () => {
      // What the page cache does on a hit: the bytes it holds, with this request's nonce.
      const headers = new Headers({ "content-type": "text/html", "content-security-policy": pagePolicy(old) });
      seenByCache = text(withRequestNonce(request, bytes(page(old)), headers));
      // And a stored page that reaches the middleware unchanged.
      return new Response(page(old), { headers: { "content-type": "text/html", "content-security-policy": pagePolicy(old) } });
    });
    const nonce = values.get(nonceContext)!;
    expect(nonce).not.toBe(old);
    expect(seenByCache).toBe(page(nonce));
    expect(await res.text()).toBe(page(nonce));
    expect(res.headers.get("content-security-policy")).toBe(pagePolicy(nonce));
  });
});
