import { z } from "zod";
import type { Route } from "./+types/runs.photos";
import { requirePermission } from "~/lib/auth.server";
import { domainFailure } from "~/lib/domain-error.server";
import { idParams } from "~/lib/edge";
import { invalidJson, methodNotAllowed, parseParams, readForm } from "~/lib/edge.server";
import { savePhoto } from "~/lib/runs/photos.server";

const fields = z.object({ specKey: z.string().regex(/^[A-Za-z0-9_-]{1,40}$/, { message: "That is not a spec of this procedure." }) });

/** POST multipart `specKey` + `photo` (from the tablet's camera): kept with the run's entry for that spec. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requirePermission(request, "run:work");
  parseParams(request, idParams, params, "run");
  return methodNotAllowed("POST");
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "run:work");
  const { id } = parseParams(request, idParams, params, "run");
  if (request.method !== "POST") return methodNotAllowed("POST");
  const form = await readForm(request);
  const parsed = fields.safeParse({ specKey: form.get("specKey") ?? "" });
  const photo = form.get("photo");
  if (!parsed.success || !(photo instanceof File))
    return invalidJson([
      ...(parsed.success ? [] : [{ path: "specKey", message: parsed.error.issues[0].message }]),
      ...(photo instanceof File ? [] : [{ path: "photo", message: "Attach a photo (a file field named photo)." }]),
    ]);
  try {
    return Response.json(await savePhoto(user, id, parsed.data.specKey, photo), { status: 201 });
  } catch (err) {
    return domainFailure(request, err);
  }
}
