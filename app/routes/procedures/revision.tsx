import { data, Form, Link, useNavigation } from "react-router";
import type { Route } from "./+types/revision";
import { readForm } from "~/lib/edge.server";
import { nulErrors } from "~/lib/forms";
import "~/components/procedures/procedures.css";
import { FormError } from "~/components/forms";
import { ReturnList, RevisionArticle } from "~/components/procedures/RevisionView";
import { requirePermission } from "~/lib/auth.server";
import { redirectWithFlash } from "~/lib/flash.server";
import { renderBody } from "~/components/procedures/render.server";
import { domainFailure, unknownAction } from "~/lib/domain-error.server";
import { reviewPeople, waitingReturn } from "~/lib/procedures/review.server";
import { procedureOr404, revisionOr404 } from "~/lib/procedures/routes.server";
import { available, STATE_LABELS, type RevisionState } from "~/lib/procedures/state";
import { startDraftFrom } from "~/lib/procedures/drafts.server";
import { openRevisionOf } from "~/lib/procedures/lookup.server";
import { specsOf } from "~/lib/procedures/pages.server";
import { discardDraft, publishRevision, returnRevision, submitRevision, withdrawRevision } from "~/lib/procedures/transitions.server";

export const meta: Route.MetaFunction = ({ data }) => [
  { title: `${data?.rev.title ?? "Revision"} (rev. ${data?.rev.number ?? ""}) · Benchreel` },
];

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requirePermission(request, "shop:read");
  const procedure = await procedureOr404(request, params.slug);
  const rev = await revisionOr404(request, user, procedure, params.number);
  const open = await openRevisionOf(procedure.id);
  const [body, specs, people] = await Promise.all([renderBody(rev), specsOf(rev.id), reviewPeople(rev)]);
  const actions = available({ state: rev.state, authorId: rev.authorId }, user, {
    openRevisionNumber: open && open.id !== rev.id ? open.number : null,
  });
  return {
    slug: procedure.slug,
    rev: {
      id: rev.id,
      number: rev.number,
      state: rev.state as RevisionState,
      title: rev.title,
      summary: rev.summary,
      tags: rev.tags,
      changeNote: rev.changeNote,
      updatedAt: rev.updatedAt,
      publishedAt: rev.publishedAt,
      submittedAt: rev.submittedAt,
    },
    people,
    waiting: Boolean(waitingReturn(rev, people.returns)),
    everPublished: Boolean(procedure.publishedRevisionId),
    html: body.html,
    widgets: body.widgets,
    units: body.units,
    specs,
    actions,
    openNumber: open?.number ?? null,
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "shop:read");
  const procedure = await procedureOr404(request, params.slug);
  const rev = await revisionOr404(request, user, procedure, params.number);
  const form = await readForm(request);
  const intent = String(form.get("intent") ?? "");
  const nul = nulErrors(form);
  if (Object.keys(nul).length) return data({ intent, errors: nul }, { status: 400 });
  const here = `/procedures/${procedure.slug}/r/${rev.number}`;
  try {
    switch (intent) {
      case "submit":
        await requirePermission(request, "procedure:draft");
        await submitRevision(user, rev.id, String(form.get("changeNote") ?? ""));
        return redirectWithFlash(here, { kind: "ok", message: "Submitted for review. The editors have been e-mailed." });
      case "withdraw":
        await withdrawRevision(user, rev.id);
        return redirectWithFlash(`${here}/edit`, { kind: "ok", message: "Taken back from review; it is a draft again." });
      case "publish": {
        await requirePermission(request, "procedure:review");
        const { slug } = await publishRevision(user, rev.id);
        return redirectWithFlash(`/procedures/${slug}`, { kind: "ok", message: `Revision ${rev.number} is published.` });
      }
      case "return":
        await requirePermission(request, "procedure:review");
        await returnRevision(user, rev.id, String(form.get("reason") ?? ""));
        return redirectWithFlash(here, { kind: "ok", message: "Returned to Draft; the author has been e-mailed the reason." });
      case "discard":
        await discardDraft(user, rev.id);
        return redirectWithFlash(`/procedures/${procedure.slug}/history`, {
          kind: "ok",
          message: `Draft revision ${rev.number} discarded.`,
        });
      case "restore": {
        await requirePermission(request, "procedure:draft");
        const draft = await startDraftFrom(user, rev.id);
        return redirectWithFlash(`/procedures/${procedure.slug}/r/${draft.number}/edit`, {
          kind: "ok",
          message: `Revision ${rev.number} restored as draft revision ${draft.number}.`,
        });
      }
    }
  } catch (err) {
    return domainFailure(request, err, intent);
  }
  return unknownAction(request, intent);
}

export default function RevisionPage({ loaderData, actionData }: Route.ComponentProps) {
  const { slug, rev, people, waiting, everPublished, html, widgets, specs, actions } = loaderData;
  const busy = useNavigation().state !== "idle";
  const errors: Record<string, string> = actionData?.errors ?? {};
  const has = (a: string) => actions.includes(a as never);
  // Something to compare with: the published revision, or for the published one the revision it replaced.
  const comparable = everPublished && (rev.state !== "published" || rev.number > 1);
  const banner = (
    <div className="no-print mb-5 space-y-3">
      <p className="rounded-md border border-rule bg-paper-deep/60 px-4 py-2 text-sm">
        You are looking at revision {rev.number} ({STATE_LABELS[rev.state]}).{" "}
        {[
          everPublished && rev.state !== "published" && (
            <Link key="read" to={`/procedures/${slug}`}>
              Open the published page
            </Link>
          ),
          <Link key="history" to={`/procedures/${slug}/history`}>
            History
          </Link>,
          comparable && (
            <Link key="compare" to={`/procedures/${slug}/compare?to=${rev.number}`}>
              {rev.state === "published" ? "Compare with the revision before" : "Compare with the published revision"}
            </Link>
          ),
          <Link key="print" to={`/procedures/${slug}/print?rev=${rev.number}`}>
            Print view
          </Link>,
        ]
          .filter(Boolean)
          .flatMap((l, i) => (i ? [" · ", l] : [l]))}
      </p>
      {rev.changeNote && rev.state !== "draft" && (
        <p className="text-sm">
          <span className="font-semibold">Change note:</span> {rev.changeNote}
        </p>
      )}
      <ReturnList returns={people.returns} waiting={waiting} />
      <FormError message={Object.values(errors)[0]} />
      {actions.length > 0 && (
        <div className="card flex flex-wrap items-start gap-4 p-4">
          {has("edit") && (
            <Link className="btn btn-primary no-underline" to={`/procedures/${slug}/r/${rev.number}/edit`}>
              Edit the draft
            </Link>
          )}
          {has("submit") && (
            <Form method="post" className="flex min-w-[18rem] flex-1 flex-wrap items-end gap-2">
              <input type="hidden" name="intent" value="submit" />
              <label className="flex-1">
                <span className="label">Change note</span>
                <input name="changeNote" className="field" placeholder="What changed and why" required />
              </label>
              <button className="btn btn-primary" type="submit" disabled={busy}>
                Submit for review
              </button>
            </Form>
          )}
          {has("publish") && (
            <Form method="post">
              <input type="hidden" name="intent" value="publish" />
              <button className="btn btn-primary" type="submit" disabled={busy}>
                Publish revision {rev.number}
              </button>
            </Form>
          )}
          {has("return") && (
            <Form method="post" className="flex min-w-[18rem] flex-1 flex-wrap items-end gap-2">
              <input type="hidden" name="intent" value="return" />
              <label className="flex-1">
                <span className="label">Reason for returning</span>
                <input name="reason" className="field" placeholder="What the author should change" required />
              </label>
              <button className="btn" type="submit" disabled={busy}>
                Return to Draft
              </button>
            </Form>
          )}
          {has("withdraw") && (
            <Form method="post">
              <input type="hidden" name="intent" value="withdraw" />
              <button className="btn" type="submit" disabled={busy}>
                Take back from review
              </button>
            </Form>
          )}
          {has("restore") && (
            <Form method="post">
              <input type="hidden" name="intent" value="restore" />
              <button className="btn" type="submit" disabled={busy}>
                Restore as a new draft
              </button>
            </Form>
          )}
          {has("discard") && (
            <Form
              method="post"
              onSubmit={(e) => {
                if (!confirm("Discard this draft? Its text is deleted.")) e.preventDefault();
              }}
            >
              <input type="hidden" name="intent" value="discard" />
              <button className="btn btn-danger" type="submit" disabled={busy}>
                Discard draft
              </button>
            </Form>
          )}
        </div>
      )}
    </div>
  );
  return (
    <RevisionArticle
      title={rev.title}
      summary={rev.summary}
      tags={rev.tags}
      number={rev.number}
      state={rev.state}
      date={rev.publishedAt ?? rev.updatedAt}
      author={people.author}
      publishedBy={people.publishedBy}
      html={html}
      widgets={widgets}
      units={loaderData.units}
      specs={specs}
      banner={banner}
    />
  );
}
