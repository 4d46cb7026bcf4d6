import type { Route } from "./+types/poster";
import { requirePermission } from "~/lib/auth.server";
import { idParams } from "~/lib/edge";
import { notFound, parseParams } from "~/lib/edge.server";
import { serveObject } from "~/lib/recordings/media.server";
import { mediaFacts } from "~/lib/recordings/library.server";
import { placementOf } from "~/lib/storage/recordings.server";

/** GET /api/recordings/:id/poster — the poster frame (JPEG). */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  const { id } = parseParams(request, idParams, params, "recording");
  const r = await mediaFacts(id);
  if (!r) notFound(request, "recording");
  if (!r.hasPoster) return Response.json({ error: "not found", reason: "No poster frame yet." }, { status: 404 });
  const where = await placementOf(r.id);
  return serveObject(request, where.store, where.poster, { contentType: "image/jpeg", cacheSeconds: 600 });
}
