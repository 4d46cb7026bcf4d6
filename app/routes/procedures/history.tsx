import { Link } from "react-router";
import type { Route } from "./+types/history";
import { PageHeader } from "~/components/page";
import { fmtDate, ReturnList, StateBadge } from "~/components/procedures/RevisionView";
import { requirePermission } from "~/lib/auth.server";
import { canSeeRevision, procedureOr404 } from "~/lib/procedures/routes.server";
import { history } from "~/lib/procedures/pages.server";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `History: ${data?.title ?? ""} · Benchreel` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requirePermission(request, "shop:read");
  const procedure = await procedureOr404(request, params.slug);
  const rows = (await history(procedure.id)).filter((r) => canSeeRevision(user, r));
  if (!rows.length) throw new Response(null, { status: 404 });
  const byId = new Map(rows.map((r) => [r.id, r.number]));
  return {
    slug: procedure.slug,
    title: procedure.title,
    rows: rows.map((r) => ({ ...r, basedOn: r.basedOnRevisionId ? (byId.get(r.basedOnRevisionId) ?? null) : null })),
  };
}

export default function History({ loaderData }: Route.ComponentProps) {
  const { slug, title, rows } = loaderData;
  return (
    <>
      <PageHeader
        title={title}
        kicker="Revision history"
        actions={
          <Link className="btn no-underline" to={`/procedures/${slug}`}>
            Back to the procedure
          </Link>
        }
      />
      <ol className="space-y-3" data-testid="history">
        {rows.map((r, i) => (
          <li key={r.id} className="card flex flex-wrap items-start justify-between gap-3 p-4" data-testid={`history-rev-${r.number}`}>
            <div className="min-w-0 flex-1">
              <p className="flex flex-wrap items-center gap-2">
                <Link to={`/procedures/${slug}/r/${r.number}`} className="num font-serif text-lg font-semibold">
                  Revision {r.number}
                </Link>
                <StateBadge state={r.state} />
                {r.basedOn && <span className="text-xs text-graphite-soft">from revision {r.basedOn}</span>}
              </p>
              <p className="mt-1 text-sm text-graphite-soft">
                Written by {r.author ?? "former staff"} · started {fmtDate(r.createdAt)}
                {r.submittedAt && <> · submitted {fmtDate(r.submittedAt)}</>}
                <span className="num"> · {r.wordCount} words</span>
              </p>
              {r.publishedAt && (
                <p className="mt-1 text-sm" data-testid="history-published">
                  <span className="font-semibold">Published</span> {fmtDate(r.publishedAt)} by {r.publishedBy ?? "former staff"}
                  {r.supersededAt && <span className="text-graphite-soft"> · superseded {fmtDate(r.supersededAt)}</span>}
                </p>
              )}
              {r.changeNote && (
                <p className="mt-1 text-sm">
                  <span className="text-graphite-soft">Change note:</span> {r.changeNote}
                </p>
              )}
              <ReturnList returns={r.returns} waiting={Boolean(r.waiting)} waitingTestId="history-returned" className="mt-2 -mx-3" />
            </div>
            <div className="flex flex-wrap gap-2 text-sm">
              {rows[i + 1] && (
                <Link className="btn py-1 no-underline" to={`/procedures/${slug}/compare?from=${rows[i + 1].number}&to=${r.number}`}>
                  Compare with revision {rows[i + 1].number}
                </Link>
              )}
              <Link className="btn py-1 no-underline" to={`/procedures/${slug}/r/${r.number}`}>
                Open
              </Link>
            </div>
          </li>
        ))}
      </ol>
    </>
  );
}
