import { Form, Link, useSearchParams } from "react-router";
import type { Route } from "./+types/search";
import { EmptyState, PageHeader } from "~/components/page";
import { Highlighted } from "~/components/search/Highlighted";
import { ReadingMatches } from "~/components/search/ReadingMatches";
import { requirePermission } from "~/lib/auth.server";
import { clock, KIND_LABELS, opensAtText, STATE_LABELS } from "~/lib/search/highlight";
import { indexIsBehind, runSearch, searchParamsSchema, type SearchResponse } from "~/lib/search/query.server";
import { can } from "~/lib/permissions";
import { wordGroupLists } from "~/lib/search/words.server";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.q ? `“${data.q}” · ` : ""}Search · Benchreel` }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requirePermission(request, "search:use");
  const raw = Object.fromEntries(new URL(request.url).searchParams);
  const parsed = searchParamsSchema.safeParse(raw);
  const behind = await indexIsBehind().catch(() => true);
  const canEditWords = can(user.role, "search:words:edit");
  if (!parsed.success) {
    return {
      q: String(raw.q ?? ""),
      result: null as SearchResponse | null,
      error: parsed.error.issues[0]?.message ?? "Bad query.",
      behind,
      canEditWords,
      examples: [] as string[][],
    };
  }
  const p = parsed.data;
  if (!p.q && !p.type && !p.tag && !p.state && !p.uploader) {
    const examples = (await wordGroupLists()).slice(0, 3).map((g) => g.slice(0, 2));
    return { q: "", result: null, error: null, behind, examples, canEditWords };
  }
  try {
    return { q: p.q, result: await runSearch(user, p), error: null, behind, canEditWords, examples: [] };
  } catch {
    return {
      q: p.q,
      result: null,
      error: "The search service is not answering right now. Your changes are saved and will be searchable when it is back.",
      behind: true,
      canEditWords,
      examples: [],
    };
  }
}

const FACETS: { key: "kind" | "tags" | "state" | "uploader"; param: string; title: string; label?: (v: string) => string }[] = [
  { key: "kind", param: "type", title: "Kind", label: (v) => KIND_LABELS[v] ?? v },
  { key: "state", param: "state", title: "Procedure state", label: (v) => STATE_LABELS[v] ?? v },
  { key: "tags", param: "tag", title: "Tag" },
  { key: "uploader", param: "uploader", title: "By" },
];

export default function Search({ loaderData }: Route.ComponentProps) {
  const { result, error, behind, q } = loaderData;
  const [params] = useSearchParams();
  const withParam = (key: string, value: string | null) => {
    const next = new URLSearchParams(params);
    if (value == null || next.get(key) === value) next.delete(key);
    else next.set(key, value);
    next.delete("page");
    return `/search?${next.toString()}`;
  };
  const page = (n: number) => {
    const next = new URLSearchParams(params);
    next.set("page", String(n));
    return `/search?${next.toString()}`;
  };
  return (
    <>
      <PageHeader
        title="Search"
        actions={
          loaderData.canEditWords && (
            <Link to="/search/words" className="btn no-underline">
              Edit search words
            </Link>
          )
        }
      />
      <Form method="get" className="mb-6 flex max-w-2xl gap-2" role="search">
        <label htmlFor="search-page-q" className="sr-only">
          Search
        </label>
        <input
          id="search-page-q"
          name="q"
          type="search"
          defaultValue={q}
          className="field"
          placeholder="e.g. head stud torque moly, piston to wall 4032, M12x1.5"
        />
        {["type", "tag", "state", "uploader"].map((k) => params.get(k) && <input key={k} type="hidden" name={k} value={params.get(k)!} />)}
        <button className="btn btn-primary" type="submit">
          Search
        </button>
      </Form>
      {behind && (
        <p role="status" className="mb-4 rounded-md border border-brass/40 bg-brass-soft px-4 py-2 text-sm" data-testid="search-behind">
          Recent changes are still being indexed; results may be a little behind.
        </p>
      )}
      {error && (
        <p role="alert" className="mb-4 rounded-md border border-spec-red/40 bg-spec-red-soft px-4 py-2 text-sm text-spec-red">
          {error}
        </p>
      )}
      {!result && !error && (
        <EmptyState title="Search the shop's knowledge">
          Procedures, specs, marks in recordings, readings and recordings. Typos and word starts are fine; numbers and sizes too (“0.0035”,
          “M12x1.5”).
          {loaderData.examples.length ? (
            <> Trade words match each other, e.g. {loaderData.examples.map((g) => g.join(" ↔ ")).join("; ")}.</>
          ) : null}
        </EmptyState>
      )}
      {result && result.total === 0 && (
        <EmptyState title={q ? `Nothing found for “${q}”` : "Nothing found"}>
          <span data-testid="search-total">
            Try fewer words, or another word for the same thing
            {params.get("type") || params.get("tag") || params.get("state") || params.get("uploader") ? ", or drop a filter" : ""}. Typos
            and word starts are fine.
          </span>
        </EmptyState>
      )}
      {result && result.total > 0 && (
        <div className="grid gap-6 md:grid-cols-[14rem_1fr]">
          <aside aria-label="Filters" className="space-y-5 text-sm">
            {FACETS.map((f) => {
              const dist = result.facets[f.key] ?? {};
              const entries = Object.entries(dist)
                .sort((a, b) => b[1] - a[1])
                .slice(0, 12);
              if (!entries.length) return null;
              return (
                <section key={f.key}>
                  <h2 className="mb-1 font-sans text-xs font-semibold uppercase tracking-wide text-graphite-soft">{f.title}</h2>
                  <ul className="space-y-0.5">
                    {entries.map(([value, count]) => {
                      const active = params.get(f.param) === value;
                      return (
                        <li key={value}>
                          <Link
                            to={withParam(f.param, value)}
                            className={`flex min-h-11 items-center justify-between rounded px-2 py-1 no-underline lg:min-h-0 ${active ? "bg-brass-soft font-semibold text-graphite" : "text-graphite hover:bg-paper-deep"}`}
                            data-testid={`facet-${f.key}`}
                          >
                            <span>{f.label ? f.label(value) : value}</span>
                            <span className="num text-graphite-soft">{count}</span>
                          </Link>
                        </li>
                      );
                    })}
                  </ul>
                </section>
              );
            })}
          </aside>
          <section aria-label="Results">
            <p className="mb-3 text-sm text-graphite-soft" data-testid="search-total">
              {result.total} match{result.total === 1 ? "" : "es"}
              {q ? <> for “{q}”</> : null}
            </p>
            <ol className="space-y-3">
              {result.hits.map((h) => (
                <li key={h.id} className="card py-3" data-testid="search-result">
                  <div className="flex flex-wrap items-baseline gap-x-3 gap-y-1">
                    <span className="rounded bg-paper-deep px-1.5 py-0.5 text-xs font-semibold text-graphite-soft">
                      {KIND_LABELS[h.kind] ?? h.kind}
                    </span>
                    <Link to={h.url} reloadDocument={opensAtText(h.url)} className="font-serif text-lg">
                      <Highlighted text={h.title} />
                    </Link>
                    {h.t != null && h.kind !== "reading" && <span className="num text-sm text-teal">at {clock(h.t)}</span>}
                    {h.state && h.state !== "published" && (
                      <span className="text-xs font-semibold text-brass">{STATE_LABELS[h.state] ?? h.state}</span>
                    )}
                  </div>
                  {h.context && <p className="text-sm text-graphite-soft">{h.context}</p>}
                  {h.snippet && (
                    <p className="mt-1 text-sm">
                      <Highlighted text={h.snippet} />
                    </p>
                  )}
                  <ReadingMatches hit={h} />
                </li>
              ))}
            </ol>
            {result.pages > 1 && (
              <nav aria-label="Pages" className="mt-6 flex items-center gap-3 text-sm">
                {result.page > 1 && (
                  <Link to={page(result.page - 1)} className="btn">
                    ← Previous
                  </Link>
                )}
                <span className="num">
                  Page {result.page} of {result.pages}
                </span>
                {result.page < result.pages && (
                  <Link to={page(result.page + 1)} className="btn">
                    Next →
                  </Link>
                )}
              </nav>
            )}
          </section>
        </div>
      )}
    </>
  );
}
