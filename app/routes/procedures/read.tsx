import { data, Form, Link, redirect } from "react-router";
import type { Route } from "./+types/read";
import { readForm } from "~/lib/edge.server";
import "~/components/procedures/procedures.css";
import { PageHeader } from "~/components/page";
import { fmtDate, RevisionArticle } from "~/components/procedures/RevisionView";
import { assertCan, requirePermission } from "~/lib/auth.server";
import { redirectWithFlash } from "~/lib/flash.server";
import { can, canOnOwned } from "~/lib/permissions";
import { formatSeconds } from "~/lib/procedures/format";
import { renderBody } from "~/components/procedures/render.server";
import { domainFailure, unknownAction } from "~/lib/domain-error.server";
import { DomainError } from "~/lib/domain-error";
import { procedureOr404 } from "~/lib/procedures/routes.server";
import { STATE_LABELS } from "~/lib/procedures/state";
import { startDraftFrom } from "~/lib/procedures/drafts.server";
import { openRevisionOf, revisionById } from "~/lib/procedures/lookup.server";
import { linkedFrom, openRevisionSummary, specsOf } from "~/lib/procedures/pages.server";
import { isWatching, setWatching } from "~/lib/procedures/watching.server";
import { marksReferencing } from "~/lib/recordings/procedure-links.server";
import { reviewPeople } from "~/lib/procedures/review.server";
import { ProcedureTestRecords } from "~/components/test-records/parts";
import { testRecordsForProcedure } from "~/lib/test-records/records.server";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.procedure.title ?? "Procedure"} · Benchreel` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requirePermission(request, "shop:read");
  const procedure = await procedureOr404(request, params.slug);
  // The open revision and the published one are independent look-ups: ask for both at once.
  const [open, rev] = await Promise.all([
    openRevisionSummary(procedure.id),
    procedure.publishedRevisionId ? revisionById(procedure.publishedRevisionId) : Promise.resolve(null),
  ]);
  const openVisible = open && canOnOwned(user, "procedure:view-drafts", open.authorId) ? { number: open.number, state: open.state, authorId: open.authorId } : null;
  const flags = {
    canWatch: can(user.role, "procedure:watch"),
    canDraft: can(user.role, "procedure:draft"),
    canEditOpen: open ? canOnOwned(user, "procedure:edit", open.authorId) && open.state === "draft" : false,
    canReview: can(user.role, "procedure:review"),
  };
  if (!procedure.publishedRevisionId || !rev) {
    if (!openVisible) throw data({ message: "This procedure has not been published yet." }, { status: 404 });
    return { procedure: { id: procedure.id, slug: procedure.slug, title: procedure.title }, published: null, open: openVisible, flags, watching: false } as const;
  }
  const [body, specs, from, marks, watching, people, testRecords] = await Promise.all([
    renderBody(rev),
    specsOf(rev.id),
    linkedFrom(procedure.id),
    marksReferencing(procedure.id),
    isWatching(user.id, procedure.id),
    reviewPeople(rev),
    testRecordsForProcedure(procedure.id),
  ]);
  return {
    procedure: { id: procedure.id, slug: procedure.slug, title: procedure.title },
    published: { id: rev.id, number: rev.number, title: rev.title, summary: rev.summary, tags: rev.tags, publishedAt: rev.publishedAt, author: people.author, publishedBy: people.publishedBy, changeNote: rev.changeNote, html: body.html, widgets: body.widgets, units: body.units, specs, from, marks },
    open: openVisible,
    flags,
    watching,
    testRecords,
    canFileTest: can(user.role, "testrecord:create"),
  } as const;
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requirePermission(request, "shop:read");
  const procedure = await procedureOr404(request, params.slug);
  const form = await readForm(request);
  const intent = form.get("intent");
  if (intent === "watch" || intent === "unwatch") {
    assertCan(request, user, "procedure:watch");
    await setWatching(user.id, procedure.id, intent === "watch");
    return redirectWithFlash(`/procedures/${procedure.slug}`, { kind: "ok", message: intent === "watch" ? "You will get an e-mail when a new revision is published." : "You no longer watch this procedure." });
  }
  if (intent === "new-draft") {
    assertCan(request, user, "procedure:draft");
    try {
      const open = await openRevisionOf(procedure.id);
      if (open) {
        if (canOnOwned(user, "procedure:edit", open.authorId) && open.state === "draft") throw redirect(`/procedures/${procedure.slug}/r/${open.number}/edit`);
        throw new DomainError(`Revision ${open.number} is already ${STATE_LABELS[open.state].toLowerCase()}; only one revision is open at a time.`);
      }
      if (!procedure.publishedRevisionId) throw new DomainError("Nothing is published yet to start from.");
      const rev = await startDraftFrom(user, procedure.publishedRevisionId);
      return redirectWithFlash(`/procedures/${procedure.slug}/r/${rev.number}/edit`, { kind: "ok", message: `Revision ${rev.number} started from the published page.` });
    } catch (err) {
      return domainFailure(request, err, String(intent));
    }
  }
  return unknownAction(request, intent);
}

export default function ReadProcedure({ loaderData, actionData }: Route.ComponentProps) {
  const { procedure, published, open, flags, watching } = loaderData;
  const slug = procedure.slug;
  const openLink = open ? (flags.canEditOpen ? `/procedures/${slug}/r/${open.number}/edit` : `/procedures/${slug}/r/${open.number}`) : null;
  const err = actionData?.errors ? Object.values(actionData.errors)[0] : null;
  if (!published) {
    return (
      <>
        <PageHeader title={procedure.title} kicker="Not published yet" />
        <p className="card">
          Revision {open!.number} is {STATE_LABELS[open!.state].toLowerCase()}. <Link to={openLink!}>Open it</Link> · <Link to={`/procedures/${slug}/history`}>History</Link>
        </p>
      </>
    );
  }
  const aside = (
    <>
      <div className="card space-y-2 p-4">
        {flags.canWatch && (
          <Form method="post">
            <input type="hidden" name="intent" value={watching ? "unwatch" : "watch"} />
            <button className="btn w-full" type="submit" aria-pressed={watching} data-testid="watch-toggle">
              {watching ? "★ Watching — stop" : "☆ Watch for new revisions"}
            </button>
          </Form>
        )}
        {flags.canDraft && !open && (
          <Form method="post">
            <input type="hidden" name="intent" value="new-draft" />
            <button className="btn w-full" type="submit">Start a new draft</button>
          </Form>
        )}
        {open && openLink && (
          <p className="rounded-md bg-brass-soft/60 px-3 py-2">
            Revision {open.number} is {STATE_LABELS[open.state].toLowerCase()}. <Link to={openLink}>{flags.canEditOpen ? "Continue the draft" : "Open it"}</Link>
            {open.state === "in_review" && flags.canReview && <> · <Link to={`/procedures/${slug}/compare?to=${open.number}`}>Compare</Link></>}
          </p>
        )}
        <p className="flex flex-wrap gap-x-3 gap-y-1 pt-1">
          <Link to={`/procedures/${slug}/history`}>History</Link>
          <Link to={`/procedures/${slug}/print`}>Print view</Link>
        </p>
        {err && <p role="alert" className="text-spec-red">{err}</p>}
      </div>
      <section className="card p-4" aria-labelledby="linked-h">
        <h2 id="linked-h" className="text-base">Linked from</h2>
        {published.from.length ? (
          <ul className="mt-1 space-y-1">{published.from.map((f) => <li key={f.slug}><Link to={`/procedures/${f.slug}`}>{f.title}</Link></li>)}</ul>
        ) : (
          <p className="mt-1 text-graphite-soft">No published procedure links here yet.</p>
        )}
      </section>
      <section className="card p-4" aria-labelledby="marks-h">
        <h2 id="marks-h" className="text-base">Referenced in recordings</h2>
        {published.marks.length ? (
          <ul className="mt-1 space-y-1.5">
            {published.marks.map((m) => (
              <li key={m.id}>
                <Link to={`/recordings/${m.recordingId}?t=${Math.floor(m.tStart)}`}><span className="num font-semibold">{formatSeconds(m.tStart)}</span> {m.text}</Link>
                <div className="text-xs text-graphite-soft">{m.recordingTitle}</div>
              </li>
            ))}
          </ul>
        ) : (
          <p className="mt-1 text-graphite-soft">No marks in recordings point to this procedure.</p>
        )}
      </section>
      {"testRecords" in loaderData && <ProcedureTestRecords rows={loaderData.testRecords} slug={slug} canFile={loaderData.canFileTest} />}
    </>
  );
  return (
    <RevisionArticle
      title={published.title}
      summary={published.summary}
      tags={published.tags}
      number={published.number}
      state="published"
      date={published.publishedAt}
      author={published.author}
      publishedBy={published.publishedBy}
      html={published.html}
      widgets={published.widgets}
      units={published.units}
      specs={published.specs}
      aside={aside}
      banner={published.changeNote ? <p className="no-print mb-3 text-sm text-graphite-soft">Latest change ({fmtDate(published.publishedAt)}): {published.changeNote}</p> : null}
    />
  );
}
