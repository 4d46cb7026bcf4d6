import { z } from "zod";
import type { Route } from "./+types/recordings";
import { requirePermission } from "~/lib/auth.server";
import { optionalParam } from "~/lib/edge";
import { parseSearch } from "~/lib/edge.server";
import { readyRecordings } from "~/lib/recordings/procedure-links.server";

const searchSchema = z.object({ q: optionalParam(100) });

/**
 * Ready recordings for the editor's video-moment picker (`available`: the recordings area is set
 * up, which it always is now; the editor still reads it). The picker then lists the chosen recording's marks through GET /api/recordings/:id/marks,
 * which applies the recordings' own rules.
 */
export async function loader({ request }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  const { q } = parseSearch(request, searchSchema);
  return Response.json({ available: true, results: await readyRecordings(q ?? "") });
}
