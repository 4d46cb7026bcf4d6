import { Link, redirect, type ShouldRevalidateFunctionArgs } from "react-router";
import type { Route } from "./+types/edit";
import "~/components/procedures/procedures.css";
import { PageHeader } from "~/components/page";
import { ProcedureEditor } from "~/components/procedures/editor/ProcedureEditor";
import { requirePermission } from "~/lib/auth.server";
import { canOnOwned } from "~/lib/permissions";
import { docReferences } from "~/lib/procedures/body";
import type { JSONNode } from "~/lib/procedures/document";
import { procedureOr404, revisionOr404 } from "~/lib/procedures/routes.server";
import { titlesFor } from "~/lib/procedures/lookup.server";
import { reviewPeople, waitingReturn } from "~/lib/procedures/review.server";
import { ReturnList } from "~/components/procedures/RevisionView";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Editing: ${data?.draft.title ?? ""} · Benchreel` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requirePermission(request, "procedure:edit:own");
  const procedure = await procedureOr404(request, params.slug);
  const rev = await revisionOr404(request, user, procedure, params.number);
  if (rev.state !== "draft" || !canOnOwned(user, "procedure:edit", rev.authorId))
    throw redirect(`/procedures/${procedure.slug}/r/${rev.number}`);
  const [titleMap, people] = await Promise.all([titlesFor(docReferences(rev.doc as JSONNode).procedureIds), reviewPeople(rev)]);
  const titles = Object.fromEntries(titleMap);
  return {
    slug: procedure.slug,
    hasPublished: Boolean(procedure.publishedRevisionId),
    draft: {
      id: rev.id,
      procedureId: procedure.id,
      number: rev.number,
      version: rev.version,
      title: rev.title,
      summary: rev.summary,
      area: rev.area,
      tags: rev.tags,
      doc: rev.doc,
      titles,
      returns: people.returns,
      waiting: Boolean(waitingReturn(rev, people.returns)),
    },
  };
}

// Autosaves go to the API route; they must not reload this page's data (the editor holds the truth while editing).
export function shouldRevalidate({ formAction, defaultShouldRevalidate }: ShouldRevalidateFunctionArgs) {
  if (formAction?.startsWith("/api/procedures/")) return false;
  return defaultShouldRevalidate;
}

export default function EditDraft({ loaderData }: Route.ComponentProps) {
  const { slug, draft, hasPublished } = loaderData;
  return (
    <>
      <PageHeader
        title={`Draft revision ${draft.number}`}
        kicker="Editing"
        actions={
          <>
            <Link className="btn no-underline" to={`/procedures/${slug}/r/${draft.number}`}>
              Preview
            </Link>
            {hasPublished && (
              <Link className="btn no-underline" to={`/procedures/${slug}/compare?to=${draft.number}`}>
                Compare
              </Link>
            )}
          </>
        }
      >
        Changes save by themselves a moment after you stop typing.
      </PageHeader>
      <ReturnList returns={draft.returns} waiting={draft.waiting} className="mb-4" />
      <ProcedureEditor initial={draft} submitTo={`/procedures/${slug}/r/${draft.number}`} />
    </>
  );
}
