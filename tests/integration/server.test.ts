// The HTTP server around React Router (server.js): static files, compression, security
// headers on everything, request bodies and HEAD.
import { request as nodeRequest } from "node:http";
import { describe, expect, it } from "vitest";
import { BASE_URL, createUser, http } from "../support/app";

/** A raw request through node:http (fetch hides what a HEAD answer's body holds, and normalizes paths). */
function raw(
  method: string,
  path: string,
): Promise<{ status: number; headers: Record<string, string | string[] | undefined>; body: Buffer }> {
  const url = new URL(BASE_URL);
  return new Promise((resolve, reject) => {
    const req = nodeRequest({ host: url.hostname, port: url.port, method, path }, (res) => {
      const chunks: Buffer[] = [];
      res.on("data", (c: Buffer) => chunks.push(c));
      res.on("end", () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body: Buffer.concat(chunks) }));
    });
    req.on("error", reject);
    req.end();
  });
}

function expectSecurityHeaders(res: Response) {
  expect(res.headers.get("x-content-type-options")).toBe("nosniff");
  expect(res.headers.get("x-frame-options")).toBe("DENY");
  expect(res.headers.get("content-security-policy")).toContain("frame-ancestors 'none'");
  expect(res.headers.get("referrer-policy")).toBe("strict-origin-when-cross-origin");
}

async function someAsset(): Promise<string> {
  const page = await (await http("/signin")).text();
  const m = /(?:src|href)="(\/assets\/[^"]+\.(?:js|css))"/.exec(page);
  if (!m) throw new Error("the sign-in page links no asset");
  return m[1];
}

describe("server.js", () => {
  it("serves fingerprinted assets for a year, with the security headers", async () => {
    const asset = await someAsset();
    const res = await http(asset);
    expect(res.status).toBe(200);
    expect(res.headers.get("cache-control")).toContain("immutable");
    expect(res.headers.get("cache-control")).toContain("max-age=31536000");
    expect((await res.arrayBuffer()).byteLength).toBeGreaterThan(0);
    expectSecurityHeaders(res);
    const head = await raw("HEAD", asset);
    expect(head.status).toBe(200);
    expect(Number(head.headers["content-length"])).toBeGreaterThan(0);
    expect(head.body.length).toBe(0);
    // A query string (a cache buster) still finds the file.
    expect((await http(`${asset}?v=2`)).status).toBe(200);
  });

  it("refuses a path that climbs out of the assets folder, and methods other than GET and HEAD", async () => {
    const climb = await raw("GET", "/assets/..%2f..%2fserver%2findex.js");
    expect(climb.status).toBe(403);
    expect(climb.body.toString()).toBe("Forbidden");
    expect(climb.headers["x-frame-options"]).toBe("DENY");
    const post = await raw("POST", await someAsset());
    expect(post.status).toBe(405);
  });

  it("answers a missing asset with a plain 404 (never a page), with the security headers", async () => {
    const res = await http("/assets/no-such-file-1234.js");
    expect(res.status).toBe(404);
    expect(res.headers.get("content-type")).toContain("text/plain");
    expect(await res.text()).toBe("Not found");
    expectSecurityHeaders(res);
  });

  it("serves the files beside assets/ (the icon) with the security headers", async () => {
    const res = await http("/favicon.svg");
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toContain("image/svg+xml");
    expect(res.headers.get("cache-control")).toContain("max-age=3600");
    expectSecurityHeaders(res);
  });

  it("compresses pages", async () => {
    const page = await http("/signin", { headers: { "accept-encoding": "gzip" } });
    expect(page.headers.get("content-encoding")).toBe("gzip");
    expect(await page.text()).toContain("</html>");
  });

  it("passes request bodies through to React Router (a JSON API call)", async () => {
    const person = await createUser("builder");
    const res = await http("/api/calc/preload", {
      cookie: person.cookie,
      json: { thread: "M12x1.5", torque: { value: 110, unit: "N.m" }, method: { kind: "nut-factor", k: 0.15 } },
    });
    expect(res.status).toBe(200);
    // T = K·F·d: F = 110 / (0.15 × 0.012 m) — the body arrived whole, or the numbers would differ.
    expect((await res.json()).preload_N).toBeCloseTo(110 / (0.15 * 0.012), 6);
    expectSecurityHeaders(res);
  });

  it("answers HEAD for a page with its status, the security headers and no body", async () => {
    const res = await raw("HEAD", "/signin");
    expect(res.status).toBe(200);
    expect(res.body.length).toBe(0);
    expect(res.headers["x-frame-options"]).toBe("DENY");
    expect(res.headers["content-security-policy"]).toContain("frame-ancestors 'none'");
  });

  it("reports in Server-Timing how many database queries the request made, each request its own", async () => {
    const queries = (res: Response) => {
      const m = /\bdb;desc="(\d+) quer(?:y|ies)";dur=[\d.]+/.exec(res.headers.get("server-timing") ?? "");
      return m ? Number(m[1]) : null;
    };
    // Signed out, the sign-in page reads nothing from the database.
    const signin = await http("/signin");
    expect(signin.status).toBe(200);
    expect(queries(signin)).toBeNull();
    const { cookie } = await createUser("editor");
    await http("/", { cookie }); // the first request also reads the session from the database
    const alone = await http("/", { cookie });
    expect(alone.status).toBe(200);
    const count = queries(alone);
    expect(count).toBeGreaterThan(0);
    // Side by side, the requests' queries interleave on the pool; each still counts only its own.
    const together = await Promise.all(Array.from({ length: 12 }, () => http("/", { cookie })));
    expect(together.map(queries)).toEqual(together.map(() => count));
  });
});
