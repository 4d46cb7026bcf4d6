import type { Route } from "./+types/recording";
import { requirePermission } from "~/lib/auth.server";
import { recordingOr404 } from "~/lib/recordings/notes.server";

/** GET /api/recordings/:id — state and probed facts, polled by the upload page. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  const r = await recordingOr404(request, params.id);
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
