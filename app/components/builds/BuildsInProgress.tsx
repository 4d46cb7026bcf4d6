import { Link } from "react-router";
import type { RunListItem } from "~/lib/runs/runs.server";
import { CountsLine, StatusBadge } from "./parts";

type Row = {
  id: string;
  number: string;
  customerName: string;
  engine: string;
  status: "open" | "on_bench" | "finished" | "delivered";
  leadBuilderName: string | null;
  counts: { records: number; out: number; incomplete: number };
};

/** "2 runs open · 6 of 9 measured": the build's open runs and their places measured, together. */
function OpenRunsLine({ runs }: { runs: RunListItem[] }) {
  if (!runs.length) return null;
  const measured = runs.reduce((n, r) => n + r.measured, 0);
  const total = runs.reduce((n, r) => n + r.total, 0);
  const only = runs.length === 1 ? runs[0] : null;
  const text = `${runs.length === 1 ? "1 run open" : `${runs.length} runs open`} · ${measured} of ${total} measured`;
  return (
    <span className="num whitespace-nowrap text-graphite-soft" data-testid="build-open-runs">
      {only ? (
        <Link to={`/runs/${only.id}`} title={only.procedureTitle}>
          {text}
        </Link>
      ) : (
        text
      )}
    </span>
  );
}

/**
 * The Shop floor's builds still in the shop, in the order they come (those with more records out
 * of spec first, sorted before the list is cut), each with its open runs.
 */
export function BuildsInProgress({ rows, openRuns }: { rows: Row[]; openRuns: RunListItem[] }) {
  return (
    <section aria-labelledby="builds-h" className="card mb-6" data-testid="builds-in-progress">
      <h2 id="builds-h" className="text-lg">
        Builds in progress
      </h2>
      <p className="text-sm text-graphite-soft">
        Engines in the shop, those with most records out of spec first, with their open runs. <Link to="/builds">All builds</Link>
      </p>
      <ul className="mt-2 divide-y divide-rule/60">
        {rows.map((b) => (
          <li
            key={b.id}
            className="flex flex-wrap items-baseline gap-x-3 gap-y-1 py-2 text-sm"
            data-testid="build-in-progress"
            data-number={b.number}
            data-out={b.counts.out}
          >
            <Link to={`/builds/${b.number}`} className="num font-semibold">
              {b.number}
            </Link>
            <span className="min-w-0 flex-1">
              {b.customerName}
              {b.engine && <span className="text-graphite-soft"> · {b.engine}</span>}
            </span>
            <StatusBadge status={b.status} />
            <CountsLine counts={b.counts} />
            <OpenRunsLine runs={openRuns.filter((r) => r.buildId === b.id)} />
          </li>
        ))}
      </ul>
    </section>
  );
}
