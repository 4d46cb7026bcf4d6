import { describe, expect, it } from "vitest";
import { PageStore } from "./page-cache.server";

const entry = (text: string) => ({ body: new TextEncoder().encode(text), status: 200, headers: [["content-type", "text/html"]] as [string, string][] });
const text = (e: { body: Uint8Array } | undefined) => (e ? new TextDecoder().decode(e.body) : null);

describe("PageStore", () => {
  it("returns what was stored under the current generation", () => {
    const s = new PageStore();
    expect(s.set("u1\n/procedures/a", s.generation, entry("A"))).toBe(true);
    expect(text(s.get("u1\n/procedures/a"))).toBe("A");
    expect(s.get("u2\n/procedures/a")).toBeUndefined();
  });

  it("refuses a page rendered before an invalidation (it may show data older than the change)", () => {
    const s = new PageStore();
    const started = s.generation;
    s.invalidateAll(); // a change arrived while the page was rendering
    expect(s.set("u1\n/procedures/a", started, entry("old"))).toBe(false);
    expect(s.get("u1\n/procedures/a")).toBeUndefined();
  });

  it("drops everything on invalidateAll, and one person's pages on invalidatePrefix", () => {
    const s = new PageStore();
    s.set("u1\n/procedures/a", s.generation, entry("A1"));
    s.set("u2\n/procedures/a", s.generation, entry("A2"));
    s.set("u10\n/procedures/a", s.generation, entry("A10"));
    s.invalidatePrefix("u1\n");
    expect(s.get("u1\n/procedures/a")).toBeUndefined();
    expect(text(s.get("u2\n/procedures/a"))).toBe("A2");
    expect(text(s.get("u10\n/procedures/a"))).toBe("A10"); // the newline ends the id: u1 is not a prefix of u10
    s.invalidateAll();
    expect(s.size).toBe(0);
    expect(s.byteSize).toBe(0);
  });

  it("evicts the least recently used entry past its entry and byte limits", () => {
    const s = new PageStore({ maxEntries: 2, maxBytes: 1000, maxAgeMs: 60_000 });
    s.set("a", s.generation, entry("1"));
    s.set("b", s.generation, entry("2"));
    s.get("a"); // a is now the most recent
    s.set("c", s.generation, entry("3"));
    expect(s.get("b")).toBeUndefined();
    expect(text(s.get("a"))).toBe("1");
    expect(text(s.get("c"))).toBe("3");

    const bytes = new PageStore({ maxEntries: 100, maxBytes: 1000, maxAgeMs: 60_000 });
    for (let i = 0; i < 10; i++) bytes.set(`k${i}`, bytes.generation, entry("x".repeat(200)));
    expect(bytes.byteSize).toBeLessThanOrEqual(1000);
    expect(bytes.size).toBe(5);
    expect(bytes.get("k9")).toBeDefined();
    expect(bytes.get("k0")).toBeUndefined();
  });

  it("keeps the byte count right when a key is stored again, and refuses a body over a quarter of the budget", () => {
    const s = new PageStore({ maxEntries: 10, maxBytes: 1000, maxAgeMs: 60_000 });
    s.set("a", s.generation, entry("x".repeat(100)));
    s.set("a", s.generation, entry("x".repeat(50)));
    expect(s.byteSize).toBe(50);
    expect(s.set("big", s.generation, entry("x".repeat(300)))).toBe(false);
    expect(s.size).toBe(1);
  });
});

describe("PageStore expiry", () => {
  it("renders anew once an entry is older than the maximum age (a change may have gone unheard)", () => {
    let now = 1_000;
    const s = new PageStore({ maxEntries: 10, maxBytes: 1000, maxAgeMs: 60_000 }, () => now);
    s.set("a", s.generation, entry("A"));
    now += 59_000;
    expect(text(s.get("a"))).toBe("A");
    now += 2_000;
    expect(s.get("a")).toBeUndefined();
    expect(s.size).toBe(0);
    expect(s.byteSize).toBe(0);
  });
});
