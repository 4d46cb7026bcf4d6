import type { Route } from "./+types/index";
import { requirePermission } from "~/lib/auth.server";
import { librarySearch } from "~/lib/edge";
import { parseSearch } from "~/lib/edge.server";
import { listRecordings } from "~/lib/recordings/library.server";

/** GET /api/recordings?tag=&uploader=&sort=newest|oldest — the library as JSON. */
export async function loader({ request }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  const s = parseSearch(request, librarySearch);
  const rows = await listRecordings({ tag: s.tag ?? null, uploader: s.uploader ?? null, sort: s.sort ?? "newest", q: s.q ?? null });
  return Response.json({ recordings: rows });
}
