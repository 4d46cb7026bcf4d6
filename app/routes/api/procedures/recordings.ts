import type { Route } from "./+types/recordings";
import { requirePermission } from "~/lib/auth.server";
import { readyRecordings, recordingTables } from "~/lib/procedures/workflow.server";

/** Ready recordings for the editor's video-moment picker (empty while the recordings area has no table). */
export async function loader({ request }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  const q = (new URL(request.url).searchParams.get("q") ?? "").slice(0, 100);
  const t = await recordingTables();
  return Response.json({ available: t.recordings, results: await readyRecordings(q) });
}
