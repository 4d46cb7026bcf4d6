import type { Route } from "./+types/recording";
import { assertCan, forbidden, requirePermission } from "~/lib/auth.server";
import { recordingBuildPatch } from "~/lib/builds/attach-form";
import { domainFailure } from "~/lib/domain-error.server";
import { idParams } from "~/lib/edge";
import { invalidInput, methodNotAllowed, parseParams, readJsonObject } from "~/lib/edge.server";
import { canOnOwned } from "~/lib/permissions";
import { setRecordingBuild } from "~/lib/recordings/build-link.server";
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
      buildNumber: r.buildNumber,
    },
  });
}

/** PATCH /api/recordings/:id `{ buildNumber }` — puts the recording on a build, or on none (null). */
export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "recording:edit:own");
  const { id } = parseParams(request, idParams, params, "recording");
  if (request.method !== "PATCH") return methodNotAllowed("GET, PATCH");
  const rec = await recordingOr404(request, id);
  if (!canOnOwned(user, "recording:edit", rec.uploadedBy)) forbidden(request, "You can change only recordings you uploaded.");
  assertCan(request, user, "builds:read");
  const parsed = recordingBuildPatch.safeParse(await readJsonObject(request));
  if (!parsed.success) return invalidInput(request, parsed.error);
  try {
    await setRecordingBuild(user.id, rec.id, parsed.data.buildNumber);
  } catch (err) {
    return domainFailure(request, err);
  }
  return Response.json({ recording: { id: rec.id, buildNumber: parsed.data.buildNumber } });
}
