import { z } from "zod";
import type { Route } from "./+types/recordings";
import { requirePermission } from "~/lib/auth.server";
import { optionalParam } from "~/lib/edge";
import { parseSearch } from "~/lib/edge.server";
import { readyRecordings, recordingTables } from "~/lib/procedures/workflow.server";

const searchSchema = z.object({ q: optionalParam(100) });

/**
 * Ready recordings for the editor's video-moment picker (empty while the recordings area has no
 * table). The picker then lists the chosen recording's marks through GET /api/recordings/:id/marks,
 * which applies the recordings' own rules.
 */
export async function loader({ request }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  const { q } = parseSearch(request, searchSchema);
  const t = await recordingTables();
  return Response.json({ available: t.recordings, results: await readyRecordings(q ?? "") });
}
