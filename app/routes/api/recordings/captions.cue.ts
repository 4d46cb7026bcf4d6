import { z } from "zod";
import type { Route } from "./+types/captions.cue";
import { requirePermission } from "~/lib/auth.server";
import { captionsFor, correctCue, cueCorrectionSchema } from "~/lib/captions/captions.server";
import { domainFailure } from "~/lib/domain-error.server";
import { uuid } from "~/lib/edge";
import { invalidInput, methodNotAllowed, notFound, parseParams, readJsonObject } from "~/lib/edge.server";

const params_ = z.object({ id: uuid, cueId: uuid });

/** GET one caption line with its corrections (who and when); PATCH corrects its words ({ text, version }). */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "shop:read");
  const { id, cueId } = parseParams(request, params_, params, "caption line");
  const cue = (await captionsFor(id)).cues.find((c) => c.id === cueId);
  if (!cue) notFound(request, "caption line");
  return Response.json({ cue }, { headers: { "Cache-Control": "private, no-store" } });
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "caption:edit");
  const { id, cueId } = parseParams(request, params_, params, "caption line");
  if (request.method !== "PATCH") return methodNotAllowed("GET, PATCH");
  const parsed = cueCorrectionSchema.safeParse(await readJsonObject(request));
  if (!parsed.success) return invalidInput(request, parsed.error);
  try {
    return Response.json({ cue: await correctCue(request, user, id, cueId, parsed.data) });
  } catch (err) {
    return domainFailure(request, err);
  }
}
