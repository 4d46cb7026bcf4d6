import type { Route } from "./+types/captions";
import { requirePermission } from "~/lib/auth.server";
import { attachCaptionFile, captionsFor } from "~/lib/captions/captions.server";
import { domainFailure } from "~/lib/domain-error.server";
import { idParams } from "~/lib/edge";
import { invalidJson, methodNotAllowed, notFound, parseParams, readForm } from "~/lib/edge.server";
import { getRecording } from "~/lib/recordings/library.server";

/** GET a recording's caption lines with their corrections; POST attaches a caption file (multipart, field `file`), replacing any before. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  const { id } = parseParams(request, idParams, params, "recording");
  if (!(await getRecording(id))) notFound(request, "recording");
  return Response.json(await captionsFor(id), { headers: { "Cache-Control": "private, no-store" } });
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "caption:edit");
  const { id } = parseParams(request, idParams, params, "recording");
  if (request.method !== "POST") return methodNotAllowed("GET, POST");
  const file = (await readForm(request)).get("file");
  if (!(file instanceof File) || file.size === 0)
    return invalidJson([{ path: "file", message: "Choose a WebVTT (.vtt) or SRT (.srt) file." }]);
  try {
    return Response.json(await attachCaptionFile(request, user, id, file), { status: 201 });
  } catch (err) {
    return domainFailure(request, err);
  }
}
