import type { Route } from "./+types/reading";
import { requirePermission } from "~/lib/auth.server";
import { methodNotAllowed, readJson } from "~/lib/recordings/api.server";
import { deleteReading, listReadings, recordingOr404, updateReading } from "~/lib/recordings/notes.server";

/** GET one reading; PATCH changes it (checked as a whole), DELETE removes it. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  await recordingOr404(request, params.id);
  const r = (await listReadings(params.id)).find((x) => x.id === params.readingId);
  if (!r) return Response.json({ error: "not found", reason: "No such reading." }, { status: 404 });
  return Response.json({ reading: r });
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "reading:edit:own");
  if (request.method === "DELETE") return deleteReading(request, user, params.id, params.readingId);
  if (request.method !== "PATCH") return methodNotAllowed("GET, PATCH, DELETE");
  const body = await readJson(request);
  if (!body.ok) return body.res;
  return updateReading(request, user, params.id, params.readingId, body.body);
}
