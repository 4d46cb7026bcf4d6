import { z } from "zod";
import type { Route } from "./+types/revision";
import { requirePermission } from "~/lib/auth.server";
import { idParams, positiveInt } from "~/lib/edge";
import { invalidInput, parseParams, readJsonObject } from "~/lib/edge.server";
import { canSeeRevision } from "~/lib/procedures/routes.server";
import { domainFailure } from "~/lib/domain-error.server";
import { AREAS } from "~/lib/procedures/areas";
import { saveDraft } from "~/lib/procedures/drafts.server";
import { revisionById } from "~/lib/procedures/lookup.server";
import { normalizeTags } from "~/lib/tags";

const saveSchema = z.object({
  baseVersion: positiveInt,
  title: z.string().trim().min(4, "The title needs at least 4 characters.").max(120, "Keep the title under 120 characters."),
  summary: z.string().trim().max(300, "Keep the summary under 300 characters.").default(""),
  area: z.enum(AREAS),
  tags: z.union([z.array(z.string()), z.string()]).default([]),
  doc: z.unknown(),
});

/** The draft as stored now (version, text), e.g. to reload after a conflict. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requirePermission(request, "procedure:view-drafts:own");
  const rev = await revisionById(parseParams(request, idParams, params, "revision").id);
  if (!rev) return Response.json({ error: "not found" }, { status: 404 });
  if (!canSeeRevision(user, rev))
    return Response.json({ error: "forbidden", reason: "Drafts are open to their author and the editors." }, { status: 403 });
  return Response.json({
    id: rev.id,
    number: rev.number,
    state: rev.state,
    version: rev.version,
    title: rev.title,
    summary: rev.summary,
    area: rev.area,
    tags: rev.tags,
    doc: rev.doc,
    updatedAt: rev.updatedAt,
  });
}

/** Autosave: JSON { baseVersion, title, summary, area, tags, doc }. 409 on a conflict (the loser's text is kept as a conflict copy); 422 only for what no draft may hold. */
export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "procedure:edit:own");
  if (request.method !== "POST") return Response.json({ error: "method not allowed" }, { status: 405 });
  const { id } = parseParams(request, idParams, params, "revision");
  const parsed = saveSchema.safeParse(await readJsonObject(request));
  if (!parsed.success) return invalidInput(request, parsed.error);
  try {
    const r = await saveDraft(user, id, { ...parsed.data, tags: normalizeTags(parsed.data.tags) });
    if (!r.ok)
      return Response.json(
        {
          error: "conflict",
          message: `${r.current.savedBy ?? "Someone"} saved this draft while you were editing. Your version was not lost: it is kept as a conflict copy.`,
          ...r,
        },
        { status: 409 },
      );
    // Saved even with blocks half done: `incomplete` lists them, for the editor's marks and the submit check.
    return Response.json({ ok: true, version: r.version, savedAt: r.updatedAt, warnings: r.warnings, incomplete: r.incomplete });
  } catch (err) {
    return domainFailure(request, err);
  }
}
