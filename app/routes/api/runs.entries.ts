import type { Route } from "./+types/runs.entries";
import { requirePermission } from "~/lib/auth.server";
import { domainFailure } from "~/lib/domain-error.server";
import { invalidInput, methodNotAllowed, parseParams, readJsonObject } from "~/lib/edge.server";
import { idParams } from "~/lib/edge";
import { entriesBodySchema } from "~/lib/runs/entries";
import { saveEntries, setCurrentStep } from "~/lib/runs/runs.server";

/**
 * POST `{ entries: [{ key, specKey, value, unit, decimals, typedAt, device }], step? }`: entries
 * typed on the run screen, each stored once under its key (a retry answers `duplicate: true`),
 * and the step the screen is on.
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
  const parsed = entriesBodySchema.safeParse(await readJsonObject(request));
  if (!parsed.success) return invalidInput(request, parsed.error);
  try {
    const { entries, step } = parsed.data;
    const saved = entries.length ? await saveEntries(user, id, entries) : { saved: [] };
    const at = step == null ? null : await setCurrentStep(id, step);
    return Response.json({ ...saved, step: at }, { headers: { "Cache-Control": "no-store" } });
  } catch (err) {
    return domainFailure(request, err);
  }
}
