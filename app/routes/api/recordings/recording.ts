import type { Route } from "./+types/recording";
import { requirePermission } from "~/lib/auth.server";
import { idParams } from "~/lib/edge";
import { parseParams } from "~/lib/edge.server";
import { recordingOr404 } from "~/lib/recordings/notes.server";

/** GET /api/recordings/:id — state and probed facts, polled by the upload page. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  const { id } = parseParams(request, idParams, params, "recording");
  const r = await recordingOr404(request, id);
  return Response.json({
    recording: {
      id: r.id,
      title: r.title,
      state: r.state,
      stateReason: r.stateReason,
      progress: r.progress,
      durationS: r.durationS,
      width: r.width,
      height: r.height,
      frameRate: r.frameRate,
      videoCodec: r.videoCodec,
      audioCodec: r.audioCodec,
      container: r.container,
      hasRendition: r.hasRendition,
      hasPoster: r.hasPoster,
      originalName: r.originalName,
      originalSize: r.originalSize,
      uploadedBy: r.uploadedBy,
      createdAt: r.createdAt,
    },
  });
}
