import type { Route } from "./+types/media";
import { requirePermission } from "~/lib/auth.server";
import { idParams } from "~/lib/edge";
import { notFound, parseParams } from "~/lib/edge.server";
import { serveFile } from "~/lib/recordings/media.server";
import { mediaFacts } from "~/lib/recordings/library.server";
import { originalPath, renditionPath } from "~/lib/recordings/storage.server";

/** GET /api/recordings/:id/media — the playable video (the browser-safe rendition when there is one), with Range. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  const { id } = parseParams(request, idParams, params, "recording");
  const r = await mediaFacts(id);
  if (!r) notFound(request, "recording");
  if (r.state !== "ready") return Response.json({ error: "not ready", reason: `The recording is ${r.state}.` }, { status: 409 });
  const file = r.hasRendition ? renditionPath(r.id) : originalPath(r.id);
  return serveFile(request, file, { contentType: "video/mp4" });
}
