import { z } from "zod";
import type { Route } from "./+types/index";
import { requirePermission } from "~/lib/auth.server";
import { librarySearch } from "~/lib/edge";
import { parseSearch } from "~/lib/edge.server";
import { listRecordings } from "~/lib/recordings/library.server";

/** `?for=readings`: only the recordings that take new readings (the calculators' "Save as readings"). */
const apiLibrarySearch = librarySearch.extend({
  for: z.enum(["readings"], { error: "The only list for a purpose is “readings”." }).optional(),
});

/** GET /api/recordings?tag=&uploader=&sort=newest|oldest&for=readings — the library as JSON. */
export async function loader({ request }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  const s = parseSearch(request, apiLibrarySearch);
  const rows = await listRecordings({
    tag: s.tag ?? null,
    uploader: s.uploader ?? null,
    sort: s.sort ?? "newest",
    q: s.q ?? null,
    takesReadings: s.for === "readings",
  });
  return Response.json({ recordings: rows });
}
