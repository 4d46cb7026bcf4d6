import type { Route } from "./+types/search";
import { answerSearch } from "~/lib/search/answer.server";

// GET /api/search?q=&type=&tag=&state=&uploader=&page=&limit= (app/lib/search/answer.server.ts).
// server.js sends GET without React Router's request handling (docs/decisions/008); this
// loader answers HEAD, `react-router dev`, and any server without that shortcut, with the same
// function.
export async function loader({ request }: Route.LoaderArgs) {
  const { status, headers, body } = await answerSearch(request);
  return new Response(body, { status, headers });
}

/**
 * In the browser, a fetcher's load of this route (the header box) asks for the plain JSON
 * answer above instead of React Router's `.data` request, which would run the whole router
 * and re-encode the JSON on every pause in typing (docs/decisions/008). Refusals arrive as data
 * (`error`, `reason`), as they did from the loader; a request that never reached the server
 * reads as search being unavailable, and a superseded one is React Router's to drop.
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
