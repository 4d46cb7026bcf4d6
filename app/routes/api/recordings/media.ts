import type { Route } from "./+types/media";
import { requirePermission } from "~/lib/auth.server";
import { idParams } from "~/lib/edge";
import { notFound, parseParams } from "~/lib/edge.server";
import { serveObject } from "~/lib/recordings/media.server";
import { mediaFacts } from "~/lib/recordings/library.server";
import { placementOf } from "~/lib/storage/recordings.server";

/** GET /api/recordings/:id/media — the playable video (the browser-safe rendition when there is one), with Range. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  const { id } = parseParams(request, idParams, params, "recording");
  const r = await mediaFacts(id);
  if (!r) notFound(request, "recording");
  if (r.state !== "ready") return Response.json({ error: "not ready", reason: `The recording is ${r.state}.` }, { status: 409 });
  const where = await placementOf(r.id);
  return serveObject(request, where.store, r.hasRendition ? where.rendition : where.original, { contentType: "video/mp4" });
}
