import type { Route } from "./+types/mark";
import { requirePermission } from "~/lib/auth.server";
import { methodNotAllowed, readJson } from "~/lib/recordings/api.server";
import { deleteMark, marksFor, recordingOr404, updateMark } from "~/lib/recordings/notes.server";

/** GET one mark; PATCH changes it, DELETE removes it (own marks; editors and admins any). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requirePermission(request, "shop:read");
  await recordingOr404(request, params.id);
  const m = (await marksFor(user, params.id)).find((x) => x.id === params.markId);
  if (!m) return Response.json({ error: "not found", reason: "No such mark." }, { status: 404 });
  return Response.json({ mark: m });
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "mark:edit:own");
  if (request.method === "DELETE") return deleteMark(request, user, params.id, params.markId);
  if (request.method !== "PATCH") return methodNotAllowed("GET, PATCH, DELETE");
  const body = await readJson(request);
  if (!body.ok) return body.res;
  return updateMark(request, user, params.id, params.markId, body.body);
}
