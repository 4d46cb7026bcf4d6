/**
 * Content-Security-Policy for pages, with a fresh nonce per response.
 *
 * Every response gets the static policy of security-headers.json (server.js and the security
 * middleware send it); an HTML page rendered by app/entry.server.tsx gets this page policy
 * instead, whose nonce is on every inline script React and React Router write (the route data,
 * the hydration bootstrap, scroll restoration, streamed Suspense chunks). A script injected
 * into a page cannot know the nonce, so the browser refuses it.
 *
 * The nonce is made by the root middleware (`cspMiddleware`, first in app/root.tsx) and handed
 * to the entry through React Router's context (`nonceContext`). A page served from the read-page
 * cache (page-cache.server.ts) carries the nonce of the response it was stored from; the cache
 * swaps it for this request's own in the bytes it holds (`withRequestNonce`), so no two
 * responses share one.
 */
import { randomBytes } from "node:crypto";
import { createContext } from "react-router";

/** This request's nonce; "" outside a request that went through the root middleware. */
export const nonceContext = createContext<string>("");

export function newNonce(): string {
  return randomBytes(16).toString("base64");
}

/**
 * The page policy. Scripts: our own files and the nonced inline ones; no eval (and no need for
 * 'strict-dynamic': every script is one of our built files, and nothing else this origin serves
 * can run as one: uploads and API answers go out with their own types and nosniff). Styles: our own
 * stylesheets and nonced <style> elements (TipTap's base styles get the nonce; video.js is told
 * not to write its own, see root.tsx). Style *attributes* stay allowed: React renders a
 * `style` prop into the server HTML as an attribute (the progress bars), which no nonce can
 * cover; an attribute cannot match selectors, and images and fonts come only from this origin,
 * so injected CSS has nothing to read and nowhere to send it. Fonts include data: because
 * video.js's icon font and the smallest font subsets are inlined into the built CSS. Posters,
 * media and API calls are all same-origin; nothing is framed, posted elsewhere or embedded.
 */
export function pagePolicy(nonce: string): string {
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}'`,
    `style-src 'self' 'nonce-${nonce}'`,
    "style-src-attr 'unsafe-inline'",
    "img-src 'self'",
    "media-src 'self'",
    "font-src 'self' data:",
    "connect-src 'self'",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
  ].join("; ");
}

const NONCE_IN_POLICY = /'nonce-([A-Za-z0-9+/=]+)'/;

/** The nonce each request got from the root middleware (the page cache asks for it on a hit). */
const requestNonces = new WeakMap<Request, string>();

/**
 * Gives a page rendered for another request (a read-page cache hit) this request's nonce: the
 * old one is a 24-character random string named in its policy header, so every occurrence of it
 * in the body is one of its nonce attributes. Returns `body` itself when there is nothing to do,
 * else a changed copy (and sets the header to match).
 */
export function swapNonce(body: Uint8Array<ArrayBuffer>, headers: Headers, nonce: string): Uint8Array<ArrayBuffer> {
  const policy = headers.get("content-security-policy");
  const old = policy?.match(NONCE_IN_POLICY)?.[1];
  if (!policy || !old || old === nonce) return body;
  const from = Buffer.from(old);
  const to = Buffer.from(nonce);
  if (from.length !== to.length) throw new Error("nonces of different lengths");
  const copy = Buffer.from(body);
  for (let at = copy.indexOf(from); at !== -1; at = copy.indexOf(from, at + to.length)) to.copy(copy, at);
  headers.set("Content-Security-Policy", policy.replaceAll(old, nonce));
  return copy;
}

/** `swapNonce` for the page cache, which holds a page's bytes: this request's nonce, if it has one. */
export function withRequestNonce(request: Request, body: Uint8Array<ArrayBuffer>, headers: Headers): Uint8Array<ArrayBuffer> {
  const nonce = requestNonces.get(request);
  return nonce ? swapNonce(body, headers, nonce) : body;
}

/**
 * Root middleware: a nonce for this request. A page that still carries another response's nonce
 * when it comes back (a stored page the cache did not already give this one) gets it here, at
 * the cost of reading it once more.
 */
export async function cspMiddleware({ request, context }: { request: Request; context: { set(c: typeof nonceContext, v: string): void } }, next: () => Promise<Response>) {
  const nonce = newNonce();
  requestNonces.set(request, nonce);
  context.set(nonceContext, nonce);
  const res = await next();
  const policy = res.headers.get("content-security-policy");
  if (!res.body || !policy?.includes("'nonce-") || policy.includes(`'nonce-${nonce}'`)) return res;
  const headers = new Headers(res.headers);
  const body = swapNonce(new Uint8Array(await res.arrayBuffer()), headers, nonce);
  return new Response(body, { status: res.status, statusText: res.statusText, headers });
}
