import type { Route } from "./+types/original";
import { requirePermission } from "~/lib/auth.server";
import { idParams } from "~/lib/edge";
import { notFound, parseParams } from "~/lib/edge.server";
import { serveObject } from "~/lib/recordings/media.server";
import { mediaFacts } from "~/lib/recordings/library.server";
import { placementOf } from "~/lib/storage/recordings.server";

/** GET /api/recordings/:id/original — the file as uploaded, as a download (recording:download). */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "recording:download");
  const { id } = parseParams(request, idParams, params, "recording");
  const r = await mediaFacts(id);
  if (!r) notFound(request, "recording");
  if (!r.hasOriginal)
    return Response.json({ error: "not found", reason: "The original file is not kept for this recording." }, { status: 404 });
  const where = await placementOf(r.id);
  return serveObject(request, where.store, where.original, { contentType: "application/octet-stream", download: r.originalName });
}
