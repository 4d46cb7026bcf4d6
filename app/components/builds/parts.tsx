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

/** "2 out of spec · 1 incomplete", or a calm "all within spec" / "nothing filed yet". */
export function CountsLine({ counts }: { counts: { records: number; out: number; incomplete: number } }) {
  if (!counts.records) return <span className="text-graphite-soft">nothing filed yet</span>;
  return (
    <span className="num whitespace-nowrap">
      {counts.out > 0 && (
        <strong className="text-spec-red" data-testid="out-count">
          {counts.out} out of spec
        </strong>
      )}
      {counts.out > 0 && counts.incomplete > 0 && " · "}
      {counts.incomplete > 0 && <span className="text-brass">{counts.incomplete} incomplete</span>}
      {!counts.out && !counts.incomplete && (
        <span className="text-ok">{counts.records === 1 ? "1 within spec" : `all ${counts.records} within spec`}</span>
      )}
    </span>
  );
}
