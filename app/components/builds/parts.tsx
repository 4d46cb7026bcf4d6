import { BUILD_STATUS_LABELS, type BuildStatus } from "~/lib/builds/status";

const STATUS_LOOK: Record<BuildStatus, string> = {
  open: "border-rule bg-card text-graphite",
  on_bench: "border-brass/60 bg-brass-soft/60 text-graphite",
  finished: "border-ok/30 bg-ok-soft text-ok",
  delivered: "border-rule bg-paper-deep text-graphite-soft",
};

/** Where the build stands, in our words; never red (red is kept for Out of spec). */
export function StatusBadge({ status }: { status: BuildStatus }) {
  return (
    <span
      className={`inline-block whitespace-nowrap rounded border px-1.5 py-0.5 text-xs font-semibold ${STATUS_LOOK[status]}`}
      data-testid="build-status"
      data-status={status}
    >
      {BUILD_STATUS_LABELS[status]}
    </span>
  );
}

/**
 * The build's test records by verdict: "1 record within spec", "3 records: 2 within, 1 out of
 * spec", "1 record out of spec", or "no test record filed yet".
 */
export function CountsLine({ counts }: { counts: { records: number; out: number; incomplete: number } }) {
  if (!counts.records) return <span className="text-graphite-soft">no test record filed yet</span>;
  const within = counts.records - counts.out - counts.incomplete;
  const records = counts.records === 1 ? "1 record" : `${counts.records} records`;
  if (!counts.out && !counts.incomplete)
    return (
      <span className="num whitespace-nowrap text-ok" data-testid="counts-line">
        {counts.records === 1 ? "1 record within spec" : `${records}, all within spec`}
      </span>
    );
  if (counts.records === 1)
    return counts.out ? (
      <strong className="num whitespace-nowrap text-spec-red" data-testid="out-count">
        1 record out of spec
      </strong>
    ) : (
      <span className="num whitespace-nowrap text-brass" data-testid="counts-line">
        1 record incomplete
      </span>
    );
  const parts = [
    within > 0 && <span key="within">{within} within</span>,
    counts.out > 0 && (
      <strong key="out" className="text-spec-red" data-testid="out-count">
        {counts.out} out of spec
      </strong>
    ),
    counts.incomplete > 0 && (
      <span key="incomplete" className="text-brass">
        {counts.incomplete} incomplete
      </span>
    ),
  ].filter(Boolean);
  return (
    <span className="num whitespace-nowrap" data-testid="counts-line">
      {records}: {parts.flatMap((p, i) => (i ? [", ", p] : [p]))}
    </span>
  );
}
