import { z } from "zod";
import type { Route } from "./+types/reading";
import { requirePermission } from "~/lib/auth.server";
import { methodNotAllowed, parseParams, readJsonObject } from "~/lib/edge.server";
import { uuid } from "~/lib/edge";
import { deleteReading, listReadings, recordingOr404, updateReading } from "~/lib/recordings/notes.server";

/** The params: a recording and one of its readings, both UUIDs (anything else is a 404). */
const params_ = z.object({ id: uuid, readingId: uuid });

/** GET one reading; PATCH changes it (checked as a whole), DELETE removes it. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  parseParams(request, params_, params, "reading");
  await recordingOr404(request, params.id);
  const r = (await listReadings(params.id)).find((x) => x.id === params.readingId);
  if (!r) return Response.json({ error: "not found", reason: "No such reading." }, { status: 404 });
  return Response.json({ reading: r });
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "reading:edit:own");
  parseParams(request, params_, params, "reading");
  if (request.method === "DELETE") return deleteReading(request, user, params.id, params.readingId);
  if (request.method !== "PATCH") return methodNotAllowed("GET, PATCH, DELETE");
  const body = await readJsonObject(request);
  return updateReading(request, user, params.id, params.readingId, body);
}
