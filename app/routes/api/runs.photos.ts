import { z } from "zod";
import type { Route } from "./+types/runs.photos";
import { requirePermission } from "~/lib/auth.server";
import { domainFailure } from "~/lib/domain-error.server";
import { idParams } from "~/lib/edge";
import { invalidJson, methodNotAllowed, parseParams, readForm } from "~/lib/edge.server";
import { ENTRY_KEY, placeSchema } from "~/lib/runs/entries";
import { savePhoto } from "~/lib/runs/photos.server";

const placeNumber = z
  .string()
  .trim()
  .regex(/^\d{1,3}$/, { message: "A place is a whole number." })
  .transform(Number)
  .optional();
const fields = z.object({
  specKey: z.string().regex(/^[A-Za-z0-9_-]{1,40}$/, { message: "That is not a spec of this procedure." }),
  key: z.string().regex(ENTRY_KEY, { message: "A photo key is 8–80 letters, digits, - or _." }).optional(),
  position: z.object({ cylinder: placeNumber, journal: placeNumber, fastener: placeNumber }).pipe(placeSchema),
});
const text = (v: FormDataEntryValue | null) => (typeof v === "string" && v !== "" ? v : undefined);

/**
 * POST multipart `specKey` + `photo` (from the tablet's camera), with `cylinder`, `journal` or
 * `fastener` for a spec measured per place, and the device's `key` (a photo sent again after a
 * lost answer is stored once): kept with the run's entry at that place.
 */
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
  const parsed = fields.safeParse({
    specKey: form.get("specKey") ?? "",
    key: text(form.get("key")),
    position: { cylinder: text(form.get("cylinder")), journal: text(form.get("journal")), fastener: text(form.get("fastener")) },
  });
  const photo = form.get("photo");
  if (!parsed.success || !(photo instanceof File))
    return invalidJson([
      ...(parsed.success ? [] : parsed.error.issues.map((i) => ({ path: i.path.join("."), message: i.message }))),
      ...(photo instanceof File ? [] : [{ path: "photo", message: "Attach a photo (a file field named photo)." }]),
    ]);
  try {
    const { specKey, key, position } = parsed.data;
    const saved = await savePhoto(user, id, specKey, photo, { key, position });
    return Response.json(saved, { status: saved.duplicate ? 200 : 201 });
  } catch (err) {
    return domainFailure(request, err);
  }
}
