import { env } from "./env.server";
import securityHeaders from "./security-headers.json";
import { refreshedCookie } from "./auth.server";
import { queryTiming } from "./db.server";
import { requestStore } from "./request-store.server";
import { declaredSizeRefusal, settleBody, urlRefusal } from "./edge.server";

// One list for both places that send it: this middleware (every React Router response) and
// server.js (every response, static files and their 404s included).
export const SECURITY_HEADERS: Record<string, string> = securityHeaders;

const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

/** The origins a state-changing request may come from: the app's own. */
export function allowedOrigins(request: Request): Set<string> {
  const own = new Set<string>([new URL(request.url).origin]);
  try {
    own.add(new URL(env().PUBLIC_URL).origin);
  } catch {
    /* env is validated elsewhere */
  }
  return own;
}

/** CSRF: a non-GET request must carry an Origin header naming the app itself. */
export function csrfRefusal(request: Request): Response | null {
  if (SAFE_METHODS.has(request.method)) return null;
  const origin = request.headers.get("origin");
  if (origin && allowedOrigins(request).has(origin)) return null;
  const reason = origin ? `cross-site request from ${origin} refused` : "request without an Origin header refused";
  const wantsJson = new URL(request.url).pathname.startsWith("/api/") || !request.headers.get("accept")?.includes("text/html");
  return wantsJson
    ? Response.json({ error: "forbidden", reason }, { status: 403 })
    : new Response(`Forbidden: ${reason}`, { status: 403, headers: { "content-type": "text/plain; charset=utf-8" } });
}

function withHeaders(res: Response, extra: Record<string, string>, cookie: string | null): Response {
  try {
    for (const [k, v] of Object.entries(extra)) if (!res.headers.has(k)) res.headers.set(k, v);
    if (cookie) res.headers.append("Set-Cookie", cookie);
    return res;
  } catch {
    // Immutable headers (a fetched response passed through): copy it.
    const copy = new Response(res.body, res);
    for (const [k, v] of Object.entries(extra)) if (!copy.headers.has(k)) copy.headers.set(k, v);
    if (cookie) copy.headers.append("Set-Cookie", cookie);
    return copy;
  }
}

/**
 * Root middleware: CSRF refusal, the edge's refusals that need no route (a declared body above
 * the route's limit, before anything reads it; a NUL in the address), security headers,
 * lucia's session extension, and the request's database queries in Server-Timing.
 */
export async function securityMiddleware({ request }: { request: Request }, next: () => Promise<Response>) {
  const refused = csrfRefusal(request);
  if (refused) return withHeaders(refused, SECURITY_HEADERS, null);
  const bad = (await declaredSizeRefusal(request)) ?? urlRefusal(request);
  if (bad instanceof Response) return withHeaders(bad, SECURITY_HEADERS, null);
  // A page's refusal is thrown, so that the root ErrorBoundary shows it with its reason.
  if (bad) throw bad;
  const res = await requestStore.run(new Map(), () => inRequest(request, next));
  return settleBody(request, res);
}

async function inRequest(request: Request, next: () => Promise<Response>) {
  const res = await next();
  let cookie: string | null = null;
  try {
    cookie = await refreshedCookie(request);
  } catch {
    cookie = null;
  }
  const out = withHeaders(res, SECURITY_HEADERS, cookie);
  // The database work done before the headers go out (a page's loaders all finish first).
  const timing = queryTiming();
  if (timing) out.headers.append("Server-Timing", timing);
  return out;
}
