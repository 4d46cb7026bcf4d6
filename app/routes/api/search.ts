import type { Route } from "./+types/search";
import { requirePermission } from "~/lib/auth.server";
import { searchErrorMessage } from "~/lib/search/client.server";
import { indexIsBehind, runSearch, searchParamsSchema, type SearchTimings } from "~/lib/search/query.server";

/** GET /api/search?q=&type=&tag=&state=&uploader=&page= — what the header box and search page use. */
export async function loader({ request }: Route.LoaderArgs) {
  const started = performance.now();
  const user = await requirePermission(request, "search:use");
  const signedIn = performance.now();
  const parsed = searchParamsSchema.safeParse(Object.fromEntries(new URL(request.url).searchParams));
  if (!parsed.success) {
    return Response.json(
      { error: "invalid input", issues: parsed.error.issues.map((i) => ({ path: i.path.join("."), message: i.message })) },
      { status: 422 },
    );
  }
  const behindP = indexIsBehind().catch(() => false);
  try {
    const t: SearchTimings = { service: 0, shaping: 0 };
    const [result, behind] = await Promise.all([runSearch(user, parsed.data, t), behindP]);
    const body = JSON.stringify({ ...result, behind });
    // Server-Timing (W3C): where the time went, for the browser's network panel and the benchmark.
    const timing = [`session;dur=${(signedIn - started).toFixed(2)}`, `search;dur=${t.service.toFixed(2)}`, `shape;dur=${t.shaping.toFixed(2)}`, `loader;dur=${(performance.now() - started).toFixed(2)}`].join(", ");
    return new Response(body, { headers: { "Content-Type": "application/json", "Content-Length": String(Buffer.byteLength(body)), "Cache-Control": "private, no-store", "Server-Timing": timing } });
  } catch (err) {
    console.error("[search]", searchErrorMessage(err));
    return Response.json(
      { error: "search unavailable", reason: "The search service is not answering. Your changes are saved and will be searchable when it is back.", behind: true },
      { status: 503 },
    );
  }
}
