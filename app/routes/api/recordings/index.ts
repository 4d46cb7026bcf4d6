import type { Route } from "./+types/index";
import { requirePermission } from "~/lib/auth.server";
import { listRecordings } from "~/lib/recordings/library.server";

/** GET /api/recordings?tag=&uploader=&sort=newest|oldest — the library as JSON. */
export async function loader({ request }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  const u = new URL(request.url);
  const sort = u.searchParams.get("sort") === "oldest" ? "oldest" : "newest";
  const rows = await listRecordings({ tag: u.searchParams.get("tag"), uploader: u.searchParams.get("uploader"), sort, q: u.searchParams.get("q") });
  return Response.json({ recordings: rows });
}
