import type { ReactNode } from "react";
import { Link } from "react-router";
import { STATE_LABELS, type RevisionState } from "~/lib/procedures/state";
import type { Widget } from "~/lib/procedures/body";
import type { SpecView } from "~/lib/procedures/diff";
import { ProcedureBody } from "./ProcedureBody";
import { formatDay } from "~/lib/dates";
import { useLandingTarget } from "~/components/search/LandingTarget";

export const fmtDate = formatDay;

/** One return to Draft as a page shows it (`by` is null for an account since removed). */
export type ReturnView = { by: string | null; reason: string; at: Date | string };

/**
 * Every return of a revision to Draft, oldest first, each with its editor and reason. The one the
 * draft still waits on (`waiting`: the latest, not yet submitted again) stands out; every other
 * was followed by a new submission.
 */
export function ReturnList({
  returns,
  waiting,
  waitingTestId = "return-reason",
  className = "",
}: {
  returns: ReturnView[];
  waiting: boolean;
  waitingTestId?: string;
  className?: string;
}) {
  if (!returns.length) return null;
  return (
    <ol className={`space-y-1.5 text-sm ${className}`} aria-label="Returns to Draft" data-testid="returns">
      {returns.map((r, i) => {
        const open = waiting && i === returns.length - 1;
        return (
          <li
            key={`${new Date(r.at).getTime()}-${r.reason}`}
            className={open ? "rounded-md border border-brass/60 bg-brass-soft/60 px-3 py-1.5" : "px-3"}
            data-testid={open ? waitingTestId : "return-earlier"}
          >
            <span className="font-semibold">Returned to Draft</span> by {r.by ?? "former staff"} on {fmtDate(r.at)}: {r.reason}
            {!open && <span className="text-graphite-soft"> (changed and submitted again)</span>}
          </li>
        );
      })}
    </ol>
  );
}

export function StateBadge({ state }: { state: RevisionState }) {
  const cls =
    state === "published"
      ? "bg-ok-soft text-ok"
      : state === "in_review"
        ? "bg-brass-soft text-brass"
        : state === "superseded"
          ? "bg-paper-deep text-graphite-soft line-through decoration-1"
          : "bg-paper-deep text-graphite";
  return (
    <span className={`rounded px-1.5 py-0.5 text-xs font-semibold ${cls}`} data-testid="state-badge">
      {STATE_LABELS[state]}
    </span>
  );
}

/** `units`: unit code → label, from the server (renderBody); the client ships no unit tables. */
export function SpecTable({
  specs,
  caption = "Specs",
  units = {},
}: {
  specs: SpecView[];
  caption?: string;
  units?: Record<string, string>;
}) {
  if (!specs.length) return null;
  return (
    <section aria-labelledby="spec-table-h" className="spec-table card overflow-x-auto p-0">
      <h2 id="spec-table-h" className="px-4 pt-3 text-lg">
        {caption}
      </h2>
      <table className="mt-2 w-full text-left text-sm" data-testid="spec-table">
        <thead className="border-y border-rule bg-paper-deep/60 text-xs uppercase tracking-wide text-graphite-soft">
          <tr>
            <th className="px-4 py-1.5">Spec</th>
            <th className="px-3 py-1.5 text-right">Nominal</th>
            <th className="px-3 py-1.5 text-right">Min</th>
            <th className="px-3 py-1.5 text-right">Max</th>
            <th className="px-3 py-1.5">Unit</th>
            <th className="px-4 py-1.5">Note</th>
          </tr>
        </thead>
        <tbody className="num">
          {specs.map((s) => (
            <tr key={s.id} className="border-b border-rule/60 last:border-0">
              <td className="px-4 py-1.5 font-semibold">{s.label}</td>
              <td className="px-3 py-1.5 text-right">{s.nominal ?? "—"}</td>
              <td className="px-3 py-1.5 text-right">{s.min ?? "—"}</td>
              <td className="px-3 py-1.5 text-right">{s.max ?? "—"}</td>
              <td className="px-3 py-1.5">{units[s.unit] ?? s.unit}</td>
              <td className="px-4 py-1.5 text-graphite-soft">{s.note}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </section>
  );
}

export function RevisionArticle({
  title,
  summary,
  tags,
  number,
  state,
  date,
  author,
  publishedBy,
  html,
  widgets,
  specs,
  units,
  banner,
  aside,
}: {
  title: string;
  summary: string;
  tags: string[];
  number: number;
  state: RevisionState;
  date: Date | string | null;
  author: string | null;
  /** The editor who published it (published and superseded revisions). */
  publishedBy?: string | null;
  /** null: the page already holds the body (app/lib/procedures/page-body.server.ts). */
  html: string | null;
  widgets: Widget[];
  specs: SpecView[];
  units?: Record<string, string>;
  banner?: ReactNode;
  aside?: ReactNode;
}) {
  useLandingTarget(); // a search hit's `#spec-…` scrolls to the spec and marks it
  return (
    <div className="grid gap-8 lg:grid-cols-[minmax(0,1fr)_17rem]">
      <article className="min-w-0">
        {banner}
        <header className="mb-5 border-b border-rule pb-4">
          <h1 className="text-3xl leading-tight" data-testid="procedure-title">
            {title}
          </h1>
          {summary && <p className="mt-2 font-serif text-lg text-graphite-soft">{summary}</p>}
          <p className="mt-3 flex flex-wrap items-center gap-x-3 gap-y-1 text-sm text-graphite-soft">
            <span className="num font-semibold text-graphite" data-testid="revision-number">
              Revision {number}
            </span>
            <StateBadge state={state} />
            {author && <span data-testid="revision-author">Written by {author}</span>}
            {date &&
              (state === "published" || state === "superseded" ? (
                <span data-testid="revision-published">
                  Published {fmtDate(date)}
                  {publishedBy ? ` by ${publishedBy}` : ""}
                </span>
              ) : (
                <span>Saved {fmtDate(date)}</span>
              ))}
          </p>
          {tags.length > 0 && (
            <p className="mt-2 flex flex-wrap gap-1.5">
              {tags.map((t) => (
                <Link
                  key={t}
                  to={`/procedures?tag=${encodeURIComponent(t)}`}
                  className="rounded bg-paper-deep px-1.5 py-0.5 text-xs text-graphite-soft no-underline hover:text-graphite"
                >
                  {t}
                </Link>
              ))}
            </p>
          )}
        </header>
        {specs.length > 0 && (
          <div className="mb-6">
            <SpecTable specs={specs} units={units} />
          </div>
        )}
        <ProcedureBody html={html} widgets={widgets} units={units} />
      </article>
      {/* On a tablet the side cards follow the body, two abreast. */}
      {aside && <aside className="no-print grid gap-5 text-sm sm:grid-cols-2 lg:block lg:space-y-5">{aside}</aside>}
    </div>
  );
}
