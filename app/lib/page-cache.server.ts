/**
 * Rendered-page cache for the hottest read pages (docs/decisions/006).
 *
 * A procedure's read page is read far more often than anything on it changes, yet rendering it
 * costs about ten queries and several milliseconds of CPU. This cache keeps the finished response
 * per person and URL, and drops everything it holds whenever PostgreSQL reports a change to what
 * pages show (triggers of migration 0008 notify on the `benchreel_content` channel, heard by
 * `notify.server.ts`).
 *
 * What makes it safe:
 * - The key holds the signed-in person's id, and the session is validated on every request
 *   before the cache is asked: a signed-out or deactivated person gets nothing from it.
 * - An entry is stored under the generation that was current when its request began; any
 *   notification moves the generation on, so a page rendered from data older than a change is
 *   never served after the change.
 * - While the listening connection is down (or not yet up) the cache neither serves nor stores;
 *   coming back moves the generation on, since notifications may have been missed. Whatever
 *   happens, an entry is served for 60 s at most.
 * - A person's own state-changing request drops that person's entries at once (their next page
 *   shows what they just did even before the notification arrives); the notification drops the
 *   rest.
 * - Responses that set a cookie, and requests that carry a flash message, are never cached.
 *   `Cache-Control: no-cache` on the request (a hard reload) renders anew.
 */
import { withRequestNonce } from "./csp.server";
import { env } from "./env.server";
import { CONTENT_CHANNEL, listening, onListenerReset, onNotify } from "./notify.server";

type Entry = { body: Uint8Array<ArrayBuffer>; status: number; headers: [string, string][] };
type Stored = Entry & { at: number };

export type CacheLimits = { maxEntries: number; maxBytes: number; maxAgeMs: number };

/** The store itself: LRU by entries and bytes, and a generation that every invalidation moves on. */
export class PageStore {
  private entries = new Map<string, Stored>(); // insertion order = least recently used first
  private bytes = 0;
  generation = 0;

  constructor(
    private readonly limits: CacheLimits = { maxEntries: 500, maxBytes: 64 * 1024 * 1024, maxAgeMs: 60_000 },
    private readonly now: () => number = Date.now,
  ) {}

  get size() {
    return this.entries.size;
  }

  get byteSize() {
    return this.bytes;
  }

  /** Everything goes; entries being rendered under the old generation will not be stored. */
  invalidateAll() {
    this.generation++;
    this.entries.clear();
    this.bytes = 0;
  }

  /** Drops the entries whose key starts with `prefix` (one person's pages) and moves the generation on. */
  invalidatePrefix(prefix: string) {
    this.generation++;
    for (const [key, e] of this.entries) {
      if (!key.startsWith(prefix)) continue;
      this.entries.delete(key);
      this.bytes -= e.body.byteLength;
    }
  }

  get(key: string): Entry | undefined {
    const e = this.entries.get(key);
    if (!e) return undefined;
    this.entries.delete(key);
    if (this.now() - e.at > this.limits.maxAgeMs) {
      // Old enough that a change may have gone unheard (a connection that went quiet): render anew.
      this.bytes -= e.body.byteLength;
      return undefined;
    }
    this.entries.set(key, e);
    return e;
  }

  /** Stores `entry` if nothing changed since `generation`; false when it was refused. */
  set(key: string, generation: number, entry: Entry): boolean {
    if (generation !== this.generation) return false;
    if (entry.body.byteLength > this.limits.maxBytes / 4) return false;
    const old = this.entries.get(key);
    if (old) {
      this.entries.delete(key);
      this.bytes -= old.body.byteLength;
    }
    this.entries.set(key, { ...entry, at: this.now() });
    this.bytes += entry.body.byteLength;
    while (this.entries.size > this.limits.maxEntries || this.bytes > this.limits.maxBytes) {
      const [oldestKey, oldest] = this.entries.entries().next().value as [string, Stored];
      this.entries.delete(oldestKey);
      this.bytes -= oldest.body.byteLength;
    }
    return true;
  }
}

const store = new PageStore();
onNotify(CONTENT_CHANNEL, () => store.invalidateAll());
onListenerReset(() => store.invalidateAll());

/** The pages worth caching: a procedure's read page (document and client-navigation data). */
const CACHED_PAGES = [/^\/procedures\/(?!new$)[^/]+$/];

function enabled(): boolean {
  return env().PAGE_CACHE !== "off";
}

/**
 * The URL as the browser asked for it, set by server.js. React Router gives middleware a data
 * request's URL without its ".data", so without this a page and its data would share a key.
 * Under another server (the dev server) the header is missing and nothing is cached.
 */
const requestedUrl = (request: Request) => request.headers.get("x-benchreel-request-url");

export function isCacheablePage(request: Request): boolean {
  if (request.method !== "GET" || !enabled()) return false;
  const raw = requestedUrl(request);
  if (!raw) return false;
  const pathname = new URL(raw, "http://x").pathname;
  if (!CACHED_PAGES.some((re) => re.test(pathname.replace(/\.data$/, "")))) return false;
  if (request.headers.get("cookie")?.includes("br_flash=")) return false;
  return true;
}

const keyOf = (userId: string, request: Request) => `${userId}\n${requestedUrl(request)}`;

/** A stored response for this person and URL, or null (the header says which). */
export function cachedPage(userId: string, request: Request): Response | null {
  if (!listening()) return null;
  const noCache = /no-cache/i.test(request.headers.get("cache-control") ?? "") || /no-cache/i.test(request.headers.get("pragma") ?? "");
  if (noCache) return null;
  const hit = store.get(keyOf(userId, request));
  if (!hit) return null;
  const headers = new Headers(hit.headers);
  headers.set("X-Page-Cache", "hit");
  // The stored page carries the CSP nonce of the response it was stored from; this response
  // gets its own, swapped in the bytes held here (app/lib/csp.server.ts).
  return new Response(withRequestNonce(request, hit.body, headers), { status: hit.status, headers });
}

/** Call before rendering: the generation the render will be stored under. */
export function beginRender(): { generation: number; up: boolean } {
  return { generation: store.generation, up: listening() };
}

/** Keeps a copy of `res` for the next identical request; returns the response to send. */
export function rememberPage(userId: string, request: Request, started: { generation: number; up: boolean }, res: Response): Response {
  if (!started.up || res.status !== 200 || res.headers.has("set-cookie") || !res.body) return res;
  const key = keyOf(userId, request);
  const copy = res.clone();
  void copy
    .arrayBuffer()
    .then((buf) => {
      if (!listening()) return;
      const headers = [...copy.headers.entries()].filter(([k]) => k.toLowerCase() !== "x-page-cache");
      store.set(key, started.generation, { body: new Uint8Array(buf), status: res.status, headers });
    })
    .catch(() => {});
  try {
    res.headers.set("X-Page-Cache", "miss");
  } catch {
    /* immutable headers: no marker */
  }
  return res;
}

/** A person's own write: their pages go now; everyone else's go when the notification arrives. */
export function forgetPerson(userId: string) {
  store.invalidatePrefix(`${userId}\n`);
}
