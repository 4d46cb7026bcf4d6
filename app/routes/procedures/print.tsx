import { data, Link } from "react-router";
import type { Route } from "./+types/print";
import "~/components/procedures/procedures.css";
import { fmtDate, ReturnList, SpecTable } from "~/components/procedures/RevisionView";
import { waitingReturn } from "~/lib/procedures/review.server";
import { requirePermission } from "~/lib/auth.server";
import { STATE_LABELS } from "~/lib/procedures/state";
import { renderBody } from "~/components/procedures/render.server";
import { reviewPeople } from "~/lib/procedures/review.server";
import { procedureOr404, revisionOr404 } from "~/lib/procedures/routes.server";
import { revisionById } from "~/lib/procedures/lookup.server";
import { specsOf } from "~/lib/procedures/pages.server";
import { AREA_LABELS } from "~/lib/procedures/areas";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Print: ${data?.rev.title ?? ""}` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requirePermission(request, "shop:read");
  const procedure = await procedureOr404(request, params.slug);
  const n = new URL(request.url).searchParams.get("rev");
  const rev = n
    ? await revisionOr404(request, user, procedure, n)
    : procedure.publishedRevisionId
      ? await revisionById(procedure.publishedRevisionId)
      : null;
  if (!rev) throw data({ message: "Nothing is published yet to print." }, { status: 404 });
  const [body, specs, people] = await Promise.all([renderBody(rev), specsOf(rev.id), reviewPeople(rev)]);
  return {
    slug: procedure.slug,
    rev: {
      number: rev.number,
      title: rev.title,
      summary: rev.summary,
      area: rev.area,
      state: rev.state,
      publishedAt: rev.publishedAt,
      updatedAt: rev.updatedAt,
    },
    people,
    waiting: Boolean(waitingReturn(rev, people.returns)),
    html: body.html,
    units: body.units,
    specs,
    printedAt: new Date().toISOString(),
  };
}

export default function Print({ loaderData }: Route.ComponentProps) {
  const { slug, rev, people, waiting, html, specs, printedAt } = loaderData;
  return (
    <div className="print-sheet mx-auto max-w-3xl">
      <div className="no-print mb-4 flex gap-2">
        <button type="button" className="btn btn-primary" onClick={() => window.print()}>
          Print
        </button>
        <Link className="btn no-underline" to={`/procedures/${slug}`}>
          Back to the procedure
        </Link>
      </div>
      <header className="mb-4 border-b-2 border-graphite pb-2">
        <p className="text-xs font-semibold uppercase tracking-[0.14em] text-brass">Larkspur Engine Works · {AREA_LABELS[rev.area]}</p>
        <h1 className="text-2xl leading-tight">{rev.title}</h1>
        <p className="num mt-1 text-sm">
          <strong>Revision {rev.number}</strong> ·{" "}
          {rev.publishedAt ? (
            <>
              Published {fmtDate(rev.publishedAt)}
              {people.publishedBy && <> by {people.publishedBy}</>}
              {rev.state === "superseded" && " · Superseded"}
            </>
          ) : (
            <>
              {STATE_LABELS[rev.state]} {fmtDate(rev.updatedAt)}
            </>
          )}
          {people.author && <> · written by {people.author}</>} · printed {fmtDate(printedAt)}
        </p>
        {rev.state !== "published" && (
          <p className="mt-1 text-sm font-semibold text-spec-red">Not the published revision: do not work to this copy.</p>
        )}
        {rev.summary && <p className="mt-1 font-serif text-sm">{rev.summary}</p>}
        <ReturnList returns={people.returns} waiting={waiting} className="mt-2" />
      </header>
      {specs.length > 0 && (
        <div className="mb-4">
          <SpecTable specs={specs} units={loaderData.units} />
        </div>
      )}
      {/* biome-ignore lint/security/noDangerouslySetInnerHtml: the body was sanitized at save (document.ts) and rendered by our own components on the server */}
      <div className="proc-body" dangerouslySetInnerHTML={{ __html: html }} />
    </div>
  );
}
