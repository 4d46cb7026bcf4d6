import { Link } from "react-router";
import { formatDayMonthTime } from "~/lib/dates";
import type { RunListItem } from "~/lib/runs/runs.server";

const STATUS_WORDS: Record<RunListItem["status"], string> = { open: "Open", finished: "Finished", abandoned: "Stopped" };

/** Runs with their progress: on a build's page (its runs) and on the Shop floor (every open run, with its build). */
export function RunList({ rows, showBuild = false }: { rows: RunListItem[]; showBuild?: boolean }) {
  return (
    <ul className="divide-y divide-rule/70" data-testid="run-list">
      {rows.map((r) => {
        const pct = r.total ? Math.round((r.measured / r.total) * 100) : 0;
        return (
          <li key={r.id} className="flex flex-wrap items-center justify-between gap-x-3 gap-y-1 py-2" data-testid="run-row">
            <span className="min-w-0">
              <Link to={`/runs/${r.id}`} className="font-semibold">
                {r.procedureTitle}
              </Link>{" "}
              <span className="num text-sm text-graphite-soft">
                rev. {r.revisionNumber}
                {showBuild ? ` · ${r.buildNumber}` : ""} · {r.startedByName ?? "someone no longer here"} · {formatDayMonthTime(r.updatedAt)}
              </span>
            </span>
            <span className="flex items-center gap-2 text-sm">
              {r.status === "open" ? (
                <>
                  <span className="num" data-testid="run-row-progress">
                    {r.measured} of {r.total} measured
                  </span>
                  <span className="inline-block h-2 w-20 overflow-hidden rounded bg-paper-deep" aria-hidden="true">
                    <span className="block h-full bg-brass" style={{ width: `${pct}%` }} />
                  </span>
                </>
              ) : r.status === "finished" && r.testRecordId ? (
                <Link to={`/test-records/${r.testRecordId}`}>{STATUS_WORDS[r.status]}: its record</Link>
              ) : (
                <span className="text-graphite-soft">{STATUS_WORDS[r.status]}</span>
              )}
            </span>
          </li>
        );
      })}
    </ul>
  );
}

/** The build page's runs: every run on the build, open ones first, and where to start another. */
export function BuildRuns({ rows, buildNumber, canStart }: { rows: RunListItem[]; buildNumber: string; canStart: boolean }) {
  const open = rows.filter((r) => r.status === "open").length;
  return (
    <div className="mt-4 border-t border-rule/60 pt-3" data-testid="build-runs">
      <h3 className="text-base font-semibold">Runs {open ? `(${open} open)` : ""}</h3>
      {rows.length ? (
        <RunList rows={rows} />
      ) : (
        <p className="mt-1 text-sm text-graphite-soft">No procedure has been worked step by step on this build yet.</p>
      )}
      {canStart && (
        <p className="mt-2 text-sm">
          <Link to={`/runs/start?build=${encodeURIComponent(buildNumber)}`}>Start a run on this build</Link>
        </p>
      )}
    </div>
  );
}

/** The Shop floor's runs being worked now. */
export function OpenRuns({ rows }: { rows: RunListItem[] }) {
  return (
    <section aria-labelledby="open-runs-h" className="card mb-6" data-testid="open-runs">
      <h2 id="open-runs-h" className="text-lg">
        Runs open now
      </h2>
      <p className="text-sm text-graphite-soft">Procedures being worked step by step at the bench, with how far each has got.</p>
      <RunList rows={rows} showBuild />
    </section>
  );
}
