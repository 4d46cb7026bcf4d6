// The search API's answer, shared by its route's loader (app/routes/api/search.ts) and by
// server.js, which sends GET /api/search without React Router's request handling
// (docs/decisions/008; the list of such paths is `directAnswers` in app/entry.server.tsx).
import { refreshedCookie, requirePermission, type RequestLike } from "~/lib/auth.server";
import { urlRefusal } from "~/lib/edge.server";
import { searchErrorMessage } from "./client.server";
import { indexIsBehind, runSearch, searchParamsSchema, type SearchTimings } from "./query.server";

/** An answer as plain parts: what both the loader and server.js send. */
export type PlainAnswer = { status: number; headers: Record<string, string>; body: string };

const json = (status: number, value: unknown, headers: Record<string, string> = {}): PlainAnswer => {
  const body = JSON.stringify(value);
  return { status, body, headers: { "Content-Type": "application/json", "Content-Length": String(Buffer.byteLength(body)), "Cache-Control": "private, no-store", ...headers } };
};

/**
 * GET /api/search?q=&type=&tag=&state=&uploader=&page= — what the header box and the search
 * page use. Signed in with `search:use`; 422 with the failing parameter; 503 while the
 * search service is down (changes are still saved and queued).
 */
export async function answerSearch(request: RequestLike): Promise<PlainAnswer> {
  const started = performance.now();
  let user;
  try {
    user = await requirePermission(request, "search:use");
  } catch (thrown) {
    // The guard's refusals (401, 403, and 503 with the database down) are Responses.
    if (thrown instanceof Response) {
      // Header names come lower-cased from a Response; ours is set last so it is the only one.
      return { status: thrown.status, headers: { ...Object.fromEntries(thrown.headers), "cache-control": "private, no-store" }, body: await thrown.text() };
    }
    throw thrown;
  }
  const signedIn = performance.now();
  const parsed = searchParamsSchema.safeParse(Object.fromEntries(new URL(request.url).searchParams));
  if (!parsed.success) {
    return json(422, { error: "invalid input", issues: parsed.error.issues.map((i) => ({ path: i.path.join("."), message: i.message })) });
  }
  const behindP = indexIsBehind().catch(() => false);
  try {
    const t: SearchTimings = { service: 0, shaping: 0 };
    const [result, behind] = await Promise.all([runSearch(user, parsed.data, t), behindP]);
    // Server-Timing (W3C): where the time went, for the browser's network panel and the benchmark.
    const timing = [`session;dur=${(signedIn - started).toFixed(2)}`, `search;dur=${t.service.toFixed(2)}`, `shape;dur=${t.shaping.toFixed(2)}`, `loader;dur=${(performance.now() - started).toFixed(2)}`].join(", ");
    return json(200, { ...result, behind }, { "Server-Timing": timing });
  } catch (err) {
    console.error("[search]", searchErrorMessage(err));
    return json(503, { error: "search unavailable", reason: "The search service is not answering. Your changes are saved and will be searchable when it is back.", behind: true });
  }
}

/**
 * The same answer for server.js. It adds what the root middleware adds on React Router's path:
 * the cookie of a session lucia has just extended. server.js sets the security headers on
 * every response. `Server-Timing` names the path (`direct`), for the network panel and tests.
 */
export async function answerSearchDirect(request: RequestLike): Promise<PlainAnswer> {
  // The root middleware's refusal of a NUL in the address, which this path does not pass through.
  const refused = urlRefusal(request);
  if (refused) return { status: refused.status, headers: { ...Object.fromEntries(refused.headers), "cache-control": "private, no-store" }, body: await refused.text() };
  const answer = await answerSearch(request);
  const cookie = await refreshedCookie(request).catch(() => null);
  if (cookie) answer.headers["Set-Cookie"] = cookie;
  const timing = answer.headers["Server-Timing"];
  answer.headers["Server-Timing"] = timing ? `direct, ${timing}` : "direct";
  return answer;
}
