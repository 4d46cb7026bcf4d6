import type { Route } from "./+types/search";
import { requirePermission } from "~/lib/auth.server";
import { indexIsBehind, runSearch, searchParamsSchema } from "~/lib/search/query.server";

/** GET /api/search?q=&type=&tag=&state=&uploader=&page= — what the header box and search page use. */
export async function loader({ request }: Route.LoaderArgs) {
  const user = await requirePermission(request, "search:use");
  const parsed = searchParamsSchema.safeParse(Object.fromEntries(new URL(request.url).searchParams));
  if (!parsed.success) {
    return Response.json(
      { error: "invalid input", issues: parsed.error.issues.map((i) => ({ path: i.path.join("."), message: i.message })) },
      { status: 422 },
    );
  }
  const behindP = indexIsBehind().catch(() => false);
  try {
    const [result, behind] = await Promise.all([runSearch(user, parsed.data), behindP]);
    return Response.json({ ...result, behind }, { headers: { "Cache-Control": "private, no-store" } });
  } catch (err) {
    console.error("[search]", (err as Error).message);
    return Response.json(
      { error: "search unavailable", reason: "The search service is not answering. Your changes are saved and will be searchable when it is back.", behind: true },
      { status: 503 },
    );
  }
}
