import { Link, useSearchParams } from "react-router";
import type { Route } from "./+types/index";
import { z } from "zod";
import { optionalParam } from "~/lib/edge";
import { parseSearch } from "~/lib/edge.server";
import { EmptyState, PageHeader } from "~/components/page";
import { requirePermission } from "~/lib/auth.server";
import { can } from "~/lib/permissions";
import { STATE_LABELS } from "~/lib/procedures/state";
import { AREA_LABELS, AREAS, type Area } from "~/lib/procedures/areas";
import { allTags, listPublished, openRevisionsFor } from "~/lib/procedures/pages.server";
import { formatDay } from "~/lib/dates";
import { sameTag } from "~/lib/tags";

export const meta: Route.MetaFunction = () => [{ title: "Procedures · Benchreel" }];

const tagSearch = z.object({ tag: optionalParam(200) });

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requirePermission(request, "shop:read");
  const asked = parseSearch(request, tagSearch).tag?.trim() || null;
  const [rows, tags, open] = await Promise.all([
    listPublished(asked),
    allTags(),
    can(user.role, "procedure:view-drafts:own")
      ? openRevisionsFor(user, { reviewQueue: can(user.role, "procedure:review") })
      : Promise.resolve([]),
  ]);
  // Tags match without case: the filter shows the tag as the procedures spell it.
  const tag = asked ? (tags.find((t) => sameTag(t.tag, asked))?.tag ?? asked) : null;
  return { rows, tags, tag, open, canDraft: can(user.role, "procedure:draft") };
}

const fmt = formatDay;

export default function Procedures({ loaderData }: Route.ComponentProps) {
  const { rows, tags, tag, open, canDraft } = loaderData;
  const [params] = useSearchParams();
  const byArea = new Map<Area, typeof rows>();
  for (const r of rows) byArea.set(r.area, [...(byArea.get(r.area) ?? []), r]);
  return (
    <>
      <PageHeader
        title="Procedures"
        kicker="How the shop does each job"
        actions={
          canDraft ? (
            <Link className="btn btn-primary no-underline" to="/procedures/new">
              Write a new procedure
            </Link>
          ) : null
        }
      >
        Published revisions, grouped by shop area. Everyone works to the page shown here.
      </PageHeader>

      {open.length > 0 && (
        <section className="card mb-6" aria-labelledby="open-h">
          <h2 id="open-h" className="text-lg">
            On the bench
          </h2>
          <p className="text-sm text-graphite-soft">
            Your drafts{open.some((o) => o.state === "in_review") ? ", and revisions waiting for review" : ""}.
          </p>
          <ul className="mt-3 divide-y divide-rule/70">
            {open.map((o) => (
              <li key={o.id} className="flex flex-wrap items-baseline justify-between gap-2 py-2">
                <Link
                  to={o.state === "draft" ? `/procedures/${o.slug}/r/${o.number}/edit` : `/procedures/${o.slug}/r/${o.number}`}
                  className="font-semibold"
                >
                  {o.title} <span className="num font-normal text-graphite-soft">· revision {o.number}</span>
                </Link>
                <span className="text-sm text-graphite-soft">
                  <span
                    className={`mr-2 rounded px-1.5 py-0.5 text-xs font-semibold ${o.state === "in_review" ? "bg-brass-soft text-brass" : "bg-paper-deep"}`}
                  >
                    {STATE_LABELS[o.state]}
                  </span>
                  {o.returned ? "returned · " : ""}
                  {o.author} · {fmt(o.updatedAt)}
                </span>
              </li>
            ))}
          </ul>
        </section>
      )}

      {tags.length > 0 && (
        <nav aria-label="Filter by tag" className="mb-6 flex flex-wrap items-center gap-2 text-sm">
          <span className="text-graphite-soft">Tags:</span>
          <Link
            to="/procedures"
            className={`rounded-full border px-2.5 py-0.5 no-underline ${!tag ? "border-brass bg-brass-soft text-graphite" : "border-rule text-graphite-soft"}`}
          >
            all
          </Link>
          {tags.map((t) => (
            <Link
              key={t.tag}
              to={`/procedures?tag=${encodeURIComponent(t.tag)}`}
              aria-current={tag === t.tag ? "true" : undefined}
              className={`rounded-full border px-2.5 py-0.5 no-underline ${tag === t.tag ? "border-brass bg-brass-soft text-graphite" : "border-rule text-graphite-soft hover:text-graphite"}`}
            >
              {t.tag} <span className="num text-xs">{t.n}</span>
            </Link>
          ))}
        </nav>
      )}

      {rows.length === 0 ? (
        <EmptyState title={tag ? `No published procedure is tagged “${tag}”` : "No procedure is published yet"}>
          {tag ? (
            <Link to="/procedures">Show all procedures</Link>
          ) : canDraft ? (
            "Write the first one; an editor reviews and publishes it."
          ) : (
            "Once an editor publishes one, it shows here."
          )}
        </EmptyState>
      ) : (
        <div className="space-y-8">
          {AREAS.filter((a) => byArea.has(a)).map((a) => (
            <section key={a} aria-labelledby={`area-${a}`}>
              <h2 id={`area-${a}`} className="mb-2 flex items-baseline gap-3 text-xl">
                {AREA_LABELS[a]} <span className="num font-sans text-sm font-normal text-graphite-soft">{byArea.get(a)!.length}</span>
              </h2>
              <ul className="grid gap-3 md:grid-cols-2">
                {byArea.get(a)!.map((r) => (
                  <li key={r.id} className="card p-4" data-testid={`procedure-card-${r.slug}`}>
                    <Link
                      to={`/procedures/${r.slug}`}
                      className="font-serif text-lg font-semibold leading-snug text-graphite no-underline hover:text-teal"
                    >
                      {r.title}
                    </Link>
                    {r.summary && <p className="mt-1 text-sm text-graphite-soft">{r.summary}</p>}
                    <p className="mt-2 text-xs text-graphite-soft">
                      <span className="num font-semibold text-graphite">Rev. {r.number}</span> · published {fmt(r.publishedAt)} ·{" "}
                      {r.author ?? "former staff"}
                    </p>
                    {r.tags.length > 0 && (
                      <p className="mt-2 flex flex-wrap gap-1.5">
                        {r.tags.map((t) => (
                          <Link
                            key={t}
                            to={`/procedures?${new URLSearchParams({ ...Object.fromEntries(params), tag: t })}`}
                            className="rounded bg-paper-deep px-1.5 py-0.5 text-xs text-graphite-soft no-underline hover:text-graphite"
                          >
                            {t}
                          </Link>
                        ))}
                      </p>
                    )}
                  </li>
                ))}
              </ul>
            </section>
          ))}
        </div>
      )}
    </>
  );
}
