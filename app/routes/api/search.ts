import type { Route } from "./+types/search";
import { requirePermission } from "~/lib/auth.server";
import { parseSearch } from "~/lib/edge.server";
import { searchAnswer, searchParamsSchema } from "~/lib/search/query.server";

// GET /api/search?q=&type=&tag=&state=&uploader=&page=&limit= — signed in with `search:use`;
// 422 with the failing parameter; 503 while the search service is down.
export async function loader({ request }: Route.LoaderArgs) {
  const user = await requirePermission(request, "search:use");
  return searchAnswer(user, parseSearch(request, searchParamsSchema));
}

/**
 * In the browser, a fetcher's load of this route (the header box) asks for the plain JSON
 * answer above instead of React Router's `.data` request, which would re-encode the JSON on
 * every pause in typing. Refusals arrive as data (`error`, `reason`), as they did from the
 * loader; a request that never reached the server reads as search being unavailable, and a
 * superseded one is React Router's to drop.
 */
export async function clientLoader({ request }: Route.ClientLoaderArgs) {
  try {
    const res = await fetch(request.url, { signal: request.signal, headers: { accept: "application/json" } });
    return (await res.json()) as unknown;
  } catch (err) {
    if (request.signal.aborted) throw err;
    return { error: "search unreachable", reason: "Search did not answer. Check the connection and type again." };
  }
}
