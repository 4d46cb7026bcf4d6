import { Readable } from "node:stream";
import type { ObjectStore } from "../storage/store.server";

/**
 * Serves a stored object (the folder's file or the object store's, proxied with the range
 * passed on: docs/decisions/013) with HTTP Range (RFC 9110 §14): 206 with Content-Range for one satisfiable
 * range, 416 for an unsatisfiable or malformed one, 200 for the whole file (also for several
 * ranges, which a server may answer with the full body), If-Range and If-None-Match honoured.
 * Range applies to GET only (§14.2): HEAD, and a range unit other than bytes, get the whole.
 * The body is streamed (Readable.toWeb of a ranged read stream, never a Node stream handed
 * to Response: see docs/platform-notes.md).
 */
export type ServeOptions = { contentType: string; download?: string; cacheSeconds?: number };

type Range = { start: number; end: number } | "unsatisfiable" | null;

/** Parses one "bytes=…" range against a size; null = ignore the header (serve it all). */
export function parseRange(header: string | null, size: number): Range {
  if (!header) return null;
  // A range unit the server does not know (items=0-5) is ignored, not refused (RFC 9110 §14.2).
  const unit = /^\s*([!#$%&'*+.^_`|~0-9A-Za-z-]+)\s*=/.exec(header);
  if (unit && unit[1].toLowerCase() !== "bytes") return null;
  const m = /^\s*bytes\s*=\s*(.+)$/i.exec(header);
  if (!m) return "unsatisfiable";
  const parts = m[1].split(",").map((s) => s.trim());
  if (parts.length > 1) return null;
  const r = /^(\d*)-(\d*)$/.exec(parts[0]);
  if (!r || (r[1] === "" && r[2] === "")) return "unsatisfiable";
  if (r[1] === "") {
    const n = Number(r[2]);
    if (n === 0 || size === 0) return "unsatisfiable";
    return { start: Math.max(0, size - n), end: size - 1 };
  }
  const start = Number(r[1]);
  const end = r[2] === "" ? size - 1 : Math.min(Number(r[2]), size - 1);
  if (!Number.isSafeInteger(start) || start >= size || end < start) return "unsatisfiable";
  return { start, end };
}

function asciiName(name: string) {
  return name.replace(/[^\x20-\x7e]|["\\]/g, "_");
}

export async function serveObject(request: Request, store: ObjectStore, key: string, opts: ServeOptions): Promise<Response> {
  const stat = await store.head(key);
  if (!stat) return Response.json({ error: "not found", reason: "The file is not stored (yet)." }, { status: 404 });
  const size = stat.size;
  const etag = stat.etag;
  const headers = new Headers({
    "Accept-Ranges": "bytes",
    "Content-Type": opts.contentType,
    ETag: etag,
    "Last-Modified": stat.lastModified.toUTCString(),
    "Cache-Control": `private, max-age=${opts.cacheSeconds ?? 3600}`,
    Vary: "Cookie",
  });
  if (opts.download) {
    headers.set(
      "Content-Disposition",
      `attachment; filename="${asciiName(opts.download)}"; filename*=UTF-8''${encodeURIComponent(opts.download)}`,
    );
  }
  const inm = request.headers.get("if-none-match");
  if (inm?.split(",").some((t) => t.trim() === etag || t.trim() === "*")) return new Response(null, { status: 304, headers });

  let range = request.method === "GET" ? parseRange(request.headers.get("range"), size) : null;
  const ifRange = request.headers.get("if-range");
  if (range && ifRange && ifRange.trim() !== etag) range = null;
  if (range === "unsatisfiable") {
    headers.set("Content-Range", `bytes */${size}`);
    headers.delete("Content-Type");
    return new Response(null, { status: 416, headers });
  }
  const start = range ? range.start : 0;
  const end = range ? range.end : size - 1;
  headers.set("Content-Length", String(size === 0 ? 0 : end - start + 1));
  if (range) headers.set("Content-Range", `bytes ${start}-${end}/${size}`);
  const status = range ? 206 : 200;
  if (request.method === "HEAD" || size === 0) return new Response(null, { status, headers });
  const stream = await store.read(key, { start, end });
  request.signal?.addEventListener("abort", () => stream.destroy(), { once: true });
  return new Response(Readable.toWeb(stream) as ReadableStream<Uint8Array>, { status, headers });
}
