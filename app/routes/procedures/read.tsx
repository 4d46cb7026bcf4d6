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
import { renderRevisionBody } from "~/components/procedures/render.server";
import { domainFailure, unknownAction } from "~/lib/domain-error.server";
import { DomainError } from "~/lib/domain-error";
import { foundOr404, procedureOr404, slugOr404 } from "~/lib/procedures/routes.server";
import { readPage } from "~/lib/procedures/read-page.server";
import { bodyForLoaderData } from "~/lib/procedures/page-body.server";
import { STATE_LABELS } from "~/lib/procedures/state";
import { startDraftFrom } from "~/lib/procedures/drafts.server";
import { openRevisionOf } from "~/lib/procedures/lookup.server";
import { setWatching } from "~/lib/procedures/watching.server";
import { ProcedureTestRecords } from "~/components/test-records/parts";
import { testRecordsForProcedure } from "~/lib/test-records/records.server";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.procedure.title ?? "Procedure"} · Benchreel` }];

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const user = await requirePermission(request, "shop:read");
  const slug = slugOr404(params.slug);
  const { procedure, rev, open, watching, around, titles, author, publishedBy } = foundOr404(request, slug, await readPage(slug, user.id));
  const openVisible = open && canOnOwned(user, "procedure:view-drafts", open.authorId) ? open : null;
  const flags = {
    canWatch: can(user.role, "procedure:watch"),
    canDraft: can(user.role, "procedure:draft"),
    canEditOpen: open ? canOnOwned(user, "procedure:edit", open.authorId) && open.state === "draft" : false,
    canReview: can(user.role, "procedure:review"),
  };
  const summary = { id: procedure.id, slug: procedure.slug, title: procedure.title };
  if (!rev || !around) {
    if (!openVisible) throw data({ message: "This procedure has not been published yet." }, { status: 404 });
    return { procedure: summary, published: null, open: openVisible, flags, watching: false } as const;
  }
  const testRecords = await testRecordsForProcedure(procedure.id);
  const body = renderRevisionBody(rev, titles);
  return {
    procedure: summary,
    published: {
      id: rev.id,
      number: rev.number,
      title: rev.title,
      summary: rev.summary,
      tags: rev.tags,
      publishedAt: rev.publishedAt,
      author,
      publishedBy,
      changeNote: rev.changeNote,
      html: bodyForLoaderData(request, context, body.html),
      widgets: body.widgets,
      units: body.units,
      specs: around.specs,
      from: around.from,
      marks: around.marks,
    },
    open: openVisible,
    flags,
    watching,
    testRecords,
    canFileTest: can(user.role, "testrecord:create"),
    canRun: can(user.role, "run:work"),
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
    return redirectWithFlash(`/procedures/${procedure.slug}`, {
      kind: "ok",
      message: intent === "watch" ? "You will get an e-mail when a new revision is published." : "You no longer watch this procedure.",
    });
  }
  if (intent === "new-draft") {
    assertCan(request, user, "procedure:draft");
    try {
      const open = await openRevisionOf(procedure.id);
      if (open) {
        if (canOnOwned(user, "procedure:edit", open.authorId) && open.state === "draft")
          throw redirect(`/procedures/${procedure.slug}/r/${open.number}/edit`);
        throw new DomainError(
          `Revision ${open.number} is already ${STATE_LABELS[open.state].toLowerCase()}; only one revision is open at a time.`,
        );
      }
      if (!procedure.publishedRevisionId) throw new DomainError("Nothing is published yet to start from.");
      const rev = await startDraftFrom(user, procedure.publishedRevisionId);
      return redirectWithFlash(`/procedures/${procedure.slug}/r/${rev.number}/edit`, {
        kind: "ok",
        message: `Revision ${rev.number} started from the published page.`,
      });
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
          Revision {open!.number} is {STATE_LABELS[open!.state].toLowerCase()}. <Link to={openLink!}>Open it</Link> ·{" "}
          <Link to={`/procedures/${slug}/history`}>History</Link>
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
            <button className="btn w-full" type="submit">
              Start a new draft
            </button>
          </Form>
        )}
        {"canRun" in loaderData && loaderData.canRun && (
          <Link to={`/runs/start?procedure=${slug}`} className="btn btn-primary w-full no-underline" data-testid="start-run">
            Work it on a build, step by step
          </Link>
        )}
        {open && openLink && (
          <p className="rounded-md bg-brass-soft/60 px-3 py-2">
            Revision {open.number} is {STATE_LABELS[open.state].toLowerCase()}.{" "}
            <Link to={openLink}>{flags.canEditOpen ? "Continue the draft" : "Open it"}</Link>
            {open.state === "in_review" && flags.canReview && (
              <>
                {" "}
                · <Link to={`/procedures/${slug}/compare?to=${open.number}`}>Compare</Link>
              </>
            )}
          </p>
        )}
        <p className="flex flex-wrap gap-x-3 gap-y-1 pt-1">
          <Link to={`/procedures/${slug}/history`}>History</Link>
          <Link to={`/procedures/${slug}/print`}>Print view</Link>
        </p>
        {err && (
          <p role="alert" className="text-spec-red">
            {err}
          </p>
        )}
      </div>
      <section className="card p-4" aria-labelledby="linked-h">
        <h2 id="linked-h" className="text-base">
          Linked from
        </h2>
        {published.from.length ? (
          <ul className="mt-1 space-y-1">
            {published.from.map((f) => (
              <li key={f.slug}>
                <Link to={`/procedures/${f.slug}`}>{f.title}</Link>
              </li>
            ))}
          </ul>
        ) : (
          <p className="mt-1 text-graphite-soft">No published procedure links here yet.</p>
        )}
      </section>
      <section className="card p-4" aria-labelledby="marks-h">
        <h2 id="marks-h" className="text-base">
          Referenced in recordings
        </h2>
        {published.marks.length ? (
          <ul className="mt-1 space-y-1.5">
            {published.marks.map((m) => (
              <li key={m.id}>
                <Link to={`/recordings/${m.recordingId}?t=${Math.floor(m.tStart)}`}>
                  <span className="num font-semibold">{formatSeconds(m.tStart)}</span> {m.text}
                </Link>
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
      banner={
        published.changeNote ? (
          <p className="no-print mb-3 text-sm text-graphite-soft">
            Latest change ({fmtDate(published.publishedAt)}): {published.changeNote}
          </p>
        ) : null
      }
    />
  );
}
