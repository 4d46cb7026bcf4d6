import type { Route } from "./+types/marks";
import { requirePermission } from "~/lib/auth.server";
import { methodNotAllowed, parseParams, readJsonObject } from "~/lib/edge.server";
import { idParams } from "~/lib/edge";
import { createMark, marksFor, recordingOr404 } from "~/lib/recordings/notes.server";

/** GET lists a recording's marks by time; POST adds one ({ tStart, tEnd?, text, tags?, procedureId? }). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requirePermission(request, "shop:read");
  parseParams(request, idParams, params, "recording");
  await recordingOr404(request, params.id);
  return Response.json({ marks: await marksFor(user, params.id) });
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "mark:create");
  parseParams(request, idParams, params, "recording");
  if (request.method !== "POST") return methodNotAllowed("GET, POST");
  const body = await readJsonObject(request);
  return createMark(request, user, params.id, body);
}
