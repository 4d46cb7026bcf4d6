import { z } from "zod";
import type { Route } from "./+types/mark";
import { requirePermission } from "~/lib/auth.server";
import { methodNotAllowed, parseParams, readJsonObject } from "~/lib/edge.server";
import { uuid } from "~/lib/edge";
import { deleteMark, marksFor, recordingOr404, updateMark } from "~/lib/recordings/notes.server";

/** The params: a recording and one of its marks, both UUIDs (anything else is a 404). */
const params_ = z.object({ id: uuid, markId: uuid });

/** GET one mark; PATCH changes it, DELETE removes it (own marks; editors and admins any). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requirePermission(request, "shop:read");
  parseParams(request, params_, params, "mark");
  await recordingOr404(request, params.id);
  const m = (await marksFor(user, params.id)).find((x) => x.id === params.markId);
  if (!m) return Response.json({ error: "not found", reason: "No such mark." }, { status: 404 });
  return Response.json({ mark: m });
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "mark:edit:own");
  parseParams(request, params_, params, "mark");
  if (request.method === "DELETE") return deleteMark(request, user, params.id, params.markId);
  if (request.method !== "PATCH") return methodNotAllowed("GET, PATCH, DELETE");
  const body = await readJsonObject(request);
  return updateMark(request, user, params.id, params.markId, body);
}
