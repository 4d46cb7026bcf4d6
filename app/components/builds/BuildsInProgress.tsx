import { Link } from "react-router";
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

/** The Shop floor's builds still in the shop, those with readings out of spec first. */
export function BuildsInProgress({ rows }: { rows: Row[] }) {
  const sorted = [...rows].sort((a, b) => b.counts.out - a.counts.out);
  return (
    <section aria-labelledby="builds-h" className="card mb-6" data-testid="builds-in-progress">
      <h2 id="builds-h" className="text-lg">
        Builds in progress
      </h2>
      <p className="text-sm text-graphite-soft">
        Engines in the shop, those with readings out of spec first. <Link to="/builds">All builds</Link>
      </p>
      <ul className="mt-2 divide-y divide-rule/60">
        {sorted.map((b) => (
          <li key={b.id} className="flex flex-wrap items-baseline gap-x-3 gap-y-1 py-2 text-sm" data-testid="build-in-progress">
            <Link to={`/builds/${b.number}`} className="num font-semibold">
              {b.number}
            </Link>
            <span className="min-w-0 flex-1">
              {b.customerName}
              {b.engine && <span className="text-graphite-soft"> · {b.engine}</span>}
            </span>
            <StatusBadge status={b.status} />
            <CountsLine counts={b.counts} />
            {/* OPEN RUNS: the runs helper shows this build's open runs here. */}
          </li>
        ))}
      </ul>
    </section>
  );
}
